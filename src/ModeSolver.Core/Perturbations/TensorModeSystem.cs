using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// One polarisation of the tensor mode h = 2u/a (z = a/2): h'' + (3 - e1) h' + x^2 h = 0 (physics.md 3).
/// P_t = 8 k^3 |u/a|^2/(2 pi^2) = k^3 |h|^2 / pi^2, both polarisations.
/// </summary>
internal sealed class TensorModeSystem : DecoupledModeSystem
{
    /// <summary>Block name.</summary>
    public const string BlockName = "tensor";

    /// <inheritdoc />
    public override string Name => BlockName;

    /// <summary>No: the friction 3 - e1 stays above 2 while inflating.</summary>
    public override bool GrowsOutsideHorizon => false;

    /// <inheritdoc />
    public override double Friction(in BackgroundPoint p) => 3.0 - p.Epsilon1;

    /// <summary>dF/dN = -e1 e2.</summary>
    public override double FrictionSlope(in BackgroundPoint p) => -(p.Epsilon1 * p.Epsilon2);

    /// <inheritdoc />
    public override void Rhs(in BackgroundPoint p, double x2, ReadOnlySpan<double> y, Span<double> dy) =>
        Rhs(Friction(p), FrictionSlope(p), p.Epsilon1, x2, y, dy);

    /// <inheritdoc />
    public override double LocalIndex(in BackgroundPoint p) => IndexOf(p.Epsilon1);

    /// <summary>Local index of the tensor mode.</summary>
    internal static double IndexOf(double e1) => IndexFrom(2.0 - e1, 1.0 - e1);

    /// <summary>ln(sqrt(-tau)/z) with z = a/2.</summary>
    protected override double LnAmplitude(in VacuumPoint v) => v.LnBase + Math.Log(2.0);

    /// <summary>z'/z = 1 (h' = 2(u' - u)/a).</summary>
    protected override double ZPrimeOverZ(in BackgroundPoint p) => 1.0;

    /// <summary>P_t = k^3 |h|^2 / pi^2.</summary>
    protected override double PowerDivisor => Math.PI * Math.PI;
}
