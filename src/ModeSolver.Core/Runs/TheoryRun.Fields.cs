using System.Collections.Immutable;
using System.Diagnostics;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Estimates;
using ModeSolver.Matching;
using ModeSolver.Models;
using ModeSolver.Physics;
using ModeSolver.Report;
using ModeSolver.Results;
using ModeSolver.Spectra;

namespace ModeSolver.Runs;

/// <summary>The pivot stages of an n-field run.</summary>
/// <param name="Match">Matching result: N_*, V scale, H_* (the numbers of <see cref="PivotSolution"/>).</param>
/// <param name="Exact">Exact observables at the pivot (P_R as P_s; n_s, alpha_s, n_t by finite differences).</param>
/// <param name="SlowRoll">Slow-roll estimates at the pivot (the adiabatic Hubble-flow forms on the trajectory).</param>
/// <param name="Theory">The theory that was run.</param>
/// <param name="Fields0">The field values the background started from.</param>
public sealed record FieldPivotStage(PivotMatch Match, PivotValues Exact, SlowRollSet SlowRoll, IFieldTheory Theory, IReadOnlyList<double> Fields0)
{
    /// <summary>The adiabatic view of the n-field background at the matched V scale; null when a one-field theory ran the single-field path.</summary>
    public AdiabaticBackground? Background { get; init; }

    /// <summary>The isocurvature at the pivot; null for one field.</summary>
    public FieldIsocurvature? Isocurvature { get; init; }

    /// <summary>The single-field stage when the theory was a <see cref="SingleFieldTheory"/> (the same numbers as <see cref="TheoryRun.RunPivot(IInflatonTheory, RunRequest)"/>).</summary>
    public PivotStage? SingleField { get; init; }
}

public static partial class TheoryRun
{
    /// <summary>
    /// Runs every stage of a theory of any number of fields and returns the report. A <see cref="SingleFieldTheory"/>
    /// runs the single-field path (identical numbers to <see cref="Run(IInflatonTheory, RunRequest)"/>, with one value
    /// of <see cref="RunRequest.Fields0"/>/<see cref="RunRequest.Velocity0"/> standing for phi0/dphi0). Otherwise: the
    /// n-field background, its adiabatic view matched and normalised to A_s with the exact n-field P_R, the n x n modes
    /// across k, the slow-roll comparison on the adiabatic Hubble-flow parameters, and the report's
    /// <see cref="RunReport.Isocurvature"/>.
    /// </summary>
    /// <exception cref="ModeSolverException">physics that cannot be computed (exit code 3) or a theory that cannot be used (2); one-line message.</exception>
    public static RunReport Run(IFieldTheory theory, RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(request);
        if (theory is SingleFieldTheory single) return Run(single.Inner, SingleRequest(request));
        var clock = Stopwatch.StartNew();
        var stage = RunPivot(theory, request);
        return CompleteFields(stage, request, clock);
    }

    /// <summary>
    /// The rest of an n-field run from its pivot stage (<see cref="RunPivot(IFieldTheory, RunRequest)"/> of a theory of
    /// several fields): the modes across k, the slow-roll comparison, delta N and the trajectory. <paramref name="clock"/>,
    /// started before the pivot stage, times the whole run (null: from here).
    /// </summary>
    public static RunReport Complete(FieldPivotStage stage, RunRequest request, Stopwatch? clock = null)
    {
        ArgumentNullException.ThrowIfNull(stage);
        ArgumentNullException.ThrowIfNull(request);
        if (stage.Background is null) throw new ArgumentException("a one-field stage completes on the single-field path (Run)", nameof(stage));
        return CompleteFields(stage, request, clock ?? Stopwatch.StartNew());
    }

    /// <summary>The n-field background, the pivot matching and the exact pivot values (with the isocurvature) only.</summary>
    public static FieldPivotStage RunPivot(IFieldTheory theory, RunRequest request)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(request);
        if (theory is SingleFieldTheory single)
        {
            var s = RunPivot(single.Inner, SingleRequest(request));
            return new FieldPivotStage(s.Pivot.Numbers, s.Exact, s.SlowRoll, theory, [s.Phi0]) { SingleField = s };
        }
        if (request.StartEfolds is not null)
            throw new TheoryException($"a start given in e-folds before the end (start.efolds) is single-field only; give the {theory.FieldCount} start values of {string.Join(", ", theory.FieldNames)}");
        request.Stage?.Invoke("background");
        var fields = FieldBackgroundSolver.Solve(theory, BackgroundSettingsFor(request));
        var view = AdiabaticBackground.Of(fields);
        request.Stage?.Invoke("pivot matching");
        var match = PivotMatcher.MatchAny(view, PivotSettingsFor(request), new FieldAmplitude(view, Math.Min(request.Tolerance, 1e-6) * 0.01));
        var bg = view.WithVScale(match.VScale);
        var (exact, iso) = FieldPivotValues.Compute(bg, match.ToBackgroundUnits(match.KPivot), request.Tolerance);
        return new FieldPivotStage(match, exact, SlowRoll.AtN(bg, match.NPivot), theory, fields.FieldsAt(fields.NStart))
        {
            Background = bg, Isocurvature = iso,
        };
    }

    /// <summary>The request of a one-field theory given as n = 1: one value of Fields0/Velocity0 stands for Phi0/DPhi0.</summary>
    private static RunRequest SingleRequest(RunRequest r) => r with
    {
        Phi0 = r.Fields0 is { Count: 1 } f ? f[0] : r.Phi0,
        DPhi0 = r.Velocity0 is { Count: 1 } u ? u[0] : r.DPhi0,
        Fields0 = null,
        Velocity0 = null,
    };

    /// <summary>The stages after the pivot of an n-field run: modes across k, slow-roll comparison and flags, observables.</summary>
    private static RunReport CompleteFields(FieldPivotStage run, RunRequest request, Stopwatch clock)
    {
        var stages = ImmutableArray.CreateBuilder<StageTiming>();
        double last = 0;
        void Mark(string stage)
        {
            double now = clock.Elapsed.TotalSeconds;
            stages.Add(new StageTiming(stage, now - last));
            last = now;
        }
        Mark("background and matching");
        var m = run.Match;
        var bg = run.Background!;
        double unit = Math.Exp(m.LnKUnit);
        request.Stage?.Invoke("modes");
        var kr = new KWindow(request.KMin, request.KMax, request.Tolerance);
        var warnings = new List<string>(request.Warnings);
        if (bg.Fields.ContinuationNote is string stopped) warnings.Add(stopped);
        var served = new SpectrumSettings { KMin = kr.KMin * unit, KMax = kr.KMax * unit, Tolerance = kr.Tolerance };
        var (lo, hi) = SpectrumSolver.ServedRange(bg, served);
        // n-field modes start deeper than single-field ones (FieldModeIntegrator.MinimumStartDepth).
        var modeSettings = served.ModeSettings();
        lo *= Perturbations.FieldModeIntegrator.StartDepthFor(modeSettings) / modeSettings.EffectiveStartDepth;
        if (request.KMinIsDefault && lo / unit * 1.0001 > kr.KMin && lo / unit * 1.0001 < kr.KMax)
        {
            double servedLo = lo / unit * 1.0001;
            warnings.Add(string.Create(CultureInfo.InvariantCulture,
                $"the default k_min = {kr.KMin:G3} /Mpc is not served by this background: the spectrum starts at k = {servedLo:G4} /Mpc (start the fields further up the potential to reach it)"));
            kr = kr with { KMin = servedLo };
        }
        if (kr.KMin * unit < lo * (1 + 1e-12) || kr.KMax * unit > hi)
            throw new PhysicsException(string.Format(CultureInfo.InvariantCulture,
                "the k range [{0:G4}, {1:G4}] /Mpc is outside what this background serves at tolerance {4:G3}, [{2:G4}, {3:G4}] /Mpc (n-field modes start at least {5:G3} times inside the horizon after the background's start); narrow k_min/k_max, or start the fields further up the potential for smaller k",
                kr.KMin, kr.KMax, lo / unit * 1.0001, hi / unit * 0.9999, kr.Tolerance, Perturbations.FieldModeIntegrator.MinimumStartDepth));
        var fs = FieldSpectrumSolver.Compute(bg, kr.KMin * unit, kr.KMax * unit, Math.Max(request.KCount, 5), kr.Tolerance, request.Threads);
        var spectrum = fs.Spectrum;
        Mark("modes");

        request.Stage?.Invoke("slow-roll comparison");
        int count = spectrum.Count;
        var kMpc = new double[count];
        var ps1 = new double[count]; var pt1 = new double[count]; var ps2 = new double[count]; var pt2 = new double[count];
        var ns1 = new double[count]; var ns2 = new double[count];
        for (int i = 0; i < count; i++)
        {
            kMpc[i] = spectrum.K[i] / unit;
            var sr = SlowRoll.AtN(bg, bg.NAtHorizonExit(spectrum.K[i]));
            ps1[i] = sr.FirstOrder.Ps; pt1[i] = sr.FirstOrder.Pt; ns1[i] = sr.FirstOrder.Ns;
            ps2[i] = sr.SecondOrder.Ps; pt2[i] = sr.SecondOrder.Pt; ns2[i] = sr.SecondOrder.Ns;
        }
        var exact = run.Exact;
        double maxRelError = Math.Max(spectrum.MaxRelativeError, exact.ErrorEstimate);
        var pivotResults = new PivotResults(
            Ns: exact.Ns, AlphaS: exact.AlphaS, R: exact.R, Nt: exact.Nt, As: exact.Ps, KPivot: m.KPivot,
            NStar: m.NStar, PhiStar: m.PhiStar, HStar: m.HStar, EnergyScaleGeV: m.VStarQuarterGeV,
            VScale: m.VScale, NTotal: m.NTotal, NReh: m.NReh, MaxRelError: maxRelError,
            RhsEvaluationsPerMode: spectrum.MeanRhsEvaluationsPerMode)
        {
            Errors = exact.Errors,
            ToleranceMet = maxRelError <= kr.Tolerance,
        };
        if (maxRelError > kr.Tolerance) warnings.Add(ToleranceWarning(spectrum, kMpc, exact.ErrorEstimate, kr.Tolerance));
        var srSet = run.SlowRoll;
        var pivotSlowRoll = new PivotSlowRoll(srSet.FirstOrder, srSet.SecondOrder, srSet.Potential);
        var background = SampleBackground(bg, m.NPivot, m.LnKUnit, bg.Fields.ContinuationStop, kr, request.BackgroundSamples);
        var spectrumSamples = new SpectrumSamples(Imm(kMpc), Imm(spectrum.Ps), Imm(spectrum.Pt), Imm(spectrum.R),
            Imm(spectrum.Ns), Imm(spectrum.Nt), Imm(spectrum.AlphaS), Imm(spectrum.ErrorEstimate))
        {
            Tolerance = kr.Tolerance,
            ErrorBounded = ImmutableArray.Create(spectrum.ErrorBounded),
        };
        var srSpectra = new SlowRollSpectra(Imm(kMpc), Imm(ps1), Imm(pt1), Imm(ps2), Imm(pt2), Imm(ns1), Imm(ns2));
        var table = Table(spectrum, m.LnKUnit, kr, request.TablePointsPerDecade) with { H = request.TableH };
        if (Flags.PerturbativityWarning(spectrumSamples) is string nonPerturbative) warnings.Add(nonPerturbative);
        var flags = Flags.Evaluate(pivotResults, pivotSlowRoll, spectrumSamples, srSpectra, background, request.Flags);
        var derived = DeriveFields(request, m, spectrum);
        Mark("slow-roll comparison");

        Observables.ObservablesReport? observables = null;
        if (request.Observables.Any)
        {
            request.Stage?.Invoke("observables");
            double NAtExit(double k) => bg.TryNAtHorizonExit(k * unit, out double n) ? n : double.NaN;
            observables = Observables.ObservablesStage.Compute(Observables.ObservablesSource.From(spectrumSamples, pivotResults, NAtExit, bg.NEnd), request.Observables);
            Mark("observables");
        }

        request.Stage?.Invoke("delta N and trajectory");
        var (multiField, multiFlags) = MultiFieldStage.Compute(bg.Fields, BackgroundSettingsFor(request), bg.Origin, m.NPivot, m.VScale,
            background.WindowStart, exact.Ps, exact.Errors.As, m.KPivot);
        flags = flags.AddRange(multiFlags);
        Mark("delta N and trajectory");

        var iso = run.Isocurvature!;
        var modes = fs.Modes;
        ImmutableArray<double> Of(Func<Perturbations.FieldModeResult, double> get)
        {
            var a = new double[modes.Length];
            for (int i = 0; i < a.Length; i++) a[i] = get(modes[i]);
            return ImmutableArray.Create(a);
        }
        var isocurvature = new IsocurvatureResults(run.Theory.FieldCount,
            new IsocurvaturePivot(iso.Ps, iso.Crs, iso.CosDelta, iso.BetaIso, iso.Trs, iso.PrExit, iso.PsError),
            Imm(kMpc), Of(x => x.Ps), Of(x => x.Crs), Of(x => FieldIsocurvature.Resolved(x.Ps, x.Pr, kr.Tolerance) ? x.CosDelta : double.NaN), Of(x => x.BetaIso), Of(x => x.Trs), Of(x => x.PrExit));

        long rhs = 0;
        foreach (int r in spectrum.RhsEvaluations) rhs += r;
        var statistics = new RunStatistics(clock.Elapsed.TotalSeconds, stages.ToImmutable(), count, rhs,
            request.Threads > 0 ? request.Threads : Environment.ProcessorCount);
        var theory = run.Theory;
        var model = new ModelInfo("theory", theory.Description, theory.Description, theory.IsCanonical ? "1" : "(given by the theory)", null,
            ImmutableArray<ModelParameter>.Empty, TheoryFrame.Einstein);
        return new RunReport(model, ReportSettingsOf(request), pivotResults, pivotSlowRoll, background, spectrumSamples, srSpectra,
            table, flags, m.AmplitudeName, statistics, [.. warnings])
        { Derived = derived, Observables = observables, Isocurvature = isocurvature, MultiField = multiField };
    }

    /// <summary>T_reh, rho_end^(1/4) and r at 0.002 /Mpc of an n-field run (r from the spectrum when it covers 0.002 /Mpc).</summary>
    private static DerivedQuantities DeriveFields(RunRequest request, PivotMatch m, PrimordialSpectrum spectrum)
    {
        double kb = m.ToBackgroundUnits(DerivedQuantities.SecondPivotK);
        double r002 = double.NaN;
        string source;
        if (kb >= spectrum.K[0] && kb <= spectrum.K[^1])
        {
            r002 = spectrum.InterpolatePt(kb) / spectrum.InterpolatePs(kb);
            source = "spectrum";
        }
        else source = "unavailable: 0.002 /Mpc is outside the spectrum's k range (n-field runs take r there from the spectrum only)";
        bool given = request.PivotEfolds is null && request.Reheating.TRehGeV is not null;
        return new DerivedQuantities(m.TRehGeV, !given && double.IsFinite(m.TRehGeV),
            Math.Pow(m.RhoEnd, 0.25) * Constants.ReducedPlanckMassGeV, r002, source);
    }
}
