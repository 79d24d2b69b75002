using ModeSolver.Integrators;
using ModeSolver.Models;

namespace ModeSolver.Background;

/// <summary>Inputs of one background integration. Field values are in the user's field, M_pl = 1.</summary>
public sealed record BackgroundSettings
{
    /// <summary>Initial field value of a single-field run (NaN when not given; n-field runs give <see cref="Fields0"/>).</summary>
    public double Phi0 { get; init; } = double.NaN;

    /// <summary>Initial d phi / dN; null starts on the slow-roll attractor phi' = -V_phi / (K V).</summary>
    public double? DPhi0 { get; init; }

    /// <summary>
    /// Initial field values phi^I of an n-field run, in field order (null: the single-field <see cref="Phi0"/>). With one
    /// entry it takes the place of <see cref="Phi0"/>.
    /// </summary>
    public IReadOnlyList<double>? Fields0 { get; init; }

    /// <summary>
    /// Initial d phi^I / dN of an n-field run (null: the slow-roll attractor direction -G^IJ V_J / V, physics.md section 7;
    /// for one field <see cref="DPhi0"/> when given).
    /// </summary>
    public IReadOnlyList<double>? Velocity0 { get; init; }

    /// <summary>
    /// When set, inflation ends where the fields cross this surface g(phi) = 0 (in its <see cref="FieldSurface.Crossing"/>
    /// direction) and the integration stops there; takes the place of <see cref="PhiEnd"/>.
    /// </summary>
    public FieldSurface? EndSurface { get; init; }

    /// <summary>Relative tolerance of the integration (absolute tolerance is a hundredth of it).</summary>
    public double Tolerance { get; init; } = 1e-10;

    /// <summary>Give up when no end is found within this many e-folds (the largest background computed; not a deck key).</summary>
    public double MaxEFolds { get; init; } = 5000;

    /// <summary>E-folds to continue after the end of inflation (through the first oscillations). 0 stops at the end.</summary>
    public double EFoldsAfterEnd { get; init; } = 2;

    /// <summary>
    /// When set, inflation ends abruptly when phi reaches this value (for models that never end by themselves);
    /// the integration stops there.
    /// </summary>
    public double? PhiEnd { get; init; }

    /// <summary>
    /// Which upward epsilon_1 = 1 crossing is the end of inflation: 0 the first, 1 the second, ..., -1 the last
    /// (default), -2 the one before, ...
    /// </summary>
    public int EndCrossing { get; init; } = -1;

    /// <summary>
    /// After epsilon_1 has risen through 1, a fall back below 1 counts as inflation resuming only when epsilon_1 then stays
    /// below 1 for this many e-folds; shorter dips (the accelerating moments of post-inflationary oscillations) are not
    /// reported as crossings.
    /// </summary>
    public double ReentryEFolds { get; init; } = 1.0;

    /// <summary>Method for the inflationary part; null uses the default explicit high-order method.</summary>
    public IOdeMethod? InflationMethod { get; init; }

    /// <summary>Method for the continuation after the end (oscillations); null uses the explicit/implicit switching method.</summary>
    public IOdeMethod? ReheatingMethod { get; init; }

    /// <summary>
    /// Largest step in e-folds. Keeps the dense output accurate and the explicit method inside its stability region on the
    /// attractor (perturbations off it decay like exp(-3N)).
    /// </summary>
    public double MaxStep { get; init; } = 0.5;

    /// <summary>Step budget of each integration segment.</summary>
    public int MaxSteps { get; init; } = 2_000_000;
}
