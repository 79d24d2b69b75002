using System.Numerics;
using ModeSolver.Background;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The in-in integral of one triangle over the shared mode histories. Before N_w (K/aH = start depth) the integral is
/// the analytic early-time limit (<see cref="EarlyTimes"/>); from there to the end, 10-point Gauss-Legendre panels in N,
/// each at first <see cref="BispectrumSettings.PanelPhase"/> radians of the oscillation exp(i K tau) and at most
/// <see cref="BispectrumSettings.MaxPanel"/> e-folds wide, halved adaptively, with panel edges at the start, the early end
/// and the background's non-smooth points (where the jump of e2 adds its delta function). It also keeps the part between
/// twice the start depth and the start with the early-time limit there (the deeper-start variant) and the part after
/// the early end (the earlier-end variant).
/// </summary>
internal static class InInIntegral
{
    // Gauss-Legendre 10-point nodes and weights on [-1, 1]: Abramowitz & Stegun, Handbook of Mathematical Functions (1964), table 25.4.
    private static ReadOnlySpan<double> Nodes => [0.1488743389816312, 0.4333953941292472, 0.6794095682990244, 0.8650633666889845, 0.9739065285171717];
    private static ReadOnlySpan<double> Weights => [0.2955242247147529, 0.2692667193099963, 0.2190863625159820, 0.1494513491505806, 0.0666713443086881];

    /// <summary>Halvings of one panel at the most.</summary>
    private const int MaxDepth = 16;

    /// <summary>Integrates triangle <paramref name="t"/>: early-time limit at <paramref name="nDeep"/> and <paramref name="nStart"/>, panels to <paramref name="nEnd"/>.</summary>
    public static InInSums Integrate(IBackground bg, in Triangle t, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double nDeep, double nStart, double nEarlyEnd, double nEnd, BispectrumSettings settings)
    {
        var v = new CubicVertices(t);
        var sums = new InInSums();
        double lnK = Math.Log(t.Perimeter);
        double tol = 1e-2 * settings.Tolerance;
        var kinks = bg.NonSmoothTimes;
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
                var whole = Gauss(bg, v, h1, h2, h3, lnK, n, hi);
                sums.Panels++;
                Refine(bg, v, h1, h2, h3, lnK, n, hi, whole, 0, ref sums, region, tol);
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
            sums.Add(tk <= nStart ? 0 : tk <= nEarlyEnd ? 1 : 2,
                CubicVertices.Jump(before.Epsilon1, after.Epsilon2 - before.Epsilon2, before.H, x, u1, u2, u3, d1, d2, d3));
        }
        sums.TailStart = EarlyTimes.Tail(bg, v, h1, h2, h3, lnK, nStart, out sums.TailTerm);
        sums.TailDeep = EarlyTimes.Tail(bg, v, h1, h2, h3, lnK, nDeep, out _);
        End(bg, v, h1, h2, h3, nEnd, out sums.UEnd, out sums.DEnd, out sums.E2End, out sums.REnd);
        End(bg, v, h1, h2, h3, nEarlyEnd, out sums.UEarly, out sums.DEarly, out sums.E2Early, out sums.REarly);
        return sums;
    }

    /// <summary>The integrand Y at <paramref name="n"/> (and K/aH there).</summary>
    public static Complex At(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3, double lnK, double n, out double x)
    {
        var p = bg.At(n);
        x = Math.Exp(lnK - n) / p.H;
        h1.At(n, out var u1, out var d1);
        Complex u2, d2, u3, d3;
        if (ReferenceEquals(h2, h1)) { u2 = u1; d2 = d1; } else h2.At(n, out u2, out d2);
        if (ReferenceEquals(h3, h1)) { u3 = u1; d3 = d1; }
        else if (ReferenceEquals(h3, h2)) { u3 = u2; d3 = d2; }
        else h3.At(n, out u3, out d3);
        return v.Integrand(p, x, u1, u2, u3, d1, d2, d3);
    }

    // 10-point Gauss-Legendre on the panel and on its two halves; where they disagree by more than tol times the
    // panel's integral of |Y|, the halves are split again. The disagreement left at the accepted level is the
    // quadrature error (main region).
    private static void Refine(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double lnK, double a, double b, in PanelSum whole, int depth, ref InInSums sums, int region, double tol)
    {
        double m = 0.5 * (a + b);
        var left = Gauss(bg, v, h1, h2, h3, lnK, a, m);
        var right = Gauss(bg, v, h1, h2, h3, lnK, m, b);
        sums.Panels += 2;
        double diff = (whole.S - left.S - right.S).Magnitude;
        if (diff <= tol * (left.Abs + right.Abs) || depth >= MaxDepth)
        {
            sums.Add(region, left.S + right.S);
            if (region == 1) sums.QuadratureError += diff;
            return;
        }
        Refine(bg, v, h1, h2, h3, lnK, a, m, left, depth + 1, ref sums, region, tol);
        Refine(bg, v, h1, h2, h3, lnK, m, b, right, depth + 1, ref sums, region, tol);
    }

    private static PanelSum Gauss(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3, double lnK, double a, double b)
    {
        double mid = 0.5 * (a + b), half = 0.5 * (b - a);
        var nodes = Nodes;
        var weights = Weights;
        var r = new PanelSum();
        for (int i = 0; i < nodes.Length; i++)
        {
            for (int s = -1; s <= 1; s += 2)
            {
                var y = half * weights[i] * At(bg, v, h1, h2, h3, lnK, mid + s * half * nodes[i], out _);
                r.S += y;
                r.Abs += y.Magnitude;
            }
        }
        return r;
    }

    /// <summary>One panel's integral and its integral of |Y|.</summary>
    private struct PanelSum
    {
        public Complex S;
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

/// <summary>Accumulated integrals of one triangle by region (0 deep, 1 main, 2 tail after the early end) and the ends.</summary>
internal struct InInSums
{
    /// <summary>Integral of Y over each region.</summary>
    public Complex R0, R1, R2;
    /// <summary>The early-time limit at the start and at twice the start depth.</summary>
    public Complex TailStart, TailDeep;
    /// <summary>Size of the last term of the early-time limit at the start.</summary>
    public double TailTerm;
    /// <summary>u1 u2 u3, the denominator D and e2 at the end and the early end.</summary>
    public Complex UEnd, UEarly;
    /// <inheritdoc cref="UEnd"/>
    public double DEnd, DEarly, E2End, E2Early;
    /// <summary>The zeta zeta' part of the field redefinition at the end and the early end.</summary>
    public double REnd, REarly;
    /// <summary>10-point Gauss-Legendre panels evaluated (wholes and halves).</summary>
    public int Panels;
    /// <summary>Sum of the quadrature disagreements left in the main region.</summary>
    public double QuadratureError;

    /// <summary>Adds a panel's integral (or a jump's point contribution) to <paramref name="region"/>.</summary>
    public void Add(int region, Complex s)
    {
        if (region == 0) R0 += s;
        else if (region == 1) R1 += s;
        else R2 += s;
    }

    /// <summary>An error of the integral as an error of f_NL at the end: (5/6) 2 |U| error / D.</summary>
    public readonly double AsFNL(double integralError) => 5.0 / 6.0 * 2.0 * UEnd.Magnitude * integralError / DEnd;

    /// <summary>f_NL = (5/6) S / D, S = -2 Im[U Integral] + (e2/2) D + R, started at the start or twice as deep, ended at the end or the early end.</summary>
    public readonly double FNL(bool deep, bool early)
    {
        Complex integral = (deep ? TailDeep + R0 : TailStart) + R1 + (early ? 0 : R2);
        Complex u = early ? UEarly : UEnd;
        double den = early ? DEarly : DEnd, e2 = early ? E2Early : E2End;
        double s = -2.0 * (u * integral).Imaginary + 0.5 * e2 * den + (early ? REarly : REnd);
        return 5.0 / 6.0 * s / den;
    }
}
