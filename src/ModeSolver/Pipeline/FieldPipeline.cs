using System.Collections.Immutable;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Report;
using ModeSolver.Runs;

namespace ModeSolver.Pipeline;

/// <summary>The background of a several-field deck run: the theory it builds and the exact n-field background.</summary>
/// <param name="Theory">The n-field theory (<see cref="TheoryFactory.BuildFields"/>).</param>
/// <param name="Background">The exact background from the start to the end of inflation and on through the first oscillations.</param>
public sealed record FieldBackgroundRun(FormulaFieldTheory Theory, FieldBackgroundSolution Background);

/// <summary>
/// The deck adapter of several-field models (<see cref="ModelSpec.IsMultiField"/>): the resolved settings as an
/// <see cref="IFieldTheory"/> and its background settings (start values, velocities, end surface).
/// </summary>
public static class FieldPipeline
{
    /// <summary>The background settings of a several-field run: the start per field, the velocities (or the attractor) and the end surface.</summary>
    public static BackgroundSettings BackgroundSettingsFor(RunSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        if (!settings.Model.IsMultiField) throw new ArgumentException("not a several-field model", nameof(settings));
        return new BackgroundSettings
        {
            Fields0 = settings.Initial.Fields0,
            Velocity0 = settings.Initial.Velocity0,
            EndSurface = TheoryFactory.EndSurface(settings.Model),
        };
    }

    /// <summary>Builds the theory and solves its background.</summary>
    /// <exception cref="Physics.PhysicsException">physics that cannot be computed (one-line message naming the field values).</exception>
    public static FieldBackgroundRun RunBackground(RunSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var theory = TheoryFactory.BuildFields(settings.Model);
        return new FieldBackgroundRun(theory, FieldBackgroundSolver.Solve(theory, BackgroundSettingsFor(settings)));
    }

    /// <summary>
    /// The Core request of a several-field run: the one-field request of the settings (pivot, reheating, normalisation,
    /// k range, flags, observables, report options) with the start per field, the velocities and the end surface.
    /// </summary>
    public static RunRequest RequestFor(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        if (!settings.Model.IsMultiField) throw new ArgumentException("not a several-field model", nameof(settings));
        return SpectrumPipeline.RequestFor(settings, options) with
        {
            Phi0 = double.NaN,
            DPhi0 = null,
            StartEfolds = null,
            PhiEnd = null,
            Fields0 = settings.Initial.Fields0,
            Velocity0 = settings.Initial.Velocity0,
            EndSurface = TheoryFactory.EndSurface(settings.Model),
        };
    }

    /// <summary>The background, the pivot matching and the exact pivot values (with the isocurvature) of a several-field run.</summary>
    /// <exception cref="Physics.PhysicsException">physics that cannot be computed (one-line message).</exception>
    public static FieldPivotStage RunPivot(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        NoParameterSolve(settings);
        return TheoryRun.RunPivot(TheoryFactory.BuildFields(settings.Model), RequestFor(settings, options));
    }

    /// <summary>The whole several-field run (<see cref="TheoryRun.Run(IFieldTheory, RunRequest)"/>) with the deck's model description and settings list.</summary>
    /// <exception cref="Physics.PhysicsException">physics that cannot be computed (one-line message).</exception>
    public static RunReport Run(RunSettings settings, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new PipelineOptions();
        NoParameterSolve(settings);
        var theory = TheoryFactory.BuildFields(settings.Model);
        var flags = options.Flags ?? settings.Flags;
        var request = RequestFor(settings, options) with { Flags = flags };
        RunReport report;
        if (settings.Freeze is null) report = TheoryRun.Run(theory, request);
        else
        {
            var clock = System.Diagnostics.Stopwatch.StartNew();
            var stage = TheoryRun.RunPivot(theory, request);
            report = TheoryRun.Complete(stage, request, clock);
            options.Stage?.Invoke("one-field comparison");
            var frozen = FrozenReduction.Run(settings, stage, options);
            report = report with { Frozen = frozen, Flags = Diagnostics.FrozenReductionFlag.For(frozen, report.Pivot) is { } f ? report.Flags.Add(f) : report.Flags };
        }
        return report with { Model = ModelInfoFor(settings.Model, report.Pivot.VScale), Settings = SpectrumPipeline.ReportSettingsFor(settings, flags) };
    }

    // The model as run: the deck's formulas (the metric as its text form in the kinetic slot), parameters and frame.
    private static ModelInfo ModelInfoFor(ModelSpec spec, double vScale)
    {
        var parameters = ImmutableArray.CreateBuilder<ModelParameter>();
        foreach (var kv in spec.Parameters.OrderBy(kv => kv.Key, StringComparer.Ordinal))
            parameters.Add(new ModelParameter(kv.Key, kv.Value));
        string description = vScale == 1 ? spec.Describe()
            : string.Create(CultureInfo.InvariantCulture, $"{spec.Describe()}; V multiplied by V_scale = {vScale:G8}");
        var frame = spec.Coupling is null ? TheoryFrame.Einstein : spec.Palatini ? TheoryFrame.JordanPalatini : TheoryFrame.JordanMetric;
        string metric = spec.Metric is { } m ? "[" + FormulaMatrix.Format(m) + "]" : "identity";
        return new ModelInfo(spec.CatalogueId ?? "formula", description, spec.Potential, metric, spec.Coupling, parameters.ToImmutable(), frame);
    }

    /// <summary>The one-line refusal of a one-field stage asked for a several-field model (the pivot-only sweeps and native pivot calls).</summary>
    public static DeckException NotYet(RunSettings settings, string what)
    {
        ArgumentNullException.ThrowIfNull(settings);
        return new DeckException($"{settings.DeckPath ?? "command line"}: {what} of a model of {settings.Model.FieldCount} fields ({string.Join(", ", settings.Model.Fields!)}) is not available; `modesolver background` and `modesolver spectrum` run it", "model.fields");
    }

    private static void NoParameterSolve(RunSettings settings)
    {
        if (settings.Amplitude.SolveFor is string name)
            throw new DeckException($"{settings.DeckPath ?? "command line"}: normalisation.solve_for = {name} is one-field only; a model of {settings.Model.FieldCount} fields is normalised by rescaling V", "normalisation.solve_for");
    }
}
