using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Where a mode starts, and how tight its steps are for that depth. The start is where k/aH = the requested depth,
/// deeper while the estimated truncation of the local-index data exceeds the tolerance (a background that changes
/// quickly there), before any fast feature or non-smooth point the mode would otherwise start after while still inside
/// the horizon (local vacuum data after it would miss the excitation it left), and deep enough for the background's
/// oscillations (StartPolicy.Resonance.cs). Reads the background and the mode systems' local indices through the
/// <see cref="ModeContext"/>; a reusable workspace.
/// </summary>
internal sealed partial class StartPolicy
{
    private readonly ModeContext _ctx;

    /// <summary>A policy for the modes of <paramref name="ctx"/>.</summary>
    public StartPolicy(ModeContext ctx) => _ctx = ctx;

    /// <summary>True when the oscillatory-regime propagator carries the deep part of a mode (the steps need no tightening then).</summary>
    public bool OscillatoryRegime { get; set; }

    private Background.IBackground Bg => _ctx.Background;
    private double LnK => _ctx.LnK;

    /// <summary>E-folds by which a mode starts before the first cell of a fast feature (beyond the +-0.05 stencil of the drift estimate).</summary>
    internal const double FeatureMargin = 0.06;

    /// <summary>Modes deeper than this inside the horizon at a non-smooth point are not started before it (cost grows with the depth).</summary>
    internal const double MaxKinkDepth = 500;

    /// <summary>
    /// Where the mode starts (see the class summary); <paramref name="depth"/> becomes k/aH there.
    /// Throws <see cref="PhysicsException"/> when the background starts too late.
    /// </summary>
    public double StartTime(ref double depth, double tol, InitialDataKind kind, FrictionScan? scan = null)
    {
        _oscScan = scan ?? FrictionScan.FromStart(Bg);
        double nA = Bg.NStart;
        double lnDepthA = LnDepth(nA);
        if (lnDepthA < Math.Log(depth))
        {
            double kMin = depth * Math.Exp(nA) * Bg.At(nA).H;
            throw new PhysicsException($"mode k = {Math.Exp(LnK):G6} cannot start at k/aH = {depth:G3}: the background starts (N = {nA:G6}) with k/aH = {Math.Exp(lnDepthA):G4}; the smallest k allowed is {kMin:G6} (start the field further up the potential or choose a larger k)");
        }
        double n = DepthTime(depth, nA);
        for (int it = 0; it < 8 && InitialDataError(n, depth, kind) > tol; it++)
        {
            double deeper = depth * 1.5;
            if (lnDepthA < Math.Log(deeper)) break;
            depth = deeper;
            n = DepthTime(depth, nA);
        }
        // A fast but smooth feature (a step in V) before this start, while the mode was still inside the horizon,
        // leaves an excitation that local data at the start cannot know about: start before the earliest such
        // feature (where the drift estimate |d nu/dN| / (k/aH)^3 exceeds the tolerance), then deepen as above.
        if (kind == InitialDataKind.LocalIndexHankel)
        {
            double nLimit = DepthTime(MaxKinkDepth, nA);
            double tBad = FirstDriftBefore(nLimit, n, tol, scan);
            // The same for a fast feature whose missed excitation (FeatureExcitationBefore: first order, no credit for
            // the oscillation) would exceed the tolerance, where the drift estimate credits the oscillation too much.
            double lnKUnit = LnK - 0.5 * Math.Log(Bg.VScale);
            if (scan is not null && scan.NFrom <= nLimit && scan.FeatureExcitationBefore(n, lnKUnit) > tol)
            {
                double tFast = scan.FirstFastCell(nLimit, n);
                if (!double.IsNaN(tFast) && (double.IsNaN(tBad) || tFast < tBad)) tBad = tFast;
            }
            if (!double.IsNaN(tBad))
            {
                n = Math.Max(nA, tBad - FeatureMargin);
                depth = Math.Exp(LnDepth(n));
                for (int it = 0; it < 8 && InitialDataError(n, depth, kind) > tol; it++)
                {
                    double deeper = depth * 1.5;
                    if (lnDepthA < Math.Log(deeper)) break;
                    depth = deeper;
                    n = DepthTime(depth, nA);
                }
            }
        }
        ResonantStart(ref n, ref depth, nA, lnDepthA, tol, kind);
        var ns = Bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
        {
            double t = ns[i];
            double xt = Math.Exp(LnDepth(t));
            if (t > nA && t < n + 0.025 && xt <= MaxKinkDepth)
            {
                double margin = 0.025 / Math.Max(1.0, xt);
                if (t - margin > nA + margin)
                {
                    n = t - margin;
                    depth = Math.Exp(LnDepth(n));
                }
                break;
            }
        }
        // Keep the finite-difference stencil of the initial data (+-0.02/x) inside the background and off non-smooth points.
        double m = 0.025 / Math.Max(1.0, depth);
        n = Math.Max(n, nA + m);
        for (int i = 0; i < ns.Count; i++)
            if (Math.Abs(ns[i] - n) < m) n = ns[i] - m > nA + m ? ns[i] - m : ns[i] + m;
        depth = Math.Exp(LnDepth(n));
        return Math.Min(n, Bg.NEnd);
    }

    /// <summary>
    /// Truncation of the initial data. The local-index Hankel data are exact for constant nu (power law); their error
    /// follows the drift of the index and falls like the cube of the start depth: about 0.2 |d nu/dN| / x^3 measured
    /// on the quadratic model (x = 4..23); reported with a factor 5 margin. The quasi-de Sitter data leave
    /// about 1.5 |nu - 3/2| / x^2 in P (the x^-2 term of the Hankel asymptotic series, Abramowitz &amp; Stegun 9.2.7,
    /// (4 nu^2 - 1)(4 nu^2 - 9)/(128 x^2), against nu = 3/2), reported as 2 |nu - 3/2| / x^2.
    /// </summary>
    public double InitialDataError(double n0, double xs, InitialDataKind kind)
    {
        // Difference quotient of nu over +-h, one-sided where a non-smooth point or an end of the background is near.
        double h = 0.05;
        double lo = Math.Max(Bg.NStart, n0 - h), hi = Math.Min(Bg.NEnd, n0 + h);
        var ns = Bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
        {
            if (ns[i] > n0 && ns[i] < hi) hi = n0;
            if (ns[i] <= n0 && ns[i] > lo) lo = n0;
        }
        if (!(hi > lo)) return 0.0;
        double dNu = 0, dev = 0;
        for (int s = 0; s < _ctx.SystemCount; s++)
        {
            var sys = _ctx.System(s);
            dNu = Math.Max(dNu, Math.Abs(sys.LocalIndex(Bg.At(hi)) - sys.LocalIndex(Bg.At(lo))) / (hi - lo));
            dev = Math.Max(dev, Math.Abs(sys.LocalIndex(Bg.At(n0)) - 1.5));
        }
        dNu = Math.Max(dNu, OscillatingDrift(n0));
        return kind == InitialDataKind.LocalIndexHankel ? dNu / (xs * xs * xs) : 2.0 * dev / (xs * xs) + dNu / (xs * xs * xs);
    }

    /// <summary>
    /// The earliest N in [<paramref name="nFrom"/>, <paramref name="nTo"/>) where |d nu/dN| / (k/aH)^3 exceeds
    /// <paramref name="tol"/> (NaN when nowhere), for the scalar and tensor indices: from the shared scan's table, or
    /// sampled every 0.01 e-folds without one.
    /// </summary>
    private double FirstDriftBefore(double nFrom, double nTo, double tol, FrictionScan? scan)
    {
        if (!(nTo > nFrom)) return double.NaN;
        if (scan is not null && scan.NFrom <= nFrom) return scan.FirstDriftAbove(nFrom, nTo, LnK - 0.5 * Math.Log(Bg.VScale), Math.Log(tol));
        const double h = 0.01;
        int cells = (int)Math.Ceiling((nTo - nFrom) / h);
        double prevS = 0, prevT = 0, prevLnAH = 0;
        for (int i = 0; i <= cells; i++)
        {
            double n = Math.Min(nTo, nFrom + i * h);
            var p = Bg.At(n);
            double s = CurvatureModeSystem.IndexOf(p.Epsilon1, p.Epsilon2, p.Epsilon3), t = TensorModeSystem.IndexOf(p.Epsilon1);
            double lnAH = n + Math.Log(p.H);
            if (i > 0)
            {
                double a = n - h;
                bool kink = false;
                var ks = Bg.NonSmoothTimes;
                for (int j = 0; j < ks.Count; j++)
                    if (ks[j] >= a - 1e-12 && ks[j] <= n + 1e-12) kink = true;
                double d = Math.Max(Math.Abs(s - prevS), Math.Abs(t - prevT)) / h;
                double lnX = LnK - Math.Max(lnAH, prevLnAH);
                if (!kink && d > 0 && Math.Log(d) - 3.0 * lnX > Math.Log(tol)) return a;
            }
            prevS = s; prevT = t; prevLnAH = lnAH;
        }
        return double.NaN;
    }

    /// <summary>The first N after <paramref name="nFrom"/> where k/aH = <paramref name="depth"/> (NEnd when never).</summary>
    public double DepthTime(double depth, double nFrom)
    {
        double lnTarget = Math.Log(depth);
        double nA = nFrom, nB = Bg.NEnd;
        double fA = LnDepth(nA) - lnTarget;
        if (fA <= 0) return nA;
        if (LnDepth(nB) - lnTarget > 0) return nB;
        // Newton on ln(k/aH) with d/dN = -(1 - e1), safeguarded by the bracket.
        double n = nA + fA / Math.Max(0.05, 1.0 - Bg.At(nA).Epsilon1);
        for (int it = 0; it < 100; it++)
        {
            if (!(n > nA && n < nB)) n = 0.5 * (nA + nB);
            var p = Bg.At(n);
            double f = LnK - n - Math.Log(p.H) - lnTarget;
            if (f > 0) nA = n; else nB = n;
            double step = f / Math.Max(0.05, 1.0 - p.Epsilon1);
            n += step;
            if (Math.Abs(step) < 1e-13 * Math.Max(1.0, Math.Abs(n)) || nB - nA < 1e-13 * Math.Max(1.0, Math.Abs(n))) break;
        }
        return Math.Clamp(n, nFrom, Bg.NEnd);
    }

    /// <summary>ln(k/aH) at <paramref name="n"/>.</summary>
    public double LnDepth(double n) => LnK - n - Math.Log(Bg.At(n).H);
}
