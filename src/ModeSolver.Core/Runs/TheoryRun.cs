using System.Collections.Immutable;
using System.Diagnostics;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Estimates;
using ModeSolver.Matching;
using ModeSolver.Models;
using ModeSolver.Observables;
using ModeSolver.Physics;
using ModeSolver.Report;
using ModeSolver.Results;
using ModeSolver.Spectra;

namespace ModeSolver.Runs;

/// <summary>The pivot stages of a run: what a sweep needs per point.</summary>
/// <param name="Pivot">Matching result: N_*, V scale, H_*, the scaled background.</param>
/// <param name="Exact">Exact observables at the pivot.</param>
/// <param name="SlowRoll">Slow-roll estimates at the pivot.</param>
/// <param name="Theory">The theory that was run.</param>
/// <param name="Phi0">The field value the background actually started from (solved when the start was given in e-folds).</param>
public sealed record PivotStage(PivotSolution Pivot, PivotValues Exact, SlowRollSet SlowRoll, IInflatonTheory Theory, double Phi0);

/// <summary>
/// The programmatic entry point: a theory (any <see cref="IInflatonTheory"/>, a closed-form C# class included) and a
/// <see cref="RunRequest"/> in, a <see cref="RunReport"/> out. The stages: exact background -> pivot matching and
/// normalisation with the exact amplitude -> modes across k -> slow-roll comparison and flags -> observables. No
/// files are written here (the IO side's writers take the report).
/// </summary>
public static partial class TheoryRun
{
    /// <summary>Depth k/aH at which the pivot matching measures the served k range (the mode solver's own start is shallower).</summary>
    private const double RangeStartDepth = 20;

    /// <summary>Runs every stage and returns the report.</summary>
    /// <exception cref="ModeSolverException">physics that cannot be computed (exit code 3) or a theory that cannot be used (2); one-line message.</exception>
    public static RunReport Run(IInflatonTheory theory, RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(request);
        var clock = Stopwatch.StartNew();
        var stage = RunPivot(theory, request);
        return Complete(stage, request, clock);
    }

    /// <summary>The background, the pivot matching and the exact pivot mode only.</summary>
    public static PivotStage RunPivot(IInflatonTheory theory, RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(request);
        request.Stage?.Invoke("background");
        var background = SolveBackground(theory, request);
        request.Stage?.Invoke("pivot matching");
        var pivot = PivotMatcher.Match(background, PivotSettingsFor(request), new ExactAmplitude(Math.Min(request.Tolerance, 1e-6)));
        return AtPivot(theory, background, pivot, request.Tolerance);
    }

    /// <summary>The exact pivot mode of a matched pivot (for callers that matched it themselves, e.g. normalising by a parameter).</summary>
    /// <param name="theory">The theory.</param>
    /// <param name="background">The unscaled background the pivot was matched on (its start gives <see cref="PivotStage.Phi0"/>).</param>
    /// <param name="pivot">The matching result.</param>
    /// <param name="tolerance">The run's tolerance (the pivot mode is solved to min(tolerance, 1e-6)).</param>
    public static PivotStage AtPivot(IInflatonTheory theory, BackgroundSolution background, PivotSolution pivot, double tolerance)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(pivot);
        var bg = pivot.Background;
        double kPivotBg = pivot.ToBackgroundUnits(pivot.KPivot);
        var exact = PivotValues.Compute(bg, kPivotBg, Math.Min(tolerance, 1e-6));
        return new PivotStage(pivot, exact, pivot.PivotSlowRoll, theory, background.At(background.NStart).Phi);
    }

    /// <summary>
    /// The exact background of the request: from phi0, or, for a start given in e-folds before the end, from the field
    /// value whose exact background inflates that many e-folds (<see cref="ExactStart"/>).
    /// </summary>
    public static BackgroundSolution SolveBackground(IInflatonTheory theory, RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        var bgSettings = BackgroundSettingsFor(request);
        return request.StartEfolds is double ne
            ? ExactStart.Solve(theory, bgSettings, ne)
            : BackgroundSolver.Solve(theory, bgSettings);
    }

    /// <summary>The background settings of a request.</summary>
    public static BackgroundSettings BackgroundSettingsFor(RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        return new BackgroundSettings
        {
            Phi0 = request.Phi0, DPhi0 = request.DPhi0, PhiEnd = request.PhiEnd,
            Fields0 = request.Fields0, Velocity0 = request.Velocity0, EndSurface = request.EndSurface,
        };
    }

    /// <summary>The pivot-matching settings of a request.</summary>
    public static PivotSettings PivotSettingsFor(RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        return new PivotSettings
        {
            KPivot = request.KPivot,
            EFolds = request.PivotEfolds,
            Reheating = request.Reheating,
            GReh = request.ReheatingDof,
            GsReh = request.ReheatingDof,
            ScalarAmplitude = request.ScalarAmplitude,
            RangeStartDepth = RangeStartDepth,
        };
    }

    /// <summary>
    /// The stages after the pivot: modes across k, slow-roll comparison and flags, observables. <paramref name="clock"/>
    /// has run since the start of the run (the time so far is booked as "background and matching"). The report's model
    /// and settings describe the theory and the request; a caller with more to say (the deck adapter) replaces them.
    /// </summary>
    public static RunReport Complete(PivotStage run, RunRequest request, Stopwatch clock)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(clock);
        var stages = ImmutableArray.CreateBuilder<StageTiming>();
        double last = 0;
        void Mark(string stage)
        {
            double now = clock.Elapsed.TotalSeconds;
            stages.Add(new StageTiming(stage, now - last));
            last = now;
        }

        var flagSettings = request.Flags;
        Mark("background and matching");
        var pivot = run.Pivot;
        var bg = pivot.Background;
        double kPivotBg = pivot.ToBackgroundUnits(pivot.KPivot);

        // Modes across k.
        request.Stage?.Invoke("modes");
        var kr = new KWindow(request.KMin, request.KMax, request.Tolerance);
        var spectrumSettings = new SpectrumSettings
        {
            KMin = pivot.ToBackgroundUnits(kr.KMin),
            KMax = pivot.ToBackgroundUnits(kr.KMax),
            KCount = request.KCount,
            MaxPoints = Math.Max(request.KCount + 1, 2000), // the request may ask for more wavenumbers than the default refinement cap
            Tolerance = kr.Tolerance,
            DegreeOfParallelism = request.Threads,
            ExtraK = kr.KMin <= pivot.KPivot && pivot.KPivot <= kr.KMax ? [kPivotBg] : [],
        };
        var warnings = new List<string>(request.Warnings);
        if (bg.ContinuationNote is string stopped) warnings.Add(stopped);
        if (request.KMinIsDefault)
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
        request.Stage?.Invoke("slow-roll comparison");
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
        var pivotSlowRoll = new PivotSlowRoll(srSet.FirstOrder, srSet.SecondOrder, srSet.Potential);

        var background = SampleBackground(bg, pivot, kr, request.BackgroundSamples);
        var spectrumSamples = new SpectrumSamples(Imm(kMpc), Imm(spectrum.Ps), Imm(spectrum.Pt), Imm(spectrum.R),
            Imm(spectrum.Ns), Imm(spectrum.Nt), Imm(spectrum.AlphaS), Imm(spectrum.ErrorEstimate))
        {
            Tolerance = kr.Tolerance,
            ErrorBounded = spectrum.ErrorBounded.Length == m ? ImmutableArray.Create(spectrum.ErrorBounded) : ImmutableArray<bool>.Empty,
        };
        var srSpectra = new SlowRollSpectra(Imm(kMpc), Imm(ps1), Imm(pt1), Imm(ps2), Imm(pt2), Imm(ns1), Imm(ns2));
        var table = Table(spectrum, pivot, kr, request.TablePointsPerDecade) with { H = request.TableH };
        if (Flags.PerturbativityWarning(spectrumSamples) is string nonPerturbative) warnings.Add(nonPerturbative);
        var derived = Derive(request, pivot, spectrum);
        var flags = Flags.Evaluate(pivotResults, pivotSlowRoll, spectrumSamples, srSpectra, background, flagSettings);
        Mark("slow-roll comparison");

        ObservablesReport? observables = null;
        if (request.Observables.Any)
        {
            request.Stage?.Invoke("observables");
            observables = ComputeObservables(request.Observables, spectrumSamples, pivotResults, pivot);
            Mark("observables");
        }

        Bispectrum.BispectrumReport? bispectrum = null;
        if (request.Bispectrum is { } bispectrumRequest)
        {
            request.Stage?.Invoke("bispectrum");
            bispectrum = Bispectrum.BispectrumStage.Run(pivot, exact.Ns, kr.KMin, kr.KMax, bispectrumRequest, request.Threads > 0 ? request.Threads : Environment.ProcessorCount);
            warnings.AddRange(bispectrum.Flags);
            Mark("bispectrum");
        }

        long rhs = 0;
        foreach (int r in spectrum.RhsEvaluations) rhs += r;
        var statistics = new RunStatistics(clock.Elapsed.TotalSeconds, stages.ToImmutable(), m, rhs,
            request.Threads > 0 ? request.Threads : Environment.ProcessorCount);

        return new RunReport(ModelInfoOf(run.Theory), ReportSettingsOf(request), pivotResults,
            pivotSlowRoll, background, spectrumSamples, srSpectra, table, flags, pivot.AmplitudeName, statistics,
            [.. warnings]) { Derived = derived, Observables = observables, Bispectrum = bispectrum };
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
        return ObservablesStage.Compute(source, settings);
    }

    /// <summary>
    /// T_reh, rho_end^(1/4) and r at 0.002 /Mpc: r from the exact spectrum when 0.002 /Mpc lies in its k range, else from
    /// one exact mode there when the background serves it, else NaN with the reason.
    /// </summary>
    public static DerivedQuantities Derive(RunRequest request, PivotSolution pivot, PrimordialSpectrum? spectrum)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(pivot);
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
            r002 = new Perturbations.ModeIntegrator().Solve(pivot.Background, kb, new Perturbations.ModeSettings { Tolerance = Math.Min(request.Tolerance, 1e-6) }).R;
            source = "mode";
        }
        else source = string.Create(CultureInfo.InvariantCulture, $"unavailable: 0.002 /Mpc is outside the k range the background serves [{pivot.KMinMpc:G3}, {pivot.KMaxMpc:G3}] /Mpc");
        bool given = request.PivotEfolds is null && request.Reheating.TRehGeV is not null;
        return new DerivedQuantities(pivot.TRehGeV, !given && double.IsFinite(pivot.TRehGeV),
            Math.Pow(pivot.RhoEnd, 0.25) * Constants.ReducedPlanckMassGeV, r002, source);
    }

    /// <summary>The report's description of a theory given as an object: its description, no formula text, Einstein frame.</summary>
    public static ModelInfo ModelInfoOf(IInflatonTheory theory)
    {
        ArgumentNullException.ThrowIfNull(theory);
        return new ModelInfo("theory", theory.Description, theory.Description, theory.IsCanonical ? "1" : "(given by the theory)", null,
            ImmutableArray<ModelParameter>.Empty, TheoryFrame.Einstein);
    }

    /// <summary>The report's settings list of a request (the same keys as a deck where the request has the setting).</summary>
    public static ReportSettings ReportSettingsOf(RunRequest r)
    {
        ArgumentNullException.ThrowIfNull(r);
        var inv = CultureInfo.InvariantCulture;
        string F(double x) => x.ToString("R", inv);
        var e = ImmutableArray.CreateBuilder<Setting>();
        void Add(string key, double? value) { if (value is { } v) e.Add(new Setting(key, F(v), double.IsFinite(v))); }
        string List(IReadOnlyList<double> v) => "[" + string.Join(", ", v.Select(F)) + "]";
        if (r.Fields0 is { } f0) e.Add(new Setting("start.phi0", List(f0))); else Add("start.phi0", r.Phi0);
        Add("start.efolds", r.StartEfolds);
        if (r.Velocity0 is { } u0) e.Add(new Setting("start.dphi0", List(u0)));
        else if (r.DPhi0 is null) e.Add(new Setting("start.dphi0", "attractor")); else Add("start.dphi0", r.DPhi0);
        Add("model.phi_end", r.PhiEnd);
        if (r.EndSurface is { } end) e.Add(new Setting("model.end", end.Name));
        Add("pivot.k", r.KPivot);
        Add("pivot.efolds", r.PivotEfolds);
        if (r.PivotEfolds is null)
        {
            var h = r.Reheating;
            e.Add(new Setting("reheating.kind", h.TRehGeV is not null ? "temperature" : h.NReh is not null ? "efolds" : "instantaneous"));
            if (!h.IsInstantaneous) Add("reheating.w", h.W);
            Add("reheating.temperature_gev", h.TRehGeV);
            Add("reheating.efolds", h.NReh);
        }
        Add("reheating.dof", r.ReheatingDof);
        if (r.ScalarAmplitude is null) e.Add(new Setting("normalisation.a_s", "none")); else Add("normalisation.a_s", r.ScalarAmplitude);
        Add("modes.k_min", r.KMin);
        Add("modes.k_max", r.KMax);
        e.Add(new Setting("modes.count", r.KCount.ToString(inv), true));
        Add("modes.tolerance", r.Tolerance);
        Add("output.table_h", r.TableH);
        return new ReportSettings(e.ToImmutable(), r.Flags);
    }

    /// <summary>The k window of the spectrum in 1/Mpc and its tolerance (k_min may move up to what the background serves).</summary>
    private readonly record struct KWindow(double KMin, double KMax, double Tolerance);

    private static void CheckServedRange(BackgroundSolution bg, PivotSolution pivot, SpectrumSettings s, KWindow kr)
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

    private static ImmutableArray<double> Imm(double[] a) => ImmutableArray.Create(a);

    private static BackgroundSamples SampleBackground(BackgroundSolution bg, PivotSolution pivot, KWindow kr, int count)
        => SampleBackground(bg, pivot.NPivot, pivot.LnKUnit, bg.ContinuationStop, kr, count);

    private static BackgroundSamples SampleBackground(IScalableBackground bg, double nPivot, double lnKUnit, string? continuationStop, KWindow kr, int count)
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
        double unit = Math.Exp(lnKUnit);
        double windowStart = bg.TryNAtHorizonExit(kr.KMin * unit, out double w0) ? w0 : bg.NStart;
        double windowEnd = bg.TryNAtHorizonExit(kr.KMax * unit, out double w1) ? w1 : bg.NEnd;
        // Recorded in e-folds since the start whatever the background's internal origin (long backgrounds count from the end).
        return new BackgroundSamples(Imm(n), Imm(phi), Imm(dphi), Imm(h), Imm(e1), Imm(e2), Imm(e3), bg.NEnd - a, nPivot - a,
            windowStart - a, windowEnd - a, [.. bg.EndCrossings.Select(c => c - a)], continuationStop);
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

    private static PrimordialTable Table(PrimordialSpectrum spectrum, PivotSolution pivot, KWindow kr, int perDecade)
        => Table(spectrum, pivot.LnKUnit, kr, perDecade);

    private static PrimordialTable Table(PrimordialSpectrum spectrum, double lnKUnit, KWindow kr, int perDecade)
    {
        var grid = WavenumberGrid.LogSpaced(kr.KMin, kr.KMax, perDecade);
        var ps = new double[grid.Length];
        var pt = new double[grid.Length];
        for (int i = 0; i < grid.Length; i++)
        {
            double kb = grid[i] * Math.Exp(lnKUnit);
            kb = Math.Clamp(kb, spectrum.K[0], spectrum.K[^1]);
            ps[i] = spectrum.InterpolatePs(kb);
            pt[i] = spectrum.InterpolatePt(kb);
        }
        return new PrimordialTable([.. grid], Imm(ps), Imm(pt));
    }
}
