using System.Collections.Immutable;

namespace ModeSolver.Results;

/// <summary>
/// The isocurvature of an n-field run (physics.md 7), at the end of inflation (or where the mode froze with the
/// isocurvature decayed): at the pivot and per k of the spectrum. Null in the report of a single-field run.
/// </summary>
/// <param name="FieldCount">Number of fields n.</param>
/// <param name="Pivot">Values at k_*.</param>
/// <param name="K">Wavenumbers, 1/Mpc (those of the exact spectrum).</param>
/// <param name="Ps">P_S per k.</param>
/// <param name="Crs">C_RS per k (NaN for n &gt; 2).</param>
/// <param name="CosDelta">cos Delta = C_RS / sqrt(P_R P_S) per k; NaN where P_S is below (10 tol)^2 P_R (not resolved).</param>
/// <param name="BetaIso">beta_iso = P_S / (P_R + P_S) per k.</param>
/// <param name="Trs">T_RS per k, from P_R(end) = P_R(exit) (1 + T_RS^2).</param>
/// <param name="PrExit">P_R at horizon exit per k (three e-folds after k = aH, de Sitter decay divided out).</param>
public sealed record IsocurvatureResults(
    int FieldCount,
    IsocurvaturePivot Pivot,
    ImmutableArray<double> K,
    ImmutableArray<double> Ps,
    ImmutableArray<double> Crs,
    ImmutableArray<double> CosDelta,
    ImmutableArray<double> BetaIso,
    ImmutableArray<double> Trs,
    ImmutableArray<double> PrExit);

/// <summary>The isocurvature at the pivot.</summary>
/// <param name="Ps">P_S at k_*.</param>
/// <param name="Crs">C_RS at k_* (NaN for n &gt; 2).</param>
/// <param name="CosDelta">cos Delta at k_*; NaN where P_S is not resolved (<paramref name="PsError"/> at least P_S).</param>
/// <param name="BetaIso">beta_iso at k_*.</param>
/// <param name="Trs">T_RS at k_* (not resolved below about 1e-2: see FieldModeIntegrator.ExitEFolds).</param>
/// <param name="PrExit">P_R at the pivot's horizon exit.</param>
/// <param name="PsError">Estimated absolute error of P_S.</param>
public sealed record IsocurvaturePivot(double Ps, double Crs, double CosDelta, double BetaIso, double Trs, double PrExit, double PsError);
