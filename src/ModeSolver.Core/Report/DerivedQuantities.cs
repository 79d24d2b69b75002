namespace ModeSolver.Report;

/// <summary>Quantities users quote beside the pivot values, derived from the matched background.</summary>
/// <param name="TRehGeV">Reheating temperature in GeV (NaN when N_* was given directly).</param>
/// <param name="TRehDerived">True when T_reh was computed (instantaneous reheating or a duration N_reh), false when given.</param>
/// <param name="RhoEndQuarterGeV">rho_end^(1/4) in GeV, rho_end = 3 H_end^2 at the end of inflation.</param>
/// <param name="R002">Tensor-to-scalar ratio r at k = 0.002 /Mpc (NaN when it cannot be obtained).</param>
/// <param name="R002Source">How <paramref name="R002"/> was obtained: "spectrum" (the exact spectrum, interpolated),
/// "mode" (one exact mode at 0.002 /Mpc, outside the spectrum's k range), or "unavailable: reason".</param>
public sealed record DerivedQuantities(double TRehGeV, bool TRehDerived, double RhoEndQuarterGeV, double R002, string R002Source)
{
    /// <summary>The second pivot scale of r, 1/Mpc (the one tensor bounds are often quoted at).</summary>
    public const double SecondPivotK = 0.002;
}
