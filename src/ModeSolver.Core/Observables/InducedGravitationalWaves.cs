using System.Collections.Immutable;
using ModeSolver.Spectra;

namespace ModeSolver.Observables;

/// <summary>Scalar-induced gravitational waves from radiation-era re-entry, tabulated in k and f.</summary>
/// <param name="K">k in 1/Mpc.</param>
/// <param name="Frequency">f = c k / (2 pi) in Hz.</param>
/// <param name="OmegaGwRadiation">Omega_GW in radiation domination, after the sub-horizon growth (the constant of the kernel integral).</param>
/// <param name="OmegaGwH2">Omega_GW,0 h^2 today.</param>
/// <param name="ErrorH2">Estimated absolute error of <paramref name="OmegaGwH2"/>: quadrature plus 2 x the spectrum's largest relative error.</param>
/// <param name="ReentryTemperatureGeV">Temperature at which each k re-entered the horizon.</param>
/// <param name="Converged">True when every quadrature met its tolerance.</param>
/// <param name="GStar">g_* = g_*s used.</param>
/// <param name="OmegaRadiationH2">Omega_r,0 h^2 used.</param>
/// <param name="Cg">c_g = (g_*/g_*0)(g_s0/g_s)^(4/3) used.</param>
/// <param name="PeakFrequency">Frequency of the largest Omega_GW,0 h^2 in the table (Hz).</param>
/// <param name="PeakOmegaGwH2">The largest Omega_GW,0 h^2 in the table.</param>
/// <param name="Evaluations">Kernel evaluations used.</param>
public sealed record InducedGwResult(
    ImmutableArray<double> K,
    ImmutableArray<double> Frequency,
    ImmutableArray<double> OmegaGwRadiation,
    ImmutableArray<double> OmegaGwH2,
    ImmutableArray<double> ErrorH2,
    ImmutableArray<double> ReentryTemperatureGeV,
    bool Converged,
    double GStar,
    double OmegaRadiationH2,
    double Cg,
    double PeakFrequency,
    double PeakOmegaGwH2,
    long Evaluations);

/// <summary>
/// Omega_GW(k) induced at second order by a Gaussian zeta during radiation domination, with the analytic radiation-era
/// kernel (Kohri &amp; Terada 2018, Phys. Rev. D 97, 123532; Espinosa, Racco &amp; Riotto 2018, JCAP 09, 012), as
/// written in physics.md section 9:
/// Omega_GW(k) = (1/12) int_0^inf dv int_|1-v|^(1+v) du [(4v^2 - (1+v^2-u^2)^2)/(4uv)]^2 P_s(ku) P_s(kv) J(u, v).
/// The double integral is done in t = u + v - 1 in [0, inf), s = u - v in [0, 1] (the integrand is symmetric in s;
/// du dv = dt ds / 2), adaptively in both with breakpoints at the resonance u + v = sqrt(3), at the lines where u or v
/// meets a given peak, and at the edges of the computed spectrum (P_s = 0 outside it).
/// </summary>
public static class InducedGravitationalWaves
{
    private static readonly double Sqrt3 = Math.Sqrt(3.0);

    /// <summary>
    /// The integrand of physics.md section 9 without the spectra: (1/12) [(4v^2 - (1+v^2-u^2)^2)/(4uv)]^2 J(u, v).
    /// </summary>
    public static double Kernel(double u, double v) => KernelTS(u + v - 1, u - v);

    /// <summary>
    /// <see cref="Kernel"/> in t = u + v - 1, s = u - v, written without cancellation near t = 0 (v -> 0):
    /// 4v^2 - (1+v^2-u^2)^2 = t (t+2) (1-s^2) and 4uv = (t+1-s)(t+1+s). Within t + (1 - s) &lt; 1e-3 of the corner
    /// (t, s) = (0, 1), where the bracket of J cancels to fourth order, the leading term of the expansion,
    /// (4/3) t^2 (1-s)^2 / (t + 1 - s)^2, is used instead (relative error of order t + 1 - s; our expansion).
    /// </summary>
    public static double KernelTS(double t, double s)
    {
        double d = 1 - s;
        if (t + d < 1e-3) return 4.0 / 3.0 * Sq(t * d / (t + d));
        double uv4 = (t + d) * (t + 1 + s);
        double a = t * (t + 2) * d * (1 + s) / uv4;
        double sum = t + 1;
        double w = 0.5 * (sum * sum + s * s) - 3;
        double uv = 0.25 * uv4;
        double pre = 3 * w / (4 * uv * uv * uv);
        // ln|(3 - (t+1)^2) / (3 - s^2)| = ln|2 - 2t - t^2| - ln(2 + d (1 + s)), with log1p near the corner.
        double num = -t * (2 + t) / 2, den = d * (1 + s) / 2;
        double lnNum = Math.Abs(num) < 0.5 ? LogOnePlus(num) : Math.Log(Math.Abs(1 + num));
        // Exactly on the resonance u + v = sqrt 3 the logarithm is infinite (an integrable singularity): a quadrature
        // node that rounds onto it takes the value one step in t away instead.
        if (double.IsInfinity(lnNum)) return KernelTS(Math.BitIncrement(t), s);
        double log = lnNum - LogOnePlus(den);
        double brace = Sq(-uv4 + w * log) + (sum > Sqrt3 ? Math.PI * Math.PI * w * w : 0.0);
        return a * a * pre * pre * brace / 12.0;
    }

    // ln(1 + x) accurate for small x (the classic log1p trick: exact in the rounded argument).
    private static double LogOnePlus(double x)
    {
        double y = 1 + x;
        return y == 1 ? x : Math.Log(y) * x / (y - 1);
    }

    /// <summary>
    /// Omega_GW for a Dirac-delta spectrum P_s = A delta(ln(k/k_p)): the double integral collapses onto u = v = k_p/k,
    /// Omega_GW = A^2 (k_p/k)^2 Kernel(k_p/k, k_p/k) for k &lt; 2 k_p, zero above.
    /// </summary>
    public static double DiracDelta(double amplitude, double kOverKPeak)
    {
        if (!(kOverKPeak > 0) || kOverKPeak >= 2) return 0.0;
        double u = 1 / kOverKPeak;
        return amplitude * amplitude * u * u * Kernel(u, u);
    }

    /// <summary>
    /// Omega_GW(k) in radiation domination for the spectrum <paramref name="ps"/> (zero outside [kMin, kMax]) with a
    /// relative tolerance; <paramref name="kPeak"/> (NaN for none) adds breakpoints where u or v meets the peak.
    /// </summary>
    public static QuadratureResult OmegaRadiation(Func<double, double> ps, double k, double kMin, double kMax, double kPeak, double relTol)
    {
        ArgumentNullException.ThrowIfNull(ps);
        double uMin = kMin / k, uMax = kMax / k, up = kPeak / k;
        double tMax = 2 * uMax - 1;
        if (!(tMax > 0)) return new QuadratureResult(0, 0, 0, true);
        double innerTol = relTol * 0.1;
        bool innerConverged = true;
        long innerEvaluations = 0;
        double Inner(double t)
        {
            Span<double> cuts = stackalloc double[4];
            int n = 0;
            if (double.IsFinite(up)) { cuts[n++] = 2 * up - 1 - t; cuts[n++] = t + 1 - 2 * up; }
            cuts[n++] = t + 1 - 2 * uMin;
            cuts[n++] = 2 * uMax - t - 1;
            var r = AdaptiveQuadrature.Integrate(s =>
            {
                double pu = ps(k * 0.5 * (t + s + 1)), pv = ps(k * 0.5 * (t - s + 1));
                return pu == 0 || pv == 0 ? 0.0 : KernelTS(t, s) * pu * pv;
            }, 0, 1, cuts[..n], innerTol, 0, 400);
            if (!r.Converged) innerConverged = false;
            innerEvaluations += r.Evaluations;
            return r.Value;
        }

        var breaks = new List<double> { Sqrt3 - 1, 2 * uMin - 1, 2 * uMin, 2 * uMax - 2 };
        if (double.IsFinite(up)) { breaks.Add(2 * up - 2); breaks.Add(2 * up - 1); breaks.Add(2 * up); }
        for (double t = 1; t < tMax; t *= 2) breaks.Add(t);
        double tLow = Math.Max(0, 2 * uMin - 1);
        var outer = AdaptiveQuadrature.Integrate(Inner, tLow, tMax, breaks.ToArray(), relTol * 0.9, 0, 4000);
        double error = outer.Error + innerTol * Math.Abs(outer.Value); // the integrand is >= 0: inner errors add up to <= innerTol |I|
        return new QuadratureResult(outer.Value, error, (int)Math.Min(int.MaxValue, innerEvaluations), outer.Converged && innerConverged);
    }

    /// <summary>The Omega_GW table of a run: log-spaced k from <paramref name="kLow"/> to <paramref name="kHigh"/>.</summary>
    public static InducedGwResult Compute(ObservablesSource source, ObservablesSettings settings, double kLow, double kHigh, double kPeak)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(settings);
        int perDecade = Math.Max(1, settings.GwPointsPerDecade);
        var grid = WavenumberGrid.LogSpaced(kLow, kHigh, perDecade); // the same log grid as the primordial table
        int count = grid.Length;
        double g = settings.GStar;
        double omegaR = settings.OmegaRadiationH2 ?? RadiationEra.RadiationDensityH2;
        double cg = RadiationEra.TransferCg(g);
        double spectrumError = 2 * source.MaxRelError;
        var k = new double[count]; var f = new double[count]; var om = new double[count]; var today = new double[count];
        var err = new double[count]; var temp = new double[count];
        bool converged = true;
        long evaluations = 0;
        double peakF = double.NaN, peakOm = 0;
        for (int i = 0; i < count; i++)
        {
            double ki = grid[i];
            var r = OmegaRadiation(source.PsAt, ki, source.KMin, source.KMax, kPeak, settings.GwTolerance);
            converged &= r.Converged;
            evaluations += r.Evaluations;
            k[i] = ki;
            f[i] = RadiationEra.FrequencyHz(ki);
            om[i] = r.Value;
            today[i] = cg * omegaR * r.Value;
            err[i] = cg * omegaR * (r.Error + spectrumError * Math.Abs(r.Value));
            temp[i] = RadiationEra.ReentryTemperatureGeV(ki, g);
            if (today[i] > peakOm) { peakOm = today[i]; peakF = f[i]; }
        }
        return new InducedGwResult([.. k], [.. f], [.. om], [.. today], [.. err], [.. temp], converged, g, omegaR, cg,
            peakF, peakOm, evaluations);
    }

    private static double Sq(double x) => x * x;
}
