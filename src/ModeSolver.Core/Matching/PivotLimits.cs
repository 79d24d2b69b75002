using ModeSolver.Physics;

namespace ModeSolver.Matching;

/// <summary>
/// Bounds that hold for every model when N_* is computed from reheating, so that the deck check can refuse at once what
/// the matching can never do (physics.md section 5). They use only H_* &gt;= H_end (H falls during inflation),
/// epsilon_1 &lt;= 1 at the pivot, rho_end &gt;= rho_reh (T_reh &lt;= T_end) and T_reh &gt;= the nucleosynthesis limit
/// <see cref="ReheatingHistory.MinimumTemperatureGeV"/>; the first-order estimate A_s = H_*^2/(8 pi^2 epsilon_1) ties
/// them to the amplitude, with a margin of <see cref="AmplitudeMargin"/> for the difference of the exact spectrum from
/// that estimate. Values inside the bounds may still fail for a given model (a clear physics error, exit 3).
/// </summary>
public static class PivotLimits
{
    /// <summary>Factor allowed between the exact A_s and its first-order estimate H_*^2/(8 pi^2 epsilon_1) (a safety margin, not a derived bound).</summary>
    public const double AmplitudeMargin = 10;

    /// <summary>Smallest A_s accepted at all: below it the spectra leave the normal double-precision range.</summary>
    public const double MinScalarAmplitude = 1e-300;

    /// <summary>
    /// Smallest A_s any model can be normalised to when N_* comes from reheating: A_s &gt;= H_end^2/(8 pi^2) =
    /// rho_end/(24 pi^2) &gt;= rho(T_min)/(24 pi^2), divided by <see cref="AmplitudeMargin"/>.
    /// </summary>
    /// <param name="dof">Relativistic degrees of freedom at reheating, g_reh.</param>
    public static double MinScalarAmplitudeFromReheating(double dof)
        => PivotMatcher.RadiationDensity(ReheatingHistory.MinimumTemperatureGeV, dof) / (24 * Math.PI * Math.PI) / AmplitudeMargin;

    /// <summary>
    /// Largest pivot (1/Mpc) that can leave the horizon during inflation when N_* comes from reheating and the spectrum is
    /// normalised to <paramref name="scalarAmplitude"/>: k_* = a_* H_* &lt;= a_reh H_* with
    /// a_reh = (g_s0/g_s,reh)^(1/3) T_0/T_reh &lt;= (g_s0/g_s,reh)^(1/3) T_0/T_min and H_*^2 &lt;= 8 pi^2 A_s (times the margin).
    /// </summary>
    /// <param name="scalarAmplitude">Target A_s.</param>
    /// <param name="dof">Entropy degrees of freedom at reheating, g_s,reh.</param>
    public static double MaxPivotFromReheating(double scalarAmplitude, double dof)
    {
        double hStar = Math.PI * Math.Sqrt(8 * scalarAmplitude * AmplitudeMargin);
        double aReh = Math.Cbrt(Constants.EntropyDofToday / dof) * Constants.CmbTemperatureGeV / ReheatingHistory.MinimumTemperatureGeV;
        return aReh * hStar * Constants.ReducedPlanckMassGeV * Constants.GeVInInverseMpc;
    }

    /// <summary>Smallest V(phi0) in reduced Planck units accepted: a margin of some 50 decades above double-precision underflow for the fall of V along the trajectory and its rescaling to A_s.</summary>
    public const double MinPotential = 1e-250;
}
