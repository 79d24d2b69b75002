using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// The Bunch-Davies data of one field direction with z = a and a given mass m^2/H^2 (friction 3 - e1): the
/// decoupled-oscillator data of <see cref="DecoupledModeSystem"/> with the local index from U = 2 - e1 - m^2/H^2.
/// Used only for its <see cref="DecoupledModeSystem.Vacuum"/>.
/// </summary>
internal sealed class MassiveFieldData : DecoupledModeSystem
{
    /// <summary>m^2/H^2 of the direction.</summary>
    public double Mass2 { get; set; }

    /// <inheritdoc />
    public override string Name => "massive";

    /// <inheritdoc />
    public override bool GrowsOutsideHorizon => false;

    /// <inheritdoc />
    public override double Friction(in BackgroundPoint p) => 3.0 - p.Epsilon1;

    /// <inheritdoc />
    public override double FrictionSlope(in BackgroundPoint p) => -(p.Epsilon1 * p.Epsilon2);

    /// <inheritdoc />
    public override void Rhs(in BackgroundPoint p, double x2, ReadOnlySpan<double> y, Span<double> dy) =>
        Rhs(Friction(p), FrictionSlope(p), p.Epsilon1, x2, y, dy);

    /// <inheritdoc />
    public override double LocalIndex(in BackgroundPoint p) => IndexFrom(2.0 - p.Epsilon1 - Mass2, 1.0 - p.Epsilon1);

    /// <summary>ln(sqrt(-tau)/z) with z = a.</summary>
    protected override double LnAmplitude(in VacuumPoint v) => v.LnBase;

    /// <summary>z'/z = 1.</summary>
    protected override double ZPrimeOverZ(in BackgroundPoint p) => 1.0;

    /// <inheritdoc />
    protected override double PowerDivisor => 1.0;
}
