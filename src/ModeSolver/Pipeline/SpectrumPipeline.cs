using System.Collections.Immutable;
using System.Diagnostics;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Bispectrum;
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
using ModeSolver.Runs;

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

/// <summary>The pivot-only result of a deck run: the Core pivot stages and the settings as run.</summary>
/// <param name="Stage">The Core result (<see cref="TheoryRun.RunPivot(ModeSolver.Models.IInflatonTheory, RunRequest)"/>): matching, exact pivot values, slow roll.</param>
/// <param name="Theory">The theory built from the settings.</param>
public sealed record PivotRun(PivotStage Stage, IValidatedTheory Theory)
{
    /// <summary>
    /// The settings as run: phi0 of the background actually used (solved when the start was given in e-folds) and the
    /// solved parameter value when normalised by a parameter; the input settings otherwise.
    /// </summary>
    public required RunSettings Settings { get; init; }

    /// <summary>Matching result: N_*, V scale, H_*, the scaled background.</summary>
    public PivotSolution Pivot => Stage.Pivot;

    /// <summary>Exact observables at the pivot.</summary>
    public PivotValues Exact => Stage.Exact;

    /// <summary>Slow-roll estimates at the pivot.</summary>
    public SlowRollSet SlowRoll => Stage.SlowRoll;
}

/// <summary>
/// The deck adapter of the pipeline: resolved settings -> theory (<see cref="TheoryFactory"/>) and a
/// <see cref="RunRequest"/> -> <see cref="TheoryRun"/> in Core, plus what only a deck has (normalisation by a model
/// parameter, the model's formula text and the deck's settings list in the report).
/// </summary>
public static class SpectrumPipeline
{
    /// <summary>Runs the theory, background and matching stages and the exact pivot mode only.</summary>
    /// <exception cref="PhysicsException">physics that cannot be computed (one-line message).</exception>
    /// <exception cref="DeckException">settings that are invalid for this theory.</exception>
    public static PivotRun RunPivot(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new PipelineOptions();
        if (settings.Model.IsMultiField) throw FieldPipeline.NotYet(settings, "the one-field pivot record (PivotRun)");
        if (settings.Amplitude.SolveFor is not null)
        {
            options.Stage?.Invoke("background");
            options.Stage?.Invoke("normalisation by " + settings.Amplitude.SolveFor);
            double tolerance = settings.KRange.Tolerance;
            var solved = ParameterNormalisation.Solve(settings, SolveBackground, tolerance);
            return new PivotRun(TheoryRun.AtPivot(solved.Theory, solved.Background, solved.Pivot, tolerance), solved.Theory) { Settings = solved.Settings };
        }
        var theory = TheoryFactory.Build(settings);
        var stage = TheoryRun.RunPivot(theory, RequestFor(settings, options));
        var used = settings.Initial.StartEfolds is null ? settings
            : settings with { Initial = settings.Initial with { Phi0 = stage.Phi0 } };
        return new PivotRun(stage, theory) { Settings = used };
    }

    /// <summary>
    /// The exact background of the settings: from phi0, or, for a start given in e-folds before the end, from the field
    /// value whose exact background inflates that many e-folds (<see cref="TheoryRun.SolveBackground"/>).
    /// </summary>
    public static BackgroundSolution SolveBackground(IValidatedTheory theory, RunSettings settings) =>
        TheoryRun.SolveBackground(theory, RequestFor(settings));

    /// <summary>Runs the whole pipeline and returns the report (no files are written here).</summary>
    /// <exception cref="PhysicsException">physics that cannot be computed (one-line message).</exception>
    /// <exception cref="DeckException">settings that are invalid for this theory.</exception>
    public static RunReport Run(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new PipelineOptions();
        if (settings.Model.IsMultiField) return FieldPipeline.Run(settings, options);
        var clock = Stopwatch.StartNew();
        var run = RunPivot(settings, options);
        var flagSettings = options.Flags ?? settings.Flags;
        settings = run.Settings;
        var report = TheoryRun.Complete(run.Stage, RequestFor(settings, options) with { Flags = flagSettings }, clock);
        return report with
        {
            Model = ModelInfoFor(settings, run.Theory, run.Pivot.VScale),
            Settings = ReportSettingsFor(settings, flagSettings),
        };
    }

    /// <summary>
    /// The Core request of resolved settings and pipeline options: start, pivot, reheating, normalisation, k range,
    /// flags, observables and the report options, as numbers (the model itself goes to <see cref="TheoryFactory"/>).
    /// </summary>
    public static RunRequest RequestFor(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new PipelineOptions();
        var p = settings.Pivot;
        var reheating = p.Reheating.Kind switch
        {
            ReheatingKind.Temperature => ReheatingHistory.WithTemperature(p.Reheating.W, p.Reheating.TemperatureGeV!.Value),
            ReheatingKind.Efolds => ReheatingHistory.WithEFolds(p.Reheating.W, p.Reheating.Efolds!.Value),
            _ => ReheatingHistory.Instantaneous,
        };
        var kr = settings.KRange;
        return new RunRequest
        {
            Phi0 = settings.Initial.Phi0,
            DPhi0 = settings.Initial.DPhi0,
            StartEfolds = settings.Initial.StartEfolds,
            PhiEnd = settings.Model.PhiEnd,
            KPivot = p.KPivot,
            PivotEfolds = p.Efolds,
            Reheating = reheating,
            ReheatingDof = p.Reheating.Dof,
            ScalarAmplitude = settings.Amplitude.ScalarAmplitude,
            KMin = kr.KMin,
            KMax = kr.KMax,
            KCount = kr.Count,
            Tolerance = kr.Tolerance,
            KMinIsDefault = kr.KMinIsDefault,
            Flags = options.Flags ?? settings.Flags,
            Observables = settings.Observables,
            Bispectrum = BispectrumRequestFor(settings),
            TableH = settings.Output.TableH,
            Threads = options.Threads,
            BackgroundSamples = options.BackgroundSamples,
            TablePointsPerDecade = options.TablePointsPerDecade,
            Warnings = settings.Warnings,
            Stage = options.Stage,
        };
    }

    /// <summary>The bispectrum stage the settings ask for: on when any key of [bispectrum] was given; null otherwise.</summary>
    public static BispectrumRequest? BispectrumRequestFor(RunSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var v = settings.Values;
        double? points = v.Number("bispectrum.equilateral"), ratio = v.Number("bispectrum.squeezed_ratio"), grid = v.Number("bispectrum.shape_grid"),
            flag = v.Number("bispectrum.flag_threshold"), tol = v.Number("bispectrum.tolerance"), start = v.Number("bispectrum.start_depth");
        var triangles = TriangleList.Parse(settings.BispectrumTriangles);
        if (points is null && ratio is null && grid is null && flag is null && tol is null && start is null && triangles.Count == 0) return null;
        var defaults = new BispectrumRequest();
        return new BispectrumRequest
        {
            EquilateralPoints = (int)(points ?? 0),
            SqueezedRatio = ratio ?? defaults.SqueezedRatio,
            ShapeGrid = (int)(grid ?? 0),
            FlagThreshold = flag ?? defaults.FlagThreshold,
            Triangles = [.. triangles.Select(t => new Triangle(t.K1, t.K2, t.K3))],
            Numerics = defaults.Numerics with { Tolerance = tol ?? defaults.Numerics.Tolerance, StartDepth = start ?? defaults.Numerics.StartDepth },
        };
    }

    /// <summary>T_reh, rho_end^(1/4) and r at 0.002 /Mpc of a deck run (<see cref="TheoryRun.Derive"/>).</summary>
    public static DerivedQuantities Derive(RunSettings settings, PivotSolution pivot, PrimordialSpectrum? spectrum, KRangeSpec kr)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(kr);
        return TheoryRun.Derive(RequestFor(settings) with { Tolerance = kr.Tolerance }, pivot, spectrum);
    }

    /// <summary>The background settings a run deck asks for.</summary>
    public static BackgroundSettings BackgroundSettingsFor(RunSettings settings) => TheoryRun.BackgroundSettingsFor(RequestFor(settings));

    /// <summary>The pivot-matching settings a run deck asks for.</summary>
    public static PivotSettings PivotSettingsFor(RunSettings settings) => TheoryRun.PivotSettingsFor(RequestFor(settings));

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
        var parameters = ImmutableArray.CreateBuilder<Models.ModelParameter>();
        foreach (var kv in spec.Parameters.OrderBy(kv => kv.Key, StringComparer.Ordinal))
            parameters.Add(new Models.ModelParameter(kv.Key, kv.Value));
        if (NormalisedParameters.LambdaOverXiSquared(spec, spec.Parameters) is double lx)
            description += string.Create(CultureInfo.InvariantCulture, $" (lambda/xi^2 = {lx:G6})");
        return new ModelInfo(spec.CatalogueId ?? "formula", description, spec.Potential, spec.Kinetic ?? "1",
            spec.Coupling, parameters.ToImmutable(), frame);
    }

    // The settings list the outputs record, made from the settings schema (SettingsSchema.ReportEntries).
    internal static ReportSettings ReportSettingsFor(RunSettings s, FlagSettings flags)
    {
        var e = ImmutableArray.CreateBuilder<Setting>();
        foreach (var (key, value, number) in SettingsSchema.ReportEntries(s)) e.Add(new Setting(key, value, number));
        return new ReportSettings(e.ToImmutable(), flags);
    }

}
