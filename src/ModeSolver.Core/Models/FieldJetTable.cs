namespace ModeSolver.Models;

/// <summary>
/// A checked interpolation table of the Einstein-frame V and K jets (value and three derivatives) of a theory whose
/// exact evaluation is expensive (the double-double Jordan-frame map of a plateau flatter than double precision).
/// The table runs in u = ln|phi| on a fixed grid of step <see cref="Step"/> (one grid per sign of phi, for
/// |phi| in [e^<see cref="UMin"/>, e^<see cref="UMax"/>]); an interval is built on first use from the exact jets at
/// its two ends: a quintic Hermite interpolant of f (data f, f_u, f_uu) for the value and one of f_u (data f_u, f_uu,
/// f_uuu) for the derivatives, so that the slope never comes from differences of the plateau's value. Each interval is
/// verified when built against the exact jets at its quarter points and midpoint (value to
/// <see cref="ValueTolerance"/>, f_u to <see cref="SlopeTolerance"/>, f_uu to <see cref="CurvatureTolerance"/>, f_uuu to
/// <see cref="ThirdTolerance"/>, each relative to the largest of the lower u-derivatives on the interval); where the
/// check fails, at phi = 0, outside the grid and for non-finite data, the exact evaluation answers instead, so the
/// results never silently degrade. Every interval is a pure function of its index: the table gives the same numbers
/// whatever the order in which threads fill it. Thread-safe; allocation-free once an interval is built.
/// </summary>
internal sealed class FieldJetTable
{
    /// <summary>Grid step in u = ln|phi| (1/128: the checks pass with margin for power-law-like variation up to |phi|^±6 per interval).</summary>
    public const double Step = 1.0 / 128;

    /// <summary>Lower end of the grid in u = ln|phi| (|phi| = 1.4e-21).</summary>
    public const double UMin = -48;

    /// <summary>Upper end of the grid in u = ln|phi| (|phi| = 8.9e6).</summary>
    public const double UMax = 16;

    /// <summary>Relative accuracy of the value required by the build check.</summary>
    public const double ValueTolerance = 1e-13;

    /// <summary>Accuracy of f_u = phi f_phi relative to the largest |f_u| on the interval.</summary>
    public const double SlopeTolerance = 1e-12;

    /// <summary>Accuracy of f_uu relative to the largest |f_u|, |f_uu| on the interval.</summary>
    public const double CurvatureTolerance = 1e-10;

    /// <summary>Accuracy of f_uuu relative to the largest |f_u|, |f_uu|, |f_uuu| on the interval.</summary>
    public const double ThirdTolerance = 1e-8;

    private const int Count = (int)((UMax - UMin) / Step);
    private const double InvStep = 1.0 / Step;

    private readonly Func<double, JetPair> _exact;
    private readonly Interval?[] _positive = new Interval?[Count];
    private readonly Interval?[] _negative = new Interval?[Count];
    private readonly Node?[] _positiveNodes = new Node?[Count + 1];
    private readonly Node?[] _negativeNodes = new Node?[Count + 1];

    /// <summary>A table over <paramref name="exact"/>, the exact V and K jets at phi (thread-safe, deterministic).</summary>
    public FieldJetTable(Func<double, JetPair> exact)
    {
        ArgumentNullException.ThrowIfNull(exact);
        _exact = exact;
    }

    // The lookups are compiled optimised at first call: a command-line run is over before tiered compilation would
    // replace their unoptimised first versions.
    private const System.Runtime.CompilerServices.MethodImplOptions Hot = System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization;

    /// <summary>The jets at phi: from the table where an interval passed its check, else the exact evaluation.</summary>
    [System.Runtime.CompilerServices.MethodImpl(Hot)]
    public JetPair Evaluate(double phi) => TryInterpolate(phi, out var jets) ? jets : _exact(phi);

    /// <summary>The exact jets (the table's source).</summary>
    public JetPair Exact(double phi) => _exact(phi);

    /// <summary>True with the interpolated jets when phi lies in an interval that passed its check (building it if needed).</summary>
    [System.Runtime.CompilerServices.MethodImpl(Hot)]
    public bool TryInterpolate(double phi, out JetPair jets)
    {
        jets = default;
        bool positive = phi > 0;
        if (!positive && !(phi < 0)) return false; // 0 or NaN
        double s = (Math.Log(Math.Abs(phi)) - UMin) * InvStep;
        if (!(s >= 0) || !(s < Count)) return false;
        int i = (int)s;
        var slots = positive ? _positive : _negative;
        var iv = Volatile.Read(ref slots[i]) ?? Publish(slots, i, positive);
        if (!iv.Passed) return false;
        double t = s - i;
        jets = new JetPair(iv.Potential.At(t, phi), iv.Kinetic.At(t, phi));
        return true;
    }

    /// <summary>Number of intervals built so far and how many of them failed their check (for tests and diagnostics).</summary>
    public (int Built, int Failed) Statistics()
    {
        int built = 0, failed = 0;
        foreach (var slots in new[] { _positive, _negative })
            foreach (var iv in slots)
                if (iv is not null) { built++; if (!iv.Passed) failed++; }
        return (built, failed);
    }

    private Interval Publish(Interval?[] slots, int i, bool positive)
    {
        var built = Build(i, positive);
        return Interlocked.CompareExchange(ref slots[i], built, null) ?? built;
    }

    private static double NodeU(int i) => UMin + i * Step;

    private Node NodeAt(int i, bool positive)
    {
        var nodes = positive ? _positiveNodes : _negativeNodes;
        if (Volatile.Read(ref nodes[i]) is { } n) return n;
        double phi = (positive ? 1 : -1) * Math.Exp(NodeU(i));
        var made = new Node(_exact(phi), phi);
        return Interlocked.CompareExchange(ref nodes[i], made, null) ?? made;
    }

    private Interval Build(int i, bool positive)
    {
        var a = NodeAt(i, positive);
        var b = NodeAt(i + 1, positive);
        if (!a.Finite || !b.Finite) return Interval.Failed;
        var v = new Piece(a.V, b.V);
        var k = new Piece(a.K, b.K);
        var iv = new Interval(v, k, true);
        // Scales: the largest u-derivatives at the ends and check points.
        Span<double> t = [0.25, 0.5, 0.75];
        Span<double> sv = stackalloc double[4], sk = stackalloc double[4];
        for (int j = 0; j < 4; j++) { sv[j] = Math.Max(Math.Abs(a.V[j]), Math.Abs(b.V[j])); sk[j] = Math.Max(Math.Abs(a.K[j]), Math.Abs(b.K[j])); }
        Span<double> exactV = stackalloc double[4], exactK = stackalloc double[4];
        Span<double> ev = stackalloc double[12], ek = stackalloc double[12];
        for (int c = 0; c < t.Length; c++)
        {
            double phi = (positive ? 1 : -1) * Math.Exp(NodeU(i) + t[c] * Step);
            // The check point in the table's own coordinate (phi is rounded; its u differs from the node grid by ulps).
            double tc = (Math.Log(Math.Abs(phi)) - UMin) * InvStep - i;
            var e = _exact(phi);
            Node.ToU(e.Potential, phi, exactV);
            Node.ToU(e.Kinetic, phi, exactK);
            if (!AllFinite(exactV) || !AllFinite(exactK)) return Interval.Failed;
            v.UDerivatives(tc, ev.Slice(4 * c, 4));
            k.UDerivatives(tc, ek.Slice(4 * c, 4));
            for (int j = 0; j < 4; j++)
            {
                sv[j] = Math.Max(sv[j], Math.Abs(exactV[j]));
                sk[j] = Math.Max(sk[j], Math.Abs(exactK[j]));
                ev[4 * c + j] -= exactV[j];
                ek[4 * c + j] -= exactK[j];
            }
        }
        for (int c = 0; c < t.Length; c++)
            if (!Within(ev.Slice(4 * c, 4), sv) || !Within(ek.Slice(4 * c, 4), sk)) return Interval.Failed;
        return iv;
    }

    private static bool AllFinite(ReadOnlySpan<double> x)
    {
        foreach (double d in x) if (!double.IsFinite(d)) return false;
        return true;
    }

    /// <summary>The differences (table - exact) of f, f_u, f_uu, f_uuu against the tolerances on the scales.</summary>
    private static bool Within(ReadOnlySpan<double> diff, ReadOnlySpan<double> scale)
    {
        double s1 = scale[1], s2 = Math.Max(s1, scale[2]), s3 = Math.Max(s2, scale[3]);
        return Math.Abs(diff[0]) <= ValueTolerance * scale[0]
               && Math.Abs(diff[1]) <= SlopeTolerance * s1
               && Math.Abs(diff[2]) <= CurvatureTolerance * s2
               && Math.Abs(diff[3]) <= ThirdTolerance * s3;
    }

    /// <summary>Exact jets at a grid node, as u-derivatives f, f_u, f_uu, f_uuu of V and K.</summary>
    private sealed class Node
    {
        public readonly double[] V = new double[4];
        public readonly double[] K = new double[4];
        public readonly bool Finite;

        public Node(JetPair jets, double phi)
        {
            ToU(jets.Potential, phi, V);
            ToU(jets.Kinetic, phi, K);
            Finite = AllFinite(V) && AllFinite(K);
        }

        /// <summary>d/du = phi d/dphi: f_u = phi f', f_uu = phi f' + phi^2 f'', f_uuu = phi f' + 3 phi^2 f'' + phi^3 f'''.</summary>
        public static void ToU(Jet3 f, double phi, Span<double> u)
        {
            double p1 = phi * f.D1, p2 = phi * phi * f.D2, p3 = phi * phi * phi * f.D3;
            u[0] = f.Value;
            u[1] = p1;
            u[2] = p1 + p2;
            u[3] = p1 + 3 * p2 + p3;
        }
    }

    /// <summary>One function on one interval: quintic Hermite polynomials in t in [0, 1] for f and for f_u.</summary>
    private sealed class Piece
    {
        // f(t) = sum F[n] t^n; f_u(t) = sum G[n] t^n (u = u_i + t Step).
        private readonly double[] _f = new double[6];
        private readonly double[] _g = new double[6];

        public Piece(double[] a, double[] b)
        {
            const double h = Step;
            Quintic(a[0], h * a[1], h * h * a[2], b[0], h * b[1], h * h * b[2], _f);
            Quintic(a[1], h * a[2], h * h * a[3], b[1], h * b[2], h * h * b[3], _g);
        }

        /// <summary>Coefficients of the quintic with p, p', p'' given at t = 0 and t = 1.</summary>
        private static void Quintic(double y0, double d0, double s0, double y1, double d1, double s1, double[] c)
        {
            c[0] = y0;
            c[1] = d0;
            c[2] = 0.5 * s0;
            double a = y1 - c[0] - c[1] - c[2], b = d1 - c[1] - 2 * c[2], g = s1 - 2 * c[2];
            c[3] = 10 * a - 4 * b + 0.5 * g;
            c[4] = -15 * a + 7 * b - g;
            c[5] = 6 * a - 3 * b + 0.5 * g;
        }

        /// <summary>f, f_u, f_uu, f_uuu at t.</summary>
        public void UDerivatives(double t, Span<double> u)
        {
            var f = _f;
            u[0] = f[0] + t * (f[1] + t * (f[2] + t * (f[3] + t * (f[4] + t * f[5]))));
            var g = _g;
            double g0 = g[0] + t * (g[1] + t * (g[2] + t * (g[3] + t * (g[4] + t * g[5]))));
            double g1 = g[1] + t * (2 * g[2] + t * (3 * g[3] + t * (4 * g[4] + t * 5 * g[5])));
            double g2 = 2 * g[2] + t * (6 * g[3] + t * (12 * g[4] + t * 20 * g[5]));
            u[1] = g0;
            u[2] = g1 * InvStep;
            u[3] = g2 * (InvStep * InvStep);
        }

        /// <summary>The jet in phi at t (phi the field value there): f' = f_u/phi, f'' = (f_uu - f_u)/phi^2, f''' = (f_uuu - 3 f_uu + 2 f_u)/phi^3.</summary>
        [System.Runtime.CompilerServices.MethodImpl(Hot)]
        public Jet3 At(double t, double phi)
        {
            var f = _f;
            var g = _g;
            double u0 = f[0] + t * (f[1] + t * (f[2] + t * (f[3] + t * (f[4] + t * f[5]))));
            double u1 = g[0] + t * (g[1] + t * (g[2] + t * (g[3] + t * (g[4] + t * g[5]))));
            double u2 = (g[1] + t * (2 * g[2] + t * (3 * g[3] + t * (4 * g[4] + t * 5 * g[5])))) * InvStep;
            double u3 = (2 * g[2] + t * (6 * g[3] + t * (12 * g[4] + t * 20 * g[5]))) * (InvStep * InvStep);
            double r = 1 / phi;
            return new Jet3(u0, u1 * r, (u2 - u1) * r * r, (u3 - 3 * u2 + 2 * u1) * r * r * r);
        }
    }

    /// <summary>V and K on one interval, or the mark of a failed check.</summary>
    private sealed class Interval
    {
        public static readonly Interval Failed = new(null!, null!, false);
        public readonly Piece Potential;
        public readonly Piece Kinetic;
        public readonly bool Passed;

        public Interval(Piece potential, Piece kinetic, bool passed)
        {
            Potential = potential;
            Kinetic = kinetic;
            Passed = passed;
        }
    }
}
