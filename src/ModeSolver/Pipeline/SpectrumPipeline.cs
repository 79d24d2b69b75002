using System.Collections.Immutable;
using System.Diagnostics;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Diagnostics;
using ModeSolver.Matching;
using ModeSolver.Models;
using ModeSolver.Observables;
using ModeSolver.Output;
using ModeSolver.Physics;
using ModeSolver.Spectra;
using ModeSolver.Estimates;
using ModeSolver.Report;
using ModeSolver.Results;

namespace ModeSolver.Pipeline;

/// <summary>Options of one pipeline run that are not part of the physics settings.</summary>
public sealed record PipelineOptions
{
    /// <summary>Worker threads for the modes (0: all cores).</summary>
    public int Threads { get; init; }

    /// <summary>Thresholds of the slow-roll disagreement flags; null takes them from the settings (deck table [flags]).</summary>
    public FlagSettings? Flags { get; init; }

    /// <summary>Number of background samples written to the report.</summary>
    public int BackgroundSamples { get; init; } = 1500;

    /// <summary>Points per decade of the primordial table for Boltzmann codes.</summary>
    public int TablePointsPerDecade { get; init; } = 50;

    /// <summary>Called with a short stage name as the run progresses (for progress displays).</summary>
    public Action<string>? Stage { get; init; }
}

/// <summary>The pivot-only result of a run: what a sweep needs per point.</summary>
/// <param name="Pivot">Matching result: N_*, V scale, H_*, the scaled background.</param>
/// <param name="Exact">Exact observables at the pivot.</param>
/// <param name="SlowRoll">Slow-roll estimates at the pivot.</param>
/// <param name="Theory">The theory that was run.</param>
public sealed record PivotRun(PivotSolution Pivot, PivotValues Exact, SlowRollSet SlowRoll, IValidatedTheory Theory)
{
    /// <summary>
    /// The settings as run: phi0 of the background actually used (solved when the start was given in e-folds) and the
    /// solved parameter value when normalised by a parameter; the input settings otherwise.
    /// </summary>
    public required RunSettings Settings { get; init; }
}

/// <summary>
/// The whole spectrum pipeline: settings -> theory -> exact background -> pivot matching and normalisation with the
/// exact amplitude -> modes across k -> slow-roll comparison and flags -> a <see cref="RunReport"/> for the writers.
/// </summary>
public static class SpectrumPipeline
{
    /// <summary>Depth k/aH at which the pivot matching measures the served k range (the mode solver's own start is shallower).</summary>
    private const double RangeStartDepth = 20;

    /// <summary>Runs the theory, background and matching stages and the exact pivot mode only.</summary>
    /// <exception cref="PhysicsException">physics that cannot be computed (one-line message).</exception>
    /// <exception cref="DeckException">settings that are invalid for this theory.</exception>
    public static PivotRun RunPivot(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new PipelineOptions();
        options.Stage?.Invoke("background");
        double tolerance = settings.KRange.Tolerance;
        IValidatedTheory theory;
        PivotSolution pivot;
        var used = settings;
        if (settings.Amplitude.SolveFor is not null)
        {
            options.Stage?.Invoke("normalisation by " + settings.Amplitude.SolveFor);
            var solved = ParameterNormalisation.Solve(settings, SolveBackground, tolerance);
            (theory, pivot, used) = (solved.Theory, solved.Pivot, solved.Settings);
        }
        else
        {
            theory = TheoryFactory.Build(settings);
            var background = SolveBackground(theory, settings);
            used = WithStart(settings, background);
            options.Stage?.Invoke("pivot matching");
            pivot = PivotMatcher.Match(background, PivotSettingsFor(settings), new ExactAmplitude(Math.Min(tolerance, 1e-6)));
        }
        var bg = pivot.Background;
        double kPivotBg = pivot.ToBackgroundUnits(pivot.KPivot);
        var exact = PivotValues.Compute(bg, kPivotBg, Math.Min(tolerance, 1e-6));
        return new PivotRun(pivot, exact, pivot.PivotSlowRoll, theory) { Settings = used };
    }

    /// <summary>
    /// The exact background of the settings: from phi0, or, for a start given in e-folds before the end, from the field
    /// value whose exact background inflates that many e-folds (<see cref="ExactStart"/>).
    /// </summary>
    public static BackgroundSolution SolveBackground(IValidatedTheory theory, RunSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var bgSettings = BackgroundSettingsFor(settings);
        return settings.Initial.StartEfolds is double ne
            ? ExactStart.Solve(theory, bgSettings, ne)
            : BackgroundSolver.Solve(theory, bgSettings);
    }

    private static RunSettings WithStart(RunSettings settings, BackgroundSolution background) =>
        settings.Initial.StartEfolds is null ? settings
            : settings with { Initial = settings.Initial with { Phi0 = background.At(background.NStart).Phi } };

    /// <summary>Runs the whole pipeline and returns the report (no files are written here).</summary>
    /// <exception cref="PhysicsException">physics that cannot be computed (one-line message).</exception>
    /// <exception cref="DeckException">settings that are invalid for this theory.</exception>
    public static RunReport Run(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new PipelineOptions();
        var clock = Stopwatch.StartNew();
        var stages = ImmutableArray.CreateBuilder<StageTiming>();
        double last = 0;
        void Mark(string stage)
        {
            double now = clock.Elapsed.TotalSeconds;
            stages.Add(new StageTiming(stage, now - last));
            last = now;
        }

        var run = RunPivot(settings, options);
        var flagSettings = options.Flags ?? settings.Flags;
        settings = run.Settings;
        Mark("background and matching");
        var pivot = run.Pivot;
        var bg = pivot.Background;
        double kPivotBg = pivot.ToBackgroundUnits(pivot.KPivot);

        // Modes across k.
        options.Stage?.Invoke("modes");
        var kr = settings.KRange;
        var spectrumSettings = new SpectrumSettings
        {
            KMin = pivot.ToBackgroundUnits(kr.KMin),
            KMax = pivot.ToBackgroundUnits(kr.KMax),
            KCount = kr.Count,
            MaxPoints = Math.Max(kr.Count + 1, 2000), // the deck may ask for more wavenumbers than the default refinement cap
            Tolerance = kr.Tolerance,
            DegreeOfParallelism = options.Threads,
            ExtraK = kr.KMin <= pivot.KPivot && pivot.KPivot <= kr.KMax ? [kPivotBg] : [],
        };
        var warnings = new List<string>(settings.Warnings);
        if (bg.ContinuationNote is string stopped) warnings.Add(stopped);
        if (kr.KMinIsDefault)
        {
            // The default k_min reaches 1e-6 /Mpc when the background serves it; otherwise the run starts where it can.
            double servedLo = pivot.ToInverseMpc(SpectrumSolver.ServedRange(bg, spectrumSettings).KMin) * 1.0001;
            if (servedLo > kr.KMin && servedLo < kr.KMax)
            {
                warnings.Add(string.Create(CultureInfo.InvariantCulture,
                    $"the default k_min = {kr.KMin:G3} /Mpc is not served by this background: the spectrum starts at k = {servedLo:G4} /Mpc (start earlier, e.g. start.efolds, to reach it)"));
                kr = kr with { KMin = servedLo };
                spectrumSettings = spectrumSettings with
                {
                    KMin = pivot.ToBackgroundUnits(servedLo),
                    ExtraK = kr.KMin <= pivot.KPivot && pivot.KPivot <= kr.KMax ? [kPivotBg] : [],
                };
            }
        }
        CheckServedRange(bg, pivot, spectrumSettings, kr);
        var spectrum = SpectrumSolver.Compute(bg, spectrumSettings);
        Mark("modes");

        // Slow roll on the same k, background samples, flags.
        options.Stage?.Invoke("slow-roll comparison");
        var k = spectrum.K;
        int m = k.Length;
        var kMpc = new double[m];
        var ps1 = new double[m]; var pt1 = new double[m]; var ps2 = new double[m]; var pt2 = new double[m];
        var ns1 = new double[m]; var ns2 = new double[m];
        for (int i = 0; i < m; i++)
        {
            // The pivot sample is k_* exactly (the round trip through background units can miss it by an ulp).
            kMpc[i] = k[i] == kPivotBg ? pivot.KPivot : pivot.ToInverseMpc(k[i]);
            var sr = SlowRoll.AtK(bg, k[i]);
            ps1[i] = sr.FirstOrder.Ps; pt1[i] = sr.FirstOrder.Pt; ns1[i] = sr.FirstOrder.Ns;
            ps2[i] = sr.SecondOrder.Ps; pt2[i] = sr.SecondOrder.Pt; ns2[i] = sr.SecondOrder.Ns;
        }

        var exact = run.Exact;
        string? unbounded = UnboundedWarning(spectrum, kMpc);
        double maxRelError = Math.Max(spectrum.MaxRelativeError, exact.ErrorEstimate);
        var pivotResults = new PivotResults(
            Ns: exact.Ns, AlphaS: exact.AlphaS, R: exact.R, Nt: exact.Nt, As: exact.Ps, KPivot: pivot.KPivot,
            NStar: pivot.NStar, PhiStar: pivot.PhiStar, HStar: pivot.HStar, EnergyScaleGeV: pivot.VStarQuarterGeV,
            VScale: pivot.VScale, NTotal: pivot.NTotal, NReh: pivot.NReh,
            MaxRelError: maxRelError,
            RhsEvaluationsPerMode: spectrum.MeanRhsEvaluationsPerMode)
        {
            Errors = exact.Errors,
            ToleranceMet = maxRelError <= kr.Tolerance && unbounded is null,
        };

        if (maxRelError > kr.Tolerance) warnings.Add(ToleranceWarning(spectrum, kMpc, exact.ErrorEstimate, kr.Tolerance));
        if (unbounded is not null) warnings.Add(unbounded);
        if (exact.DeepStartWarning() is string deep) warnings.Add(deep);
        var srSet = run.SlowRoll;
        var pivotSlowRoll = new PivotSlowRoll(Estimate(srSet.FirstOrder), Estimate(srSet.SecondOrder), Estimate(srSet.Potential));

        var background = SampleBackground(bg, pivot, kr, options.BackgroundSamples);
        var spectrumSamples = new SpectrumSamples(Imm(kMpc), Imm(spectrum.Ps), Imm(spectrum.Pt), Imm(spectrum.R),
            Imm(spectrum.Ns), Imm(spectrum.Nt), Imm(spectrum.AlphaS), Imm(spectrum.ErrorEstimate))
        {
            Tolerance = kr.Tolerance,
            ErrorBounded = spectrum.ErrorBounded.Length == m ? ImmutableArray.Create(spectrum.ErrorBounded) : ImmutableArray<bool>.Empty,
        };
        var srSpectra = new SlowRollSpectra(Imm(kMpc), Imm(ps1), Imm(pt1), Imm(ps2), Imm(pt2), Imm(ns1), Imm(ns2));
        var table = Table(spectrum, pivot, kr, options.TablePointsPerDecade) with { H = settings.Output.TableH };
        if (Flags.PerturbativityWarning(spectrumSamples) is string nonPerturbative) warnings.Add(nonPerturbative);
        var derived = Derive(settings, pivot, spectrum, kr);
        var flags = Flags.Evaluate(pivotResults, pivotSlowRoll, spectrumSamples, srSpectra, background, flagSettings);
        Mark("slow-roll comparison");

        ObservablesReport? observables = null;
        if (settings.Observables.Any)
        {
            options.Stage?.Invoke("observables");
            observables = ComputeObservables(settings.Observables, spectrumSamples, pivotResults, pivot);
            Mark("observables");
        }

        long rhs = 0;
        foreach (int r in spectrum.RhsEvaluations) rhs += r;
        var statistics = new RunStatistics(clock.Elapsed.TotalSeconds, stages.ToImmutable(), m, rhs,
            options.Threads > 0 ? options.Threads : Environment.ProcessorCount);

        return new RunReport(ModelInfoFor(settings, run.Theory, pivot.VScale), ReportSettingsFor(settings, flagSettings), pivotResults,
            pivotSlowRoll, background, spectrumSamples, srSpectra, table, flags, pivot.AmplitudeName, statistics,
            [.. warnings]) { Derived = derived, Observables = observables };
    }

    /// <summary>
    /// The observables stage on the exact spectrum: distance to the data, peak summary, induced GWs and black holes as
    /// switched on. The horizon exit of a wavenumber (the peak's) comes from the background's own exit lookup.
    /// </summary>
    public static ObservablesReport ComputeObservables(ObservablesSettings settings, SpectrumSamples spectrum, PivotResults pivotResults, PivotSolution pivot)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(pivot);
        var bg = pivot.Background;
        double NAtExit(double kMpc) => bg.TryNAtHorizonExit(pivot.ToBackgroundUnits(kMpc), out double n) ? n : double.NaN;
        var source = ObservablesSource.From(spectrum, pivotResults, NAtExit, bg.NEnd);
        try
        {
            return ObservablesStage.Compute(source, settings);
        }
        catch (ArgumentException e)
        {
            throw new PhysicsException(e.Message);
        }
    }

    /// <summary>
    /// T_reh, rho_end^(1/4) and r at 0.002 /Mpc: r from the exact spectrum when 0.002 /Mpc lies in its k range, else from
    /// one exact mode there when the background serves it, else NaN with the reason.
    /// </summary>
    public static DerivedQuantities Derive(RunSettings settings, PivotSolution pivot, PrimordialSpectrum? spectrum, KRangeSpec kr)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(pivot);
        ArgumentNullException.ThrowIfNull(kr);
        const double k2 = DerivedQuantities.SecondPivotK;
        double kb = pivot.ToBackgroundUnits(k2);
        double r002 = double.NaN;
        string source;
        if (spectrum is not null && kb >= spectrum.K[0] && kb <= spectrum.K[^1])
        {
            r002 = spectrum.InterpolatePt(kb) / spectrum.InterpolatePs(kb);
            source = "spectrum";
        }
        else if (k2 >= pivot.KMinMpc && k2 <= pivot.KMaxMpc)
        {
            // The same mode as PivotValues.Compute solves first; its tighter error check is not needed for r alone.
            r002 = new Perturbations.ModeIntegrator().Solve(pivot.Background, kb, new Perturbations.ModeSettings { Tolerance = Math.Min(kr.Tolerance, 1e-6) }).R;
            source = "mode";
        }
        else source = string.Create(CultureInfo.InvariantCulture, $"unavailable: 0.002 /Mpc is outside the k range the background serves [{pivot.KMinMpc:G3}, {pivot.KMaxMpc:G3}] /Mpc");
        bool given = settings.Pivot.Efolds is null && settings.Pivot.Reheating.Kind == ReheatingKind.Temperature;
        return new DerivedQuantities(pivot.TRehGeV, !given && double.IsFinite(pivot.TRehGeV),
            Math.Pow(pivot.RhoEnd, 0.25) * Constants.ReducedPlanckMassGeV, r002, source);
    }

    /// <summary>The background settings a run deck asks for.</summary>
    public static BackgroundSettings BackgroundSettingsFor(RunSettings settings) => new()
    {
        Phi0 = settings.Initial.Phi0,
        DPhi0 = settings.Initial.DPhi0,
        PhiEnd = settings.Model.PhiEnd,
    };

    /// <summary>The pivot-matching settings a run deck asks for.</summary>
    public static PivotSettings PivotSettingsFor(RunSettings settings)
    {
        var p = settings.Pivot;
        var reheating = p.Reheating.Kind switch
        {
            ReheatingKind.Temperature => ReheatingHistory.WithTemperature(p.Reheating.W, p.Reheating.TemperatureGeV!.Value),
            ReheatingKind.Efolds => ReheatingHistory.WithEFolds(p.Reheating.W, p.Reheating.Efolds!.Value),
            _ => ReheatingHistory.Instantaneous,
        };
        return new PivotSettings
        {
            KPivot = p.KPivot,
            EFolds = p.Efolds,
            Reheating = reheating,
            GReh = p.Reheating.Dof,
            GsReh = p.Reheating.Dof,
            ScalarAmplitude = settings.Amplitude.ScalarAmplitude,
            RangeStartDepth = RangeStartDepth,
        };
    }

    private static void CheckServedRange(BackgroundSolution bg, PivotSolution pivot, SpectrumSettings s, KRangeSpec kr)
    {
        var (lo, hi) = SpectrumSolver.ServedRange(bg, s);
        double loMpc = pivot.ToInverseMpc(lo), hiMpc = pivot.ToInverseMpc(hi);
        if (s.KMin < lo * (1 + 1e-12) || s.KMax > hi)
            throw new PhysicsException(string.Format(CultureInfo.InvariantCulture,
                "the k range [{0:G4}, {1:G4}] /Mpc is outside what this background serves at tolerance {4:G3}, [{2:G4}, {3:G4}] /Mpc " +
                "(each mode starts at k/aH = {5:G3} after the background's start and must reach k/aH = {6:G3} by the end of inflation; " +
                "both depths follow the tolerance); narrow k_min/k_max, or start the field further up the potential (phi0) for smaller k",
                kr.KMin, kr.KMax, loMpc * 1.0001, hiMpc * 0.9999, s.Tolerance, s.ModeSettings().EffectiveStartDepth, s.ModeSettings().EffectiveStopDepth));
    }

    private static SlowRollEstimate Estimate(SlowRollPrediction p) => new(p.Ps, p.Ns, p.R, p.AlphaS, p.Nt);

    private static ImmutableArray<double> Imm(double[] a) => ImmutableArray.Create(a);

    private static BackgroundSamples SampleBackground(BackgroundSolution bg, PivotSolution pivot, KRangeSpec kr, int count)
    {
        count = Math.Max(count, 16);
        var n = new double[count]; var phi = new double[count]; var dphi = new double[count]; var h = new double[count];
        var e1 = new double[count]; var e2 = new double[count]; var e3 = new double[count];
        double a = bg.NStart, b = bg.NStop;
        for (int i = 0; i < count; i++)
        {
            double x = a + (b - a) * i / (count - 1);
            var p = bg.At(x);
            n[i] = x - a; phi[i] = p.Phi; dphi[i] = p.DPhi; h[i] = p.H; e1[i] = p.Epsilon1; e2[i] = p.Epsilon2; e3[i] = p.Epsilon3;
        }
        double windowStart = bg.TryNAtHorizonExit(pivot.ToBackgroundUnits(kr.KMin), out double w0) ? w0 : bg.NStart;
        double windowEnd = bg.TryNAtHorizonExit(pivot.ToBackgroundUnits(kr.KMax), out double w1) ? w1 : bg.NEnd;
        // Recorded in e-folds since the start whatever the background's internal origin (long backgrounds count from the end).
        return new BackgroundSamples(Imm(n), Imm(phi), Imm(dphi), Imm(h), Imm(e1), Imm(e2), Imm(e3), bg.NEnd - a, pivot.NPivot - a,
            windowStart - a, windowEnd - a, [.. bg.EndCrossings.Select(c => c - a)], bg.ContinuationStop);
    }

    /// <summary>
    /// The one warning line naming the k range whose error estimate is not a bound (modes that start after a fast feature
    /// that excited them too strongly for the first-order bound), or null when every estimate is one.
    /// </summary>
    private static string? UnboundedWarning(PrimordialSpectrum spectrum, double[] kMpc)
    {
        int first = -1, last = -1, count = 0;
        for (int i = 0; i < spectrum.ErrorBounded.Length; i++)
        {
            if (spectrum.ErrorBounded[i]) continue;
            if (first < 0) first = i;
            last = i;
            count++;
        }
        if (first < 0) return null;
        return string.Format(CultureInfo.InvariantCulture,
            "the error estimate is not a bound at {0} of {1} wavenumbers in k = {2:G4} .. {3:G4} /Mpc: those modes start after a fast feature of the background that excited them by more than {4} (a first-order bound) while they were inside the horizon (tolerance_met: false)",
            count, spectrum.Count, kMpc[first], kMpc[last], Perturbations.ModeIntegrator.MissedExcitationLimit);
    }

    /// <summary>The one warning line of a run whose estimated error exceeds the requested tolerance.</summary>
    private static string ToleranceWarning(PrimordialSpectrum spectrum, double[] kMpc, double pivotError, double tolerance)
    {
        int worst = 0;
        for (int i = 1; i < spectrum.Count; i++)
            if (spectrum.ErrorEstimate[i] > spectrum.ErrorEstimate[worst]) worst = i;
        string where = spectrum.Count > 0 && spectrum.ErrorEstimate[worst] >= pivotError
            ? string.Format(CultureInfo.InvariantCulture, "at k = {0:G4} /Mpc", kMpc[worst])
            : "at the pivot";
        double max = Math.Max(pivotError, spectrum.Count > 0 ? spectrum.ErrorEstimate[worst] : 0.0);
        return string.Format(CultureInfo.InvariantCulture,
            "tolerance not met: the estimated relative error reaches {0:G2} {1}, above the requested tolerance {2:G2} (tolerance_met: false)",
            max, where, tolerance);
    }

    private static PrimordialTable Table(PrimordialSpectrum spectrum, PivotSolution pivot, KRangeSpec kr, int perDecade)
    {
        var grid = WavenumberGrid.LogSpaced(kr.KMin, kr.KMax, perDecade);
        var ps = new double[grid.Length];
        var pt = new double[grid.Length];
        for (int i = 0; i < grid.Length; i++)
        {
            double kb = pivot.ToBackgroundUnits(grid[i]);
            kb = Math.Clamp(kb, spectrum.K[0], spectrum.K[^1]);
            ps[i] = spectrum.InterpolatePs(kb);
            pt[i] = spectrum.InterpolatePt(kb);
        }
        return new PrimordialTable([.. grid], Imm(ps), Imm(pt));
    }

    /// <summary>
    /// The model as run: with the amplitude parameter carrying the V scale (<see cref="NormalisedParameters"/>), so
    /// that the printed parameters reproduce the run with V scale 1; the description says when V was rescaled instead.
    /// </summary>
    private static ModelInfo ModelInfoFor(RunSettings settings, IValidatedTheory theory, double vScale)
    {
        var spec = settings.Model with { Parameters = NormalisedParameters.Apply(settings.Model, vScale) };
        string description = ReferenceEquals(spec.Parameters, settings.Model.Parameters) && vScale != 1
            ? string.Create(CultureInfo.InvariantCulture, $"{theory.Description}; V multiplied by V_scale = {vScale:G8}")
            : spec.Describe();
        var frame = spec.Coupling is null ? TheoryFrame.Einstein : spec.Palatini ? TheoryFrame.JordanPalatini : TheoryFrame.JordanMetric;
        var parameters = ImmutableArray.CreateBuilder<Report.ModelParameter>();
        foreach (var kv in spec.Parameters.OrderBy(kv => kv.Key, StringComparer.Ordinal))
            parameters.Add(new Report.ModelParameter(kv.Key, kv.Value));
        if (NormalisedParameters.LambdaOverXiSquared(spec, spec.Parameters) is double lx)
            description += string.Create(CultureInfo.InvariantCulture, $" (lambda/xi^2 = {lx:G6})");
        return new ModelInfo(spec.CatalogueId ?? "formula", description, spec.Potential, spec.Kinetic ?? "1",
            spec.Coupling, parameters.ToImmutable(), frame);
    }

    // The settings list the outputs record, made from the settings schema (SettingsSchema.ReportEntries).
    private static ReportSettings ReportSettingsFor(RunSettings s, FlagSettings flags)
    {
        var e = ImmutableArray.CreateBuilder<Setting>();
        foreach (var (key, value, number) in SettingsSchema.ReportEntries(s)) e.Add(new Setting(key, value, number));
        return new ReportSettings(e.ToImmutable(), flags);
    }

}
