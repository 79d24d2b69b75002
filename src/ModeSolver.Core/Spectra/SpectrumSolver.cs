using ModeSolver.Background;
using ModeSolver.Perturbations;
using ModeSolver.Physics;

namespace ModeSolver.Spectra;

/// <summary>
/// Exact scalar and tensor spectra across k: log-spaced samples (plus any extra k), one mode integration per k in
/// parallel, adaptive refinement where the cubic Hermite interpolation of ln P is not within the tolerance, and an
/// error estimate per k checked by re-running a few samples at a tighter tolerance. Each k is independent, so the
/// result is bit-identical for any number of threads.
/// </summary>
public static class SpectrumSolver
{
    /// <summary>Computes the spectrum; throws <see cref="PhysicsException"/> when the background cannot serve the k range.</summary>
    public static PrimordialSpectrum Compute(IBackground background, SpectrumSettings settings)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        var modeSettings = settings.ModeSettings();
        CheckRange(background, settings, modeSettings);
        var scan = FrictionScan.FromStart(background);

        var ks = new List<double>();
        int n0 = settings.KCount;
        double lnMin = Math.Log(settings.KMin), lnMax = Math.Log(settings.KMax);
        for (int i = 0; i < n0; i++)
            ks.Add(n0 == 1 ? settings.KMin : Math.Exp(lnMin + (lnMax - lnMin) * i / (n0 - 1)));
        ks[0] = settings.KMin;
        if (n0 > 1) ks[^1] = settings.KMax;
        ks.AddRange(settings.ExtraK);
        var samples = SolveAll(background, Unique(ks), modeSettings, scan, settings.DegreeOfParallelism);

        if (settings.Refine)
        {
            while (samples.Count < settings.MaxPoints)
            {
                var mids = new List<double>();
                for (int i = 0; i + 1 < samples.Count && samples.Count + mids.Count < settings.MaxPoints; i++)
                    if (InterpolationError(samples[i], samples[i + 1]) > settings.Tolerance)
                        mids.Add(Math.Sqrt(samples[i].K * samples[i + 1].K));
                if (mids.Count == 0) break;
                var added = SolveAll(background, mids.ToArray(), modeSettings, scan, settings.DegreeOfParallelism);
                samples.AddRange(added);
                samples.Sort((a, b) => a.K.CompareTo(b.K));
            }
        }

        // Error checks, re-run 10x tighter (deeper start, smaller steps): spread samples, every extra k, and every mode
        // whose a-priori estimate is not to be trusted on its own: started deeper than the default depth (a fast
        // feature or a quickly changing index), or estimated above the mode tolerance (zeta largely cancels after exit).
        var checkIdx = new SortedSet<int>();
        int m = samples.Count;
        for (int c = 0; c < settings.ErrorChecks && m > 0; c++)
            checkIdx.Add(settings.ErrorChecks == 1 ? m / 2 : (int)Math.Round((double)c * (m - 1) / (settings.ErrorChecks - 1)));
        foreach (double ek in settings.ExtraK)
            checkIdx.Add(Nearest(samples, ek));
        var ownCheck = new bool[m];
        for (int i = 0; i < m; i++)
        {
            var s0 = samples[i];
            ownCheck[i] = s0.StartDepth > 1.01 * modeSettings.EffectiveStartDepth || s0.ErrorEstimate > modeSettings.Tolerance;
            if (ownCheck[i]) checkIdx.Add(i);
        }
        var checkList = checkIdx.ToArray();
        var checkK = checkList.Select(i => samples[i].K).ToArray();
        var tight = SolveAll(background, checkK, settings.ModeSettings(0.1), scan, settings.DegreeOfParallelism);
        var checkDev = new double[checkK.Length];
        var ownDev = new double[m];
        Array.Fill(ownDev, double.NaN);
        for (int c = 0; c < checkK.Length; c++)
        {
            var a = samples[checkList[c]];
            checkDev[c] = Math.Max(RelDiff(a.Ps, tight[c].Ps), RelDiff(a.Pt, tight[c].Pt));
            ownDev[checkList[c]] = checkDev[c];
        }
        // The spread checks alone stand for the samples without a check of their own.
        var spread = new List<int>();
        for (int c = 0; c < checkList.Length; c++)
            if (!ownCheck[checkList[c]]) spread.Add(c);
        var spreadK = spread.Select(c => checkK[c]).ToArray();
        var spreadDev = spread.Select(c => checkDev[c]).ToArray();

        return Assemble(samples, ownDev, spreadK, spreadDev, checkK, checkDev, settings.Tolerance);
    }

    /// <summary>The k range (background units) the background can serve with these settings: (smallest, largest).</summary>
    public static (double KMin, double KMax) ServedRange(IBackground background, SpectrumSettings settings)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        var ms = settings.ModeSettings();
        double kMin = ms.EffectiveStartDepth * Math.Exp(background.NStart) * background.At(background.NStart).H;
        double kMax = ms.EffectiveStopDepth * Math.Exp(background.NEnd) * background.At(background.NEnd).H;
        return (kMin, kMax);
    }

    private static void CheckRange(IBackground background, SpectrumSettings settings, ModeSettings ms)
    {
        var (kMin, kMax) = ServedRange(background, settings);
        if (settings.KMin < kMin * (1 + 1e-12))
            throw new PhysicsException($"k = {settings.KMin:G6} cannot start at k/aH = {ms.EffectiveStartDepth:G3} after the background's start; the background serves k in [{kMin:G6}, {kMax:G6}] (background units); choose a larger KMin or start the field further up the potential");
        if (settings.KMax > kMax)
            throw new PhysicsException($"k = {settings.KMax:G6} has not left the horizon to k/aH <= {ms.EffectiveStopDepth:G3} by the end of inflation; the background serves k in [{kMin:G6}, {kMax:G6}] (background units); lower kMax");
    }

    private static double RelDiff(double a, double b) => double.IsNaN(a) || double.IsNaN(b) ? 0.0 : Math.Abs(a / b - 1.0);

    private static int Nearest(List<ModeResult> samples, double k)
    {
        int best = 0;
        for (int i = 1; i < samples.Count; i++)
            if (Math.Abs(Math.Log(samples[i].K / k)) < Math.Abs(Math.Log(samples[best].K / k))) best = i;
        return best;
    }

    private static double[] Unique(List<double> ks)
    {
        ks.Sort();
        var u = new List<double>(ks.Count);
        foreach (double k in ks)
            if (u.Count == 0 || k > u[^1] * (1 + 1e-12)) u.Add(k);
        return u.ToArray();
    }

    /// <summary>
    /// Error of the cubic Hermite interpolation of ln P at the interval's midpoint, estimated as its difference from
    /// the quintic Hermite that also uses the exact second derivatives: |h (d0 - d1)/32 + h^2 (s0 + s1)/64|.
    /// </summary>
    internal static double InterpolationError(ModeResult a, ModeResult b)
    {
        double h = Math.Log(b.K / a.K);
        double e = 0;
        if (!double.IsNaN(a.Ps))
            e = Math.Max(e, Math.Abs(h * (a.NsMinusOne - b.NsMinusOne) / 32 + h * h * (a.AlphaS + b.AlphaS) / 64));
        if (!double.IsNaN(a.Pt))
            e = Math.Max(e, Math.Abs(h * (a.Nt - b.Nt) / 32 + h * h * (a.AlphaT + b.AlphaT) / 64));
        return double.IsNaN(e) ? double.PositiveInfinity : e;
    }

    private static List<ModeResult> SolveAll(IBackground background, double[] ks, ModeSettings ms, FrictionScan scan, int dop)
        => new(ParallelModes.Solve(ks, dop, () => new ModeIntegrator(), (integrator, k) => integrator.Solve(background, k, ms, scan)));

    private static PrimordialSpectrum Assemble(List<ModeResult> s, double[] ownDev, double[] spreadK, double[] spreadDev,
        double[] checkK, double[] checkDev, double tol)
    {
        int n = s.Count;
        var k = new double[n]; var ps = new double[n]; var pt = new double[n]; var r = new double[n];
        var ns = new double[n]; var nt = new double[n]; var al = new double[n]; var at = new double[n];
        var err = new double[n]; var rhs = new int[n]; var frozen = new bool[n]; var bounded = new bool[n];
        double maxErr = 0, sumRhs = 0;
        int maxRhs = 0;
        for (int i = 0; i < n; i++)
        {
            var m = s[i];
            k[i] = m.K; ps[i] = m.Ps; pt[i] = m.Pt; r[i] = m.Pt / m.Ps; ns[i] = m.Ns; nt[i] = m.Nt;
            al[i] = m.AlphaS; at[i] = m.AlphaT; rhs[i] = m.RhsEvaluations; frozen[i] = m.FrozenBeforeEnd;
            // The per-mode estimate, but never below twice the deviation measured at its own check, or, without one,
            // at the nearest spread check.
            double measured = 0;
            if (!double.IsNaN(ownDev[i])) measured = 2.0 * ownDev[i];
            else if (spreadK.Length > 0)
            {
                int c = 0;
                for (int j = 1; j < spreadK.Length; j++)
                    if (Math.Abs(Math.Log(spreadK[j] / m.K)) < Math.Abs(Math.Log(spreadK[c] / m.K))) c = j;
                measured = 2.0 * spreadDev[c];
            }
            err[i] = Math.Max(m.ErrorEstimate, measured);
            bounded[i] = !m.StartedInFeature;
            maxErr = Math.Max(maxErr, err[i]);
            sumRhs += m.RhsEvaluations;
            maxRhs = Math.Max(maxRhs, m.RhsEvaluations);
        }
        return new PrimordialSpectrum
        {
            K = k, Ps = ps, Pt = pt, R = r, Ns = ns, Nt = nt, AlphaS = al, AlphaT = at, ErrorEstimate = err,
            RhsEvaluations = rhs, FrozenBeforeEnd = frozen, ErrorBounded = bounded, CheckK = checkK, CheckDeviation = checkDev,
            MaxRelativeError = maxErr, MeanRhsEvaluationsPerMode = n > 0 ? sumRhs / n : 0, MaxRhsEvaluationsPerMode = maxRhs,
            Tolerance = tol,
        };
    }
}
