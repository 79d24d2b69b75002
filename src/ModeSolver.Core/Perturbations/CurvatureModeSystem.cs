using ModeSolver.Background;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// The single-field comoving curvature perturbation zeta = v/z, z = a sqrt(2 e1) (physics.md 3):
/// zeta'' + (3 - e1 + e2) zeta' + x^2 zeta = 0. No e3 in the equation, and zeta, zeta' stay continuous where V_phi
/// jumps (e2 jumps but stays finite). P_s = k^3 |zeta|^2 / (2 pi^2).
/// </summary>
internal sealed class CurvatureModeSystem : DecoupledModeSystem
{
    /// <summary>Block name.</summary>
    public const string BlockName = "zeta";

    /// <inheritdoc />
    public override string Name => BlockName;

    /// <summary>Yes: ultra-slow roll (F &lt; 0) amplifies a super-horizon zeta'.</summary>
    public override bool GrowsOutsideHorizon => true;

    /// <inheritdoc />
    public override double Friction(in BackgroundPoint p) => 3.0 - p.Epsilon1 + p.Epsilon2;

    /// <summary>dF/dN = -e1 e2 + e2 e3.</summary>
    public override double FrictionSlope(in BackgroundPoint p) => -(p.Epsilon1 * p.Epsilon2) + p.Epsilon2 * p.Epsilon3;

    /// <inheritdoc />
    public override void Rhs(in BackgroundPoint p, double x2, ReadOnlySpan<double> y, Span<double> dy) =>
        Rhs(Friction(p), FrictionSlope(p), p.Epsilon1, x2, y, dy);

    /// <inheritdoc />
    public override double LocalIndex(in BackgroundPoint p) => IndexOf(p.Epsilon1, p.Epsilon2, p.Epsilon3);

    /// <summary>Local index of the zeta mode from the Hubble-flow parameters (physics.md 3).</summary>
    internal static double IndexOf(double e1, double e2, double e3) =>
        IndexFrom(2.0 - e1 + 1.5 * e2 - 0.5 * e1 * e2 + 0.25 * e2 * e2 + 0.5 * e2 * e3, 1.0 - e1);

    /// <inheritdoc />
    protected override void CheckVacuum(in VacuumPoint v)
    {
        double e1 = v.Background.Epsilon1;
        if (!(e1 > 0)) throw new PhysicsException($"scalar modes need epsilon_1 > 0 (found {e1:G4} at N = {v.Background.N:G8}); use tensor modes only on de Sitter");
    }

    /// <summary>ln(sqrt(-tau)/z) with z = a sqrt(2 e1).</summary>
    protected override double LnAmplitude(in VacuumPoint v) => v.LnBase - 0.5 * Math.Log(2.0 * v.Background.Epsilon1);

    /// <summary>z'/z = 1 + e2/2.</summary>
    protected override double ZPrimeOverZ(in BackgroundPoint p) => 1.0 + 0.5 * p.Epsilon2;

    /// <summary>P_s = k^3 |zeta|^2 / (2 pi^2).</summary>
    protected override double PowerDivisor => 2.0 * Math.PI * Math.PI;
}
