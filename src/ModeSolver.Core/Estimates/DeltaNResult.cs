using System.Collections.Immutable;

namespace ModeSolver.Estimates;

/// <summary>
/// The separate-universe (delta N) result at one horizon-exit time (physics.md section 7), in background units (the
/// unscaled potential: P_zeta scales with V, f_NL does not). Every error is a bound built from the Richardson step-halving
/// difference and the measured integration error of N (see <see cref="DeltaN"/>).
/// </summary>
/// <param name="ExitN">N (since the background's start) of the flat slice at horizon exit.</param>
/// <param name="H">H at exit of the unperturbed background.</param>
/// <param name="Epsilon1">epsilon_1 at exit.</param>
/// <param name="NRemaining">E-folds from the exit slice to the final slice of the unperturbed universe as re-solved.</param>
/// <param name="Gradient">N_I (n entries).</param>
/// <param name="GradientError">Error bound of each N_I.</param>
/// <param name="CoordinateHessian">The partial derivatives d_I d_J N (n x n, row-major).</param>
/// <param name="Hessian">The covariant N_;IJ = d_I d_J N - Gamma^K_IJ N_K (n x n, row-major).</param>
/// <param name="HessianError">Error bound of each entry of N_;IJ (of d_I d_J N: the same without the Christoffel part).</param>
/// <param name="Pzeta">(H/2 pi)^2 G^IJ N_I N_J.</param>
/// <param name="PzetaError">Error bound of <paramref name="Pzeta"/> from the N_I bounds.</param>
/// <param name="FNL">f_NL^local = (5/6) N^I N^J N_;IJ / (N_K N^K)^2.</param>
/// <param name="FNLError">Error bound of f_NL from the N_I and N_;IJ bounds.</param>
/// <param name="NIntegrationError">The integration error of one N (twice the change at a tenfold tighter tolerance).</param>
/// <param name="SliceH">H of the final slice (NaN for <see cref="DeltaNSlice.EndOfInflation"/>).</param>
/// <param name="Steps">The coordinate steps h_I of the coarse level (the fine level halves them).</param>
/// <param name="Velocity">The start velocity used.</param>
/// <param name="Slice">The final slice used.</param>
/// <param name="Backgrounds">How many backgrounds were solved.</param>
public sealed record DeltaNResult(
    double ExitN,
    double H,
    double Epsilon1,
    double NRemaining,
    ImmutableArray<double> Gradient,
    ImmutableArray<double> GradientError,
    ImmutableArray<double> CoordinateHessian,
    ImmutableArray<double> Hessian,
    ImmutableArray<double> HessianError,
    double Pzeta,
    double PzetaError,
    double FNL,
    double FNLError,
    double NIntegrationError,
    double SliceH,
    ImmutableArray<double> Steps,
    ExitVelocity Velocity,
    DeltaNSlice Slice,
    int Backgrounds)
{
    /// <summary>The number of fields.</summary>
    public int FieldCount => Gradient.Length;

    /// <summary>P_zeta with the potential multiplied by <paramref name="vScale"/> (P_zeta is proportional to H^2, so to V).</summary>
    public double ScaledPzeta(double vScale) => Pzeta * vScale;
}
