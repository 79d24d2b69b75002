namespace ModeSolver.Spectra;

/// <summary>
/// Estimated absolute errors of the exact pivot quantities, each in the quantity's own units (A_s absolute too, so
/// every entry reads as "value +- error"). NaN when not estimated.
/// </summary>
/// <param name="As">Error of A_s = P_s(k_*).</param>
/// <param name="Ns">Error of n_s.</param>
/// <param name="AlphaS">Error of alpha_s.</param>
/// <param name="R">Error of r.</param>
/// <param name="Nt">Error of n_t.</param>
public sealed record PivotErrors(double As, double Ns, double AlphaS, double R, double Nt)
{
    /// <summary>Not estimated (all NaN).</summary>
    public static PivotErrors Unknown { get; } = new(double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);
}
