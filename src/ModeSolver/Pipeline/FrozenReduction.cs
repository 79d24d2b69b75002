using System.Collections.Immutable;
using ModeSolver.Decks;
using ModeSolver.Results;
using ModeSolver.Runs;

namespace ModeSolver.Pipeline;

/// <summary>
/// `[compare] freeze`: the one-field model of a several-field deck with the named fields held fixed. The frozen fields
/// are held at their values on the n-field trajectory at the pivot's horizon exit (not at the potential's minimum):
/// that is the single-field model a user would write for the observable epoch (the one the heavy-field argument
/// justifies: a heavy field tracks its instantaneous minimum, which is where it sits at exit), it is defined for every
/// potential (a minimum in the frozen direction need not exist, e.g. on a slope or a flat direction) and, for a field
/// already at its minimum, the two choices coincide. The free field starts where it starts in the n-field run; V,
/// Omega^2 and the free field's G_ff (K_J in the Jordan frame) are the deck's formulas with the frozen fields as
/// parameters, so the one-field theory is the n-field one restricted exactly to the frozen values; the pivot,
/// reheating and normalisation are the deck's.
/// </summary>
public static class FrozenReduction
{
    /// <summary>Runs the one-field model's pivot stages; the n-field <paramref name="stage"/> gives the frozen values.</summary>
    /// <remarks>A one-field model whose physics cannot be computed gives a comparison with NaN numbers and a <see cref="FrozenComparison.Note"/>.</remarks>
    public static FrozenComparison Run(RunSettings settings, FieldPivotStage stage, PipelineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(stage);
        var frozenNames = settings.Freeze ?? throw new ArgumentException("no [compare] freeze fields", nameof(settings));
        var bg = stage.Background ?? throw new ArgumentException("a several-field stage is needed", nameof(stage));
        double[] atExit = bg.Fields.FieldsAt(stage.Match.NPivot + bg.Origin);
        var one = OneFieldSettings(settings, atExit, stage.Fields0, out var values, out string free);
        PivotRun run;
        try
        {
            run = SpectrumPipeline.RunPivot(one, options);
        }
        catch (Physics.PhysicsException e)
        {
            // The n-field results stand; the comparison says why it has no numbers (e.g. a frozen field's share of V
            // keeps the one-field potential from reaching zero, so its inflation never ends).
            return FrozenComparison.NotRun([.. frozenNames], values, free, $"the one-field model ({free} rolling, {string.Join(", ", frozenNames)} frozen at the pivot's exit) cannot be run: {e.Message}");
        }
        var x = run.Exact;
        return new FrozenComparison([.. frozenNames], values, free, x.Ns, x.Errors.Ns, x.R, x.Errors.R, x.Ps, run.Pivot.NStar);
    }

    /// <summary>The deck's settings as a one-field model: the frozen fields become parameters at their values in <paramref name="fieldValues"/>.</summary>
    public static RunSettings OneFieldSettings(RunSettings settings, IReadOnlyList<double> fieldValues, IReadOnlyList<double> start,
        out ImmutableArray<double> frozenValues, out string free)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(fieldValues);
        ArgumentNullException.ThrowIfNull(start);
        var model = settings.Model;
        var fields = model.Fields!;
        var frozen = settings.Freeze!;
        var parameters = new Dictionary<string, double>(model.Parameters, StringComparer.Ordinal);
        var values = ImmutableArray.CreateBuilder<double>(frozen.Count);
        int freeIndex = -1;
        for (int i = 0; i < fields.Count; i++)
        {
            if (frozen.Contains(fields[i]))
            {
                parameters[fields[i]] = fieldValues[i];
                values.Add(fieldValues[i]);
            }
            else freeIndex = i;
        }
        free = fields[freeIndex];
        frozenValues = values.MoveToImmutable();
        string? kinetic = model.Metric is { } m ? m[freeIndex][freeIndex] : null;
        var spec = new ModelSpec(null, model.Potential, kinetic, model.Coupling, model.Palatini, parameters, null) { Fields = [free] };
        return settings with
        {
            Model = spec,
            Initial = new InitialConditions(start[freeIndex], null),
            Freeze = null,
        };
    }
}
