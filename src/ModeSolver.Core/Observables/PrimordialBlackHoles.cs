using System.Collections.Immutable;
using MathNet.Numerics;
using ModeSolver.Spectra;

namespace ModeSolver.Observables;

/// <summary>Primordial black holes from P_s: Press-Schechter mass fraction and today's abundance (an estimate).</summary>
/// <param name="KHorizon">Horizon scale k_H = 1/R at formation, 1/Mpc.</param>
/// <param name="MassSolar">M = gamma M_H(k_H) in solar masses.</param>
/// <param name="Sigma">sigma(R) of the smoothed density contrast.</param>
/// <param name="Beta">beta(M) = erfc(delta_c / (sqrt 2 sigma)).</param>
/// <param name="BetaRelError">Relative error of beta from the spectrum's error and the quadrature (not from the choices).</param>
/// <param name="FPbh">f_PBH(M) = Omega_PBH(M) / Omega_DM per unit ln M.</param>
/// <param name="FTotal">Total f_PBH = int f_PBH(M) d ln M over the table's range.</param>
/// <param name="FTotalRelError">Relative error of <paramref name="FTotal"/> (spectrum error and quadrature; not the choices).</param>
/// <param name="DlnFDlnDeltaC">d ln f_total / d ln delta_c (from delta_c and 1.01 delta_c): how strongly the result hangs on the threshold.</param>
/// <param name="MassAtPeak">M where f_PBH(M) is largest in the table.</param>
/// <param name="FAtPeak">The largest f_PBH(M) of the table.</param>
/// <param name="DeltaC">Threshold used.</param>
/// <param name="Gamma">gamma used.</param>
/// <param name="Window">Window used.</param>
/// <param name="GStar">g_* = g_*s used.</param>
/// <param name="OmegaDmH2">Omega_DM h^2 used.</param>
public sealed record PbhResult(
    ImmutableArray<double> KHorizon,
    ImmutableArray<double> MassSolar,
    ImmutableArray<double> Sigma,
    ImmutableArray<double> Beta,
    ImmutableArray<double> BetaRelError,
    ImmutableArray<double> FPbh,
    double FTotal,
    double FTotalRelError,
    double DlnFDlnDeltaC,
    double MassAtPeak,
    double FAtPeak,
    double DeltaC,
    double Gamma,
    PbhWindow Window,
    double GStar,
    double OmegaDmH2);

/// <summary>
/// Press-Schechter estimate for Gaussian zeta in radiation domination (physics.md section 9): delta = (4/9)(k/aH)^2 zeta
/// on comoving slices, sigma^2(R) = int d ln k (16/81)(kR)^4 W^2(kR) T^2(kR) P_s(k) with R = 1/k_H the comoving horizon
/// at re-entry, beta = erfc(delta_c / (sqrt 2 sigma)), M = gamma M_H(k_H), and f_PBH(M) = Omega_PBH(M)/Omega_DM with
/// Omega_PBH h^2 = beta rho_r a^3 / (rho_c / h^2) at re-entry (Sasaki, Suyama, Tanaka &amp; Yokoyama 2018, Class.
/// Quantum Grav. 35, 063001). T = 1 with the Gaussian window; with the top hat the radiation-era linear transfer
/// T(x) = 3 (sin y - y cos y) / y^3, y = x / sqrt 3, is included (without it sigma diverges).
/// </summary>
public static class PrimordialBlackHoles
{
    /// <summary>W^2(x) T^2(x) of the chosen window.</summary>
    public static double WindowSquared(PbhWindow window, double x)
    {
        if (window == PbhWindow.Gaussian) return Math.Exp(-0.5 * x * x);
        double w = TopHat(x), t = TopHat(x / Math.Sqrt(3));
        return w * w * t * t;
    }

    private static double TopHat(double x)
    {
        if (x < 1e-3) return 1 - x * x / 10;
        return 3 * (Math.Sin(x) - x * Math.Cos(x)) / (x * x * x);
    }

    /// <summary>sigma^2(R = 1/kH) over the computed spectrum (zero outside it).</summary>
    public static QuadratureResult SigmaSquared(ObservablesSource source, double kH, PbhWindow window, double kPeak, double relTol = 1e-9)
    {
        ArgumentNullException.ThrowIfNull(source);
        double a = Math.Log(source.KMin), b = Math.Log(source.KMax);
        Span<double> cuts = [Math.Log(kH), Math.Log(2 * kH), double.IsFinite(kPeak) ? Math.Log(kPeak) : a];
        return AdaptiveQuadrature.Integrate(lnk =>
        {
            double k = Math.Exp(lnk), x = k / kH;
            double x2 = x * x;
            return 16.0 / 81.0 * x2 * x2 * WindowSquared(window, x) * source.PsAt(k);
        }, a, b, cuts, relTol, 0, 2000);
    }

    /// <summary>beta = erfc(delta_c / (sqrt 2 sigma)).</summary>
    public static double Beta(double sigma, double deltaC) => SpecialFunctions.Erfc(deltaC / (Math.Sqrt(2) * sigma));

    /// <summary>|d ln beta / d ln sigma^2| = x e^(-x^2) / (sqrt(pi) erfc x), x = delta_c / (sqrt 2 sigma): the factor by which a relative error of sigma^2 grows in beta.</summary>
    public static double BetaSensitivity(double sigma, double deltaC)
    {
        double x = deltaC / (Math.Sqrt(2) * sigma);
        double erfc = SpecialFunctions.Erfc(x);
        if (erfc > 0) return x * Math.Exp(-x * x) / (Math.Sqrt(Math.PI) * erfc);
        return x * x + 0.5; // asymptotic form once erfc underflows
    }

    /// <summary>f_PBH(M) per unit ln M formed at the re-entry of k_H, for a mass fraction beta.</summary>
    public static double FractionOfDarkMatter(double beta, double kH, ObservablesSettings settings) =>
        RadiationEra.MatterToday(beta, kH, settings.GStar) / settings.OmegaDmH2;

    /// <summary>M(k_H) = gamma M_H(k_H), solar masses.</summary>
    public static double Mass(double kH, ObservablesSettings settings) => settings.Gamma * RadiationEra.HorizonMassSolar(kH, settings.GStar);

    /// <summary>The beta(M), f_PBH(M) table on log-spaced k_H in [kLow, kHigh] and the total f_PBH.</summary>
    public static PbhResult Compute(ObservablesSource source, ObservablesSettings settings, double kLow, double kHigh, double kPeak)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(settings);
        int perDecade = Math.Max(1, settings.PbhPointsPerDecade);
        var grid = WavenumberGrid.LogSpaced(kLow, kHigh, perDecade); // the same log grid as the primordial table
        int count = grid.Length;
        double spectrumError = source.MaxRelError;
        var kh = new double[count]; var m = new double[count]; var sig = new double[count]; var beta = new double[count];
        var betaErr = new double[count]; var f = new double[count];
        double fMax = 0, mAtMax = double.NaN;
        for (int i = 0; i < count; i++)
        {
            double k = grid[i];
            var s2 = SigmaSquared(source, k, settings.Window, kPeak);
            double sigma = Math.Sqrt(s2.Value);
            kh[i] = k;
            m[i] = Mass(k, settings);
            sig[i] = sigma;
            beta[i] = Beta(sigma, settings.DeltaC);
            betaErr[i] = BetaSensitivity(sigma, settings.DeltaC) * (spectrumError + s2.Error / Math.Max(s2.Value, double.Epsilon));
            f[i] = FractionOfDarkMatter(beta[i], k, settings);
            if (f[i] > fMax) { fMax = f[i]; mAtMax = m[i]; }
        }
        var (total, totalErr) = Total(source, settings, settings.DeltaC, kLow, kHigh, kPeak);
        var (total2, _) = Total(source, settings, settings.DeltaC * 1.01, kLow, kHigh, kPeak);
        double slope = total > 0 && total2 > 0 ? Math.Log(total2 / total) / Math.Log(1.01) : double.NaN;
        return new PbhResult([.. kh], [.. m], [.. sig], [.. beta], [.. betaErr], [.. f], total, totalErr, slope, mAtMax, fMax,
            settings.DeltaC, settings.Gamma, settings.Window, settings.GStar, settings.OmegaDmH2);
    }

    /// <summary>
    /// Total f_PBH = int f_PBH(M) d ln M = 2 int f_PBH d ln k_H (M is proportional to k_H^-2 at constant g_*) and its
    /// relative error (quadrature plus the spectrum's error through the exponent, at the largest contribution).
    /// </summary>
    public static (double Total, double RelError) Total(ObservablesSource source, ObservablesSettings settings, double deltaC,
        double kLow, double kHigh, double kPeak)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(settings);
        double spectrumError = source.MaxRelError;
        double worstSensitivity = 0, fWorst = 0;
        var r = AdaptiveQuadrature.Integrate(lnk =>
        {
            double k = Math.Exp(lnk);
            double sigma = Math.Sqrt(SigmaSquared(source, k, settings.Window, kPeak, 1e-10).Value);
            double fk = 2 * FractionOfDarkMatter(Beta(sigma, deltaC), k, settings);
            if (fk > fWorst) { fWorst = fk; worstSensitivity = BetaSensitivity(sigma, deltaC); }
            return fk;
        }, Math.Log(kLow), Math.Log(kHigh), double.IsFinite(kPeak) ? [Math.Log(kPeak)] : [], 1e-6, 0, 2000);
        double rel = r.Value > 0 ? r.Error / r.Value + worstSensitivity * spectrumError : double.NaN;
        return (r.Value, rel);
    }
}
