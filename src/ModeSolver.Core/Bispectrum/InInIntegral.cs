using System.Numerics;
using ModeSolver.Background;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The in-in integral of one triangle over the shared mode histories: 10-point Gauss-Legendre panels in N, each spanning
/// at most <see cref="BispectrumSettings.PanelPhase"/> radians of the early-time oscillation exp(i K tau) (and at most
/// <see cref="BispectrumSettings.MaxPanel"/> e-folds), with panel edges at the start, the early end and the background's
/// non-smooth points. On the same nodes it accumulates, for the three dampings kappa, kappa/2, kappa/4 of the factor
/// exp(-kappa K/(aH)), the part before the nominal start (for the deeper-start variant), the main part and the part after
/// the early end (for the earlier-end variant).
/// </summary>
internal static class InInIntegral
{
    // Gauss-Legendre 10-point nodes and weights on [-1, 1]: Abramowitz & Stegun, Handbook of Mathematical Functions (1964), table 25.4.
    private static ReadOnlySpan<double> Nodes => [0.1488743389816312, 0.4333953941292472, 0.6794095682990244, 0.8650633666889845, 0.9739065285171717];
    private static ReadOnlySpan<double> Weights => [0.2955242247147529, 0.2692667193099963, 0.2190863625159820, 0.1494513491505806, 0.0666713443086881];

    /// <summary>Number of damping variants (kappa, kappa/2, kappa/4).</summary>
    public const int Dampings = 3;

    /// <summary>Integrates triangle <paramref name="t"/> from <paramref name="nDeep"/> (deep start) to <paramref name="nEnd"/>.</summary>
    public static InInSums Integrate(IBackground bg, in Triangle t, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double nDeep, double nStart, double nEarlyEnd, double nEnd, BispectrumSettings settings)
    {
        var v = new CubicVertices(t);
        var sums = new InInSums();
        double lnK = Math.Log(t.Perimeter);
        double kappa = settings.Damping;
        var kinks = bg.NonSmoothTimes;
        // Region edges: deep start, nominal start, early end, end, and the kinks in between.
        Span<double> edges = stackalloc double[4 + Math.Min(kinks.Count, 64)];
        int ne = 0;
        edges[ne++] = nDeep; edges[ne++] = nStart; edges[ne++] = nEarlyEnd; edges[ne++] = nEnd;
        for (int i = 0; i < kinks.Count && ne < edges.Length; i++)
            if (kinks[i] > nDeep && kinks[i] < nEnd) edges[ne++] = kinks[i];
        edges = edges[..ne];
        edges.Sort();
        for (int e = 0; e + 1 < edges.Length; e++)
        {
            double a = edges[e], b = edges[e + 1];
            if (!(b > a)) continue;
            int region = b <= nStart ? 0 : b <= nEarlyEnd ? 1 : 2;
            double n = a;
            while (n < b)
            {
                double x0 = Math.Exp(lnK - n) / bg.At(n).H;
                double w = Math.Min(settings.MaxPanel, settings.PanelPhase / x0);
                double hi = b - n < 1.05 * w ? b : n + w;
                Panel(bg, v, h1, h2, h3, lnK, kappa, n, hi, ref sums, region, 1e-2 * settings.Tolerance);
                n = hi;
            }
        }
        for (int i = 0; i < kinks.Count; i++)
        {
            double tk = kinks[i];
            if (!(tk > nDeep && tk < nEnd)) continue;
            double eps = 1e-10 * Math.Max(1.0, Math.Abs(tk));
            var before = bg.At(tk - eps);
            var after = bg.At(tk + eps);
            h1.At(tk, out var u1, out var d1);
            h2.At(tk, out var u2, out var d2);
            h3.At(tk, out var u3, out var d3);
            double x = Math.Exp(lnK - tk) / before.H;
            var y = CubicVertices.Jump(before.Epsilon1, after.Epsilon2 - before.Epsilon2, before.H, x, u1, u2, u3, d1, d2, d3);
            sums.Add(tk <= nStart ? 0 : tk <= nEarlyEnd ? 1 : 2, y, x, kappa);
        }
        // The ends: U, D and e2 at the end and at the early end.
        End(bg, v, h1, h2, h3, nEnd, out sums.UEnd, out sums.DEnd, out sums.E2End, out sums.REnd);
        End(bg, v, h1, h2, h3, nEarlyEnd, out sums.UEarly, out sums.DEarly, out sums.E2Early, out sums.REarly);
        return sums;
    }

    /// <summary>Halvings of one panel at the most (a feature 2^-16 of a panel wide is still found if a node sees it).</summary>
    private const int MaxDepth = 16;

    // One panel: 10-point Gauss-Legendre on [a, b] and on its two halves; where the two disagree by more than
    // 1e-2 tolerance of the panel's integral of |Y| (damped by kappa/4, the weakest damping), the halves are split again.
    // The disagreement left at the accepted level is summed as the quadrature error.
    private static void Panel(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double lnK, double kappa, double a, double b, ref InInSums sums, int region, double tol)
    {
        var whole = Gauss(bg, v, h1, h2, h3, lnK, kappa, a, b);
        sums.Panels++;
        Refine(bg, v, h1, h2, h3, lnK, kappa, a, b, whole, 0, ref sums, region, tol);
    }

    private static void Refine(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double lnK, double kappa, double a, double b, in PanelSum whole, int depth, ref InInSums sums, int region, double tol)
    {
        double m = 0.5 * (a + b);
        var left = Gauss(bg, v, h1, h2, h3, lnK, kappa, a, m);
        var right = Gauss(bg, v, h1, h2, h3, lnK, kappa, m, b);
        sums.Panels += 2;
        double diff = (whole.S2 - left.S2 - right.S2).Magnitude;
        if (diff <= tol * (left.Abs + right.Abs) || depth >= MaxDepth)
        {
            sums.Add(region, left.S0 + right.S0, left.S1 + right.S1, left.S2 + right.S2);
            if (region == 1) sums.QuadratureError += diff;
            return;
        }
        Refine(bg, v, h1, h2, h3, lnK, kappa, a, m, left, depth + 1, ref sums, region, tol);
        Refine(bg, v, h1, h2, h3, lnK, kappa, m, b, right, depth + 1, ref sums, region, tol);
    }

    private static PanelSum Gauss(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double lnK, double kappa, double a, double b)
    {
        double mid = 0.5 * (a + b), half = 0.5 * (b - a);
        var nodes = Nodes;
        var weights = Weights;
        var r = new PanelSum();
        for (int i = 0; i < nodes.Length; i++)
        {
            for (int s = -1; s <= 1; s += 2)
            {
                double n = mid + s * half * nodes[i];
                var p = bg.At(n);
                double x = Math.Exp(lnK - n) / p.H;
                h1.At(n, out var u1, out var d1);
                Complex u2, d2, u3, d3;
                if (ReferenceEquals(h2, h1)) { u2 = u1; d2 = d1; } else h2.At(n, out u2, out d2);
                if (ReferenceEquals(h3, h1)) { u3 = u1; d3 = d1; }
                else if (ReferenceEquals(h3, h2)) { u3 = u2; d3 = d2; }
                else h3.At(n, out u3, out d3);
                var y = half * weights[i] * v.Integrand(p, x, u1, u2, u3, d1, d2, d3);
                double f0 = Math.Exp(-kappa * x), f1 = Math.Exp(-0.5 * kappa * x), f2 = Math.Exp(-0.25 * kappa * x);
                r.S0 += f0 * y;
                r.S1 += f1 * y;
                r.S2 += f2 * y;
                r.Abs += f2 * y.Magnitude;
            }
        }
        return r;
    }

    /// <summary>One panel's integrals at the three dampings and its integral of |Y| at the weakest.</summary>
    private struct PanelSum
    {
        public Complex S0, S1, S2;
        public double Abs;
    }

    private static void End(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3, double n,
        out Complex u, out double d, out double e2, out double r)
    {
        h1.At(n, out var u1, out var d1);
        h2.At(n, out var u2, out var d2);
        h3.At(n, out var u3, out var d3);
        u = u1 * u2 * u3;
        d = v.Denominator(u1, u2, u3);
        r = v.Redefinition(u1, u2, u3, d1, d2, d3);
        e2 = bg.At(n).Epsilon2;
    }
}

/// <summary>Accumulated integrals of one triangle: [damping variant, region] with region 0 deep, 1 main, 2 tail.</summary>
internal struct InInSums
{
    /// <summary>Integral of Y over each (damping, region).</summary>
    public Complex D0R0, D0R1, D0R2, D1R0, D1R1, D1R2, D2R0, D2R1, D2R2;
    /// <summary>u1 u2 u3, the denominator D and e2 at the end and the early end.</summary>
    public Complex UEnd, UEarly;
    /// <inheritdoc cref="UEnd"/>
    public double DEnd, DEarly, E2End, E2Early;
    /// <summary>The zeta zeta' part of the field redefinition at the end and the early end.</summary>
    public double REnd, REarly;

    /// <summary>10-point Gauss-Legendre panels evaluated (wholes and halves).</summary>
    public int Panels;

    /// <summary>Sum of the quadrature disagreements left in the main region (on the kappa/4 integral).</summary>
    public double QuadratureError;

    /// <summary>Adds the three damped integrals of a panel to <paramref name="region"/>.</summary>
    public void Add(int region, Complex s0, Complex s1, Complex s2)
    {
        switch (region)
        {
            case 0: D0R0 += s0; D1R0 += s1; D2R0 += s2; break;
            case 1: D0R1 += s0; D1R1 += s1; D2R1 += s2; break;
            default: D0R2 += s0; D1R2 += s1; D2R2 += s2; break;
        }
    }

    /// <summary>The quadrature error as an error of f_NL at the end: (5/6) 2 |U| error / D.</summary>
    public readonly double QuadratureFNL => 5.0 / 6.0 * 2.0 * UEnd.Magnitude * QuadratureError / DEnd;

    /// <summary>Adds a weighted integrand value at K/aH = <paramref name="x"/> to <paramref name="region"/>, damped three ways.</summary>
    public void Add(int region, Complex y, double x, double kappa)
    {
        double f0 = Math.Exp(-kappa * x), f1 = Math.Exp(-0.5 * kappa * x), f2 = Math.Exp(-0.25 * kappa * x);
        switch (region)
        {
            case 0: D0R0 += f0 * y; D1R0 += f1 * y; D2R0 += f2 * y; break;
            case 1: D0R1 += f0 * y; D1R1 += f1 * y; D2R1 += f2 * y; break;
            default: D0R2 += f0 * y; D1R2 += f1 * y; D2R2 += f2 * y; break;
        }
    }

    /// <summary>The integral for damping variant <paramref name="d"/> with or without the deep part and the tail.</summary>
    public readonly Complex Integral(int d, bool deep, bool tail) => d switch
    {
        0 => (deep ? D0R0 : 0) + D0R1 + (tail ? D0R2 : 0),
        1 => (deep ? D1R0 : 0) + D1R1 + (tail ? D1R2 : 0),
        _ => (deep ? D2R0 : 0) + D2R1 + (tail ? D2R2 : 0),
    };

    /// <summary>f_NL of damping variant <paramref name="d"/>: (5/6) S / D with S = -2 Im[U Integral] + (e2/2) D + R at the chosen end.</summary>
    public readonly double FNL(int d, bool deep, bool early)
    {
        var integral = Integral(d, deep, !early);
        Complex u = early ? UEarly : UEnd;
        double den = early ? DEarly : DEnd, e2 = early ? E2Early : E2End;
        double s = -2.0 * (u * integral).Imaginary + 0.5 * e2 * den + (early ? REarly : REnd);
        return 5.0 / 6.0 * s / den;
    }
}
