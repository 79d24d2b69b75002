using System.Collections.Immutable;
using System.Globalization;
using ModeSolver.Estimates;
using ModeSolver.Results;

namespace ModeSolver.Diagnostics;

/// <summary>
/// Slow-roll disagreement flags: pure functions over arrays and scalars. A range's ends are where the measure crosses
/// the limit, found by linear interpolation between the samples on either side (in ln k for spectra, in N for the
/// background); a range that reaches the end of the data ends at the last sample.
/// </summary>
public static class Flags
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>All flags of a run, in the order pivot, spectrum (P_s then P_t), background.</summary>
    public static ImmutableArray<Flag> Evaluate(
        PivotResults pivot, PivotSlowRoll pivotSlowRoll, SpectrumSamples spectrum, SlowRollSpectra slowRollSpectra,
        BackgroundSamples background, FlagSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        var all = ImmutableArray.CreateBuilder<Flag>();

        var (reference, refName) = settings.Reference switch
        {
            SlowRollReference.FirstOrder => (pivotSlowRoll.FirstOrder, "first-order slow roll"),
            SlowRollReference.Potential => (pivotSlowRoll.Potential, "potential slow roll"),
            _ => (pivotSlowRoll.SecondOrder, "second-order slow roll"),
        };
        all.AddRange(PivotDeviations(pivot, reference, refName, settings));

        bool first = settings.Reference == SlowRollReference.FirstOrder;
        var srPs = first ? slowRollSpectra.PsFirstOrder : slowRollSpectra.PsSecondOrder;
        var srPt = first ? slowRollSpectra.PtFirstOrder : slowRollSpectra.PtSecondOrder;
        all.AddRange(SpectrumDeviations(spectrum.K.AsSpan(), spectrum.Ps.AsSpan(), srPs.AsSpan(), "P_s", settings.SpectrumThreshold));
        all.AddRange(SpectrumDeviations(spectrum.K.AsSpan(), spectrum.Pt.AsSpan(), srPt.AsSpan(), "P_t", settings.SpectrumThreshold));

        all.AddRange(BackgroundPhases(background.N.AsSpan(), background.Epsilon1.AsSpan(), "epsilon_1", settings.Epsilon1Limit,
            background.WindowStart, background.WindowEnd));
        var absE2 = new double[background.Epsilon2.Length];
        for (int i = 0; i < absE2.Length; i++) absE2[i] = Math.Abs(background.Epsilon2[i]);
        all.AddRange(BackgroundPhases(background.N.AsSpan(), absE2, "|epsilon_2|", settings.Epsilon2Limit,
            background.WindowStart, background.WindowEnd));
        return all.ToImmutable();
    }

    /// <summary>
    /// k ranges where |exact/slowRoll - 1| exceeds <paramref name="threshold"/>, merged into contiguous ranges. A finite
    /// slow-roll value that is zero or negative (second-order slow roll with a large |epsilon_2|, e.g. in ultra-slow
    /// roll) is the worst disagreement of all and is flagged; samples with a non-finite value are never flagged.
    /// </summary>
    /// <param name="k">Wavenumbers in 1/Mpc, strictly increasing and positive.</param>
    /// <param name="exact">Exact power at each k.</param>
    /// <param name="slowRoll">Slow-roll power at each k.</param>
    /// <param name="quantity">Name used in the flag ("P_s" or "P_t").</param>
    /// <param name="threshold">Relative-difference limit, e.g. 0.01.</param>
    public static List<Flag> SpectrumDeviations(
        ReadOnlySpan<double> k, ReadOnlySpan<double> exact, ReadOnlySpan<double> slowRoll, string quantity, double threshold)
    {
        if (exact.Length != k.Length || slowRoll.Length != k.Length)
            throw new ArgumentException($"spectrum flags for {quantity}: k, exact and slow-roll arrays differ in length ({k.Length}, {exact.Length}, {slowRoll.Length})");
        if (!(threshold > 0) || !double.IsFinite(threshold))
            throw new ArgumentException($"spectrum flags for {quantity}: threshold must be a finite positive number");
        var lnK = new double[k.Length];
        for (int i = 0; i < k.Length; i++)
        {
            if (!(k[i] > 0) || !double.IsFinite(k[i]) || (i > 0 && !(k[i] > k[i - 1])))
                throw new ArgumentException($"spectrum flags for {quantity}: k must be finite, positive and strictly increasing (at index {i})");
            lnK[i] = Math.Log(k[i]);
        }
        var measure = new double[k.Length];
        for (int i = 0; i < k.Length; i++)
        {
            double d = exact[i] / slowRoll[i] - 1.0;
            measure[i] = !double.IsFinite(slowRoll[i]) || !double.IsFinite(exact[i]) ? double.NaN
                : !(slowRoll[i] > 0) ? double.PositiveInfinity
                : double.IsFinite(d) ? Math.Abs(d) : double.NaN;
        }

        var flags = new List<Flag>();
        foreach (var run in MergeAdjacent(Runs(lnK, measure, threshold), measure))
        {
            int w = run.WorstIndex;
            double lo = Math.Exp(run.Lower), hi = Math.Exp(run.Upper);
            double diff = exact[w] / slowRoll[w] - 1.0;
            string where = string.Create(Inv, $"k = {lo:0.000e+00} .. {hi:0.000e+00} /Mpc");
            string msg = slowRoll[w] > 0
                ? string.Create(Inv,
                    $"{quantity}: exact and slow roll differ by up to {diff * 100:+0.00;-0.00}% (limit {threshold * 100:0.###}%) for {where}, worst at k = {k[w]:0.000e+00} /Mpc{MergedNote(run)}")
                : string.Create(Inv,
                    $"{quantity}: slow roll fails for {where}: it gives {slowRoll[w]:0.000e+00} (not positive) at k = {k[w]:0.000e+00} /Mpc, where the exact value is {exact[w]:0.000e+00}{MergedNote(run)}");
            flags.Add(new Flag(FlagKinds.SpectrumDeviation, quantity, msg, where, lo, hi, exact[w], slowRoll[w], diff));
        }
        return flags;
    }

    /// <summary>
    /// Pivot quantities n_s, r, alpha_s, n_t whose exact-minus-slow-roll difference exceeds
    /// <see cref="FlagSettings.PivotFraction"/> times its sigma. A_s is not compared (the potential is normalised to it).
    /// Quantities where either value is not finite are skipped.
    /// </summary>
    public static List<Flag> PivotDeviations(PivotResults pivot, SlowRollPrediction slowRoll, string referenceName, FlagSettings settings)
    {
        ArgumentNullException.ThrowIfNull(pivot);
        ArgumentNullException.ThrowIfNull(slowRoll);
        var flags = new List<Flag>();
        Add(PivotDeviation("n_s", pivot.Ns, slowRoll.Ns, settings.SigmaNs, settings.PivotFraction, pivot.KPivot, referenceName));
        Add(PivotDeviation("r", pivot.R, slowRoll.R, settings.SigmaR, settings.PivotFraction, pivot.KPivot, referenceName));
        Add(PivotDeviation("alpha_s", pivot.AlphaS, slowRoll.AlphaS, settings.SigmaAlphaS, settings.PivotFraction, pivot.KPivot, referenceName));
        Add(PivotDeviation("n_t", pivot.Nt, slowRoll.Nt, settings.SigmaNt, settings.PivotFraction, pivot.KPivot, referenceName));
        return flags;

        void Add(Flag? f)
        {
            if (f is not null) flags.Add(f);
        }
    }

    /// <summary>
    /// One pivot comparison: a flag when |exact - slowRoll| &gt; fraction * sigma, else null (also null when either
    /// value is not finite).
    /// </summary>
    public static Flag? PivotDeviation(string quantity, double exact, double slowRoll, double sigma, double fraction, double kPivot,
        string referenceName = "slow roll")
    {
        if (!double.IsFinite(exact) || !double.IsFinite(slowRoll)) return null;
        double diff = exact - slowRoll;
        double limit = fraction * sigma;
        if (!(Math.Abs(diff) > limit)) return null;
        string where = string.Create(Inv, $"pivot k = {kPivot:0.000e+00} /Mpc");
        string msg = string.Create(Inv,
            $"{quantity}: exact {exact:0.00000e+00} vs {referenceName} {slowRoll:0.00000e+00}, difference {diff:+0.000e+00;-0.000e+00} = {Math.Abs(diff) / sigma:0.00} sigma (limit {fraction:0.###} sigma, sigma = {sigma:0.####e+00}) at {where}");
        return new Flag(FlagKinds.PivotDeviation, quantity, msg, where, kPivot, kPivot, exact, slowRoll, diff);
    }

    /// <summary>
    /// N ranges inside [windowStart, windowEnd] where <paramref name="values"/> exceeds <paramref name="limit"/>
    /// (pass |epsilon_2| for the epsilon_2 check). Exact is the peak value inside the range.
    /// </summary>
    /// <param name="n">e-folds, strictly increasing.</param>
    /// <param name="values">The measure at each N (epsilon_1 or |epsilon_2|).</param>
    /// <param name="quantity">Name used in the flag.</param>
    /// <param name="limit">Flag where the measure exceeds this.</param>
    /// <param name="windowStart">N where the smallest k exits (start of the observable window).</param>
    /// <param name="windowEnd">N where the largest k exits (end of the observable window).</param>
    public static List<Flag> BackgroundPhases(ReadOnlySpan<double> n, ReadOnlySpan<double> values, string quantity, double limit,
        double windowStart, double windowEnd)
    {
        if (values.Length != n.Length)
            throw new ArgumentException($"background flags for {quantity}: N and value arrays differ in length ({n.Length}, {values.Length})");
        if (!(windowEnd >= windowStart))
            throw new ArgumentException($"background flags for {quantity}: observable window [{windowStart}, {windowEnd}] is empty or not a number");
        for (int i = 1; i < n.Length; i++)
            if (!(n[i] > n[i - 1]))
                throw new ArgumentException($"background flags for {quantity}: N must be strictly increasing (at index {i})");

        var flags = new List<Flag>();
        foreach (var run in MergeAdjacent(Runs(n, values, limit), values))
        {
            double lo = Math.Max(run.Lower, windowStart), hi = Math.Min(run.Upper, windowEnd);
            if (lo > hi) continue;
            // Peak inside the clipped range; if no sample lies inside, the run's overall worst sample.
            int peak = -1;
            for (int i = run.FirstIndex; i <= run.LastIndex; i++)
                if (n[i] >= lo && n[i] <= hi && (peak < 0 || values[i] > values[peak])) peak = i;
            if (peak < 0) peak = run.WorstIndex;
            string where = string.Create(Inv, $"N = {lo:0.00} .. {hi:0.00}");
            string msg = string.Create(Inv,
                $"{quantity} exceeds {limit:0.###} inside the observable window for {where} (peak {values[peak]:0.000} at N = {n[peak]:0.00}): slow roll is unreliable there{MergedNote(run)}");
            flags.Add(new Flag(FlagKinds.BackgroundPhase, quantity, msg, where, lo, hi, values[peak], double.NaN, double.NaN));
        }
        return flags;
    }

    /// <summary>
    /// A warning when the exact P_s exceeds 1 somewhere (the perturbations are then not small and linear perturbation
    /// theory breaks down there), naming the k range; null otherwise.
    /// </summary>
    public static string? PerturbativityWarning(SpectrumSamples spectrum)
    {
        ArgumentNullException.ThrowIfNull(spectrum);
        double lo = double.NaN, hi = double.NaN, peak = 0;
        for (int i = 0; i < spectrum.K.Length; i++)
        {
            if (!(spectrum.Ps[i] > 1)) continue;
            if (double.IsNaN(lo)) lo = spectrum.K[i];
            hi = spectrum.K[i];
            peak = Math.Max(peak, spectrum.Ps[i]);
        }
        return double.IsNaN(lo) ? null : string.Create(Inv,
            $"P_s exceeds 1 (up to {peak:0.000e+00}) for k = {lo:0.000e+00} .. {hi:0.000e+00} /Mpc: the perturbations are not small there and linear perturbation theory breaks down");
    }

    /// <summary>A contiguous run of samples whose measure exceeds the limit (<paramref name="Parts"/> adjacent runs merged into it).</summary>
    internal readonly record struct Run(int FirstIndex, int LastIndex, int WorstIndex, double Lower, double Upper, int Parts = 1);

    /// <summary>
    /// Runs separated by at most this many samples within the limit are adjacent and merged into one flag: an
    /// oscillating disagreement crosses the limit at every zero of the difference, which would otherwise give one
    /// flag per half-period.
    /// </summary>
    public const int MergeGapSamples = 3;

    /// <summary>
    /// Merges adjacent runs, keeping the worst sample: runs whose gap holds at most <see cref="MergeGapSamples"/>
    /// samples, or whose gap (in x: ln k or N) is no wider than the wider of the two (a run merged so far counts whole),
    /// when both are of one kind (both where the reference fails outright, or both where it only differs).
    /// The second rule matters where refinement packs samples densely around a feature: an oscillation about the
    /// limit then has many samples in each gap, but its gaps stay narrower than the flagged stretches they separate.
    /// </summary>
    internal static List<Run> MergeAdjacent(List<Run> runs, ReadOnlySpan<double> measure)
    {
        var merged = new List<Run>(runs.Count);
        foreach (var r in runs)
        {
            if (merged.Count > 0 && Fails(merged[^1], measure) == Fails(r, measure)
                && (r.FirstIndex - merged[^1].LastIndex - 1 <= MergeGapSamples
                    || r.Lower - merged[^1].Upper <= Math.Max(merged[^1].Upper - merged[^1].Lower, r.Upper - r.Lower)))
            {
                var p = merged[^1];
                int worst = measure[r.WorstIndex] > measure[p.WorstIndex] ? r.WorstIndex : p.WorstIndex;
                merged[^1] = new Run(p.FirstIndex, r.LastIndex, worst, p.Lower, r.Upper, p.Parts + r.Parts);
            }
            else merged.Add(r);
        }
        return merged;
    }

    // A run where the reference fails outright (infinite measure: slow roll not positive) is of another kind than one
    // where it only differs: the two are never merged, so that each flag's message holds for its whole range.
    private static bool Fails(Run run, ReadOnlySpan<double> measure) => double.IsPositiveInfinity(measure[run.WorstIndex]);

    private static string MergedNote(Run run) => run.Parts > 1 ? string.Create(Inv, $" ({run.Parts} adjacent ranges merged)") : "";

    /// <summary>
    /// Contiguous runs where measure &gt; limit (NaN never exceeds). Ends are interpolated linearly in x to the
    /// crossing of the limit between the last sample below and the first above.
    /// </summary>
    internal static List<Run> Runs(ReadOnlySpan<double> x, ReadOnlySpan<double> measure, double limit)
    {
        var runs = new List<Run>();
        int i = 0, len = x.Length;
        while (i < len)
        {
            if (!(measure[i] > limit)) { i++; continue; }
            int a = i, worst = i;
            while (i + 1 < len && measure[i + 1] > limit)
            {
                i++;
                if (measure[i] > measure[worst]) worst = i;
            }
            int b = i;
            double lower = a > 0 && double.IsFinite(measure[a - 1]) ? Crossing(x[a - 1], measure[a - 1], x[a], measure[a], limit) : x[a];
            double upper = b + 1 < len && double.IsFinite(measure[b + 1]) ? Crossing(x[b], measure[b], x[b + 1], measure[b + 1], limit) : x[b];
            runs.Add(new Run(a, b, worst, lower, upper));
            i++;
        }
        return runs;
    }

    private static double Crossing(double x0, double m0, double x1, double m1, double limit)
    {
        double dm = m1 - m0;
        // An infinite measure (non-positive slow-roll value) has no crossing to interpolate: take the midpoint.
        if (dm == 0 || !double.IsFinite(dm)) return 0.5 * (x0 + x1);
        double t = Math.Clamp((limit - m0) / dm, 0.0, 1.0);
        return x0 + t * (x1 - x0);
    }
}
