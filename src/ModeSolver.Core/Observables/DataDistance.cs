using MathNet.Numerics;

namespace ModeSolver.Observables;

/// <summary>Distance of (n_s, r[, alpha_s]) to the data in the Gaussian approximation of <see cref="DataConstraints"/>.</summary>
/// <param name="DeltaChi2">Delta chi^2 from the centre (the best fit of the approximation).</param>
/// <param name="Sigmas">The number of Gaussian sigma with the same probability: erf(n / sqrt 2) = P(chi^2_d &lt;= Delta chi^2).</param>
/// <param name="DegreesOfFreedom">2 (n_s, r) or 3 (with alpha_s).</param>
/// <param name="Data">The constraints used.</param>
public sealed record DataDistanceResult(double DeltaChi2, double Sigmas, int DegreesOfFreedom, DataConstraints Data);

/// <summary>
/// Delta chi^2 = ((n_s - n_s0)/sigma_ns)^2 + (r/sigma_r)^2 [+ ((alpha_s - alpha_s0)/sigma_as)^2]: independent Gaussians
/// around the central values with r centred on 0 (physics.md section 9). An approximation of Planck 2018 + BICEP/Keck 2021,
/// not their likelihood.
/// </summary>
public static class DataDistance
{
    /// <summary>Delta chi^2 and the number of sigma of one point.</summary>
    public static DataDistanceResult Evaluate(double ns, double r, double alphaS, DataConstraints data)
    {
        ArgumentNullException.ThrowIfNull(data);
        double chi2 = Sq((ns - data.Ns) / data.SigmaNs) + Sq(r / data.SigmaR);
        int dof = 2;
        if (data.UseAlphaS)
        {
            chi2 += Sq((alphaS - data.AlphaS) / data.SigmaAlphaS);
            dof = 3;
        }
        return new DataDistanceResult(chi2, Sigmas(chi2, dof), dof, data);
    }

    /// <summary>Delta chi^2 only (no number of sigma), for plots and sweep columns.</summary>
    public static double DeltaChi2(double ns, double r, DataConstraints data)
    {
        ArgumentNullException.ThrowIfNull(data);
        return Sq((ns - data.Ns) / data.SigmaNs) + Sq(r / data.SigmaR);
    }

    /// <summary>
    /// n with erfc(n / sqrt 2) = Q(d/2, Delta chi^2 / 2), the upper tail of chi^2 with d degrees of freedom (the
    /// upper tail keeps the precision far out); NaN when Delta chi^2 is not finite.
    /// </summary>
    public static double Sigmas(double deltaChi2, int dof)
    {
        if (!double.IsFinite(deltaChi2) || deltaChi2 < 0) return double.NaN;
        if (deltaChi2 == 0) return 0;
        double q = SpecialFunctions.GammaUpperRegularized(dof / 2.0, deltaChi2 / 2);
        if (q <= 0) return Math.Sqrt(deltaChi2); // beyond double precision: the tails agree to leading order
        return Math.Sqrt(2) * SpecialFunctions.ErfcInv(q);
    }

    /// <summary>Delta chi^2 of the contour enclosing the probability of n sigma for d degrees of freedom.</summary>
    public static double ContourLevel(double sigmas, int dof)
    {
        double p = SpecialFunctions.Erf(sigmas / Math.Sqrt(2));
        return 2 * SpecialFunctions.GammaLowerRegularizedInv(dof / 2.0, p);
    }

    private static double Sq(double x) => x * x;
}
