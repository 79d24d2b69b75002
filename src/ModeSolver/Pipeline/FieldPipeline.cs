using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;

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

    /// <summary>The one-line refusal of a stage that has no several-field form yet (the spectrum, the frame map, sweeps).</summary>
    public static DeckException NotYet(RunSettings settings, string what)
    {
        ArgumentNullException.ThrowIfNull(settings);
        return new DeckException($"{settings.DeckPath ?? "command line"}: {what} of a model of {settings.Model.FieldCount} fields ({string.Join(", ", settings.Model.Fields!)}) is not available yet; `modesolver background` solves its background", "model.fields");
    }
}
