using ModeSolver.Physics;

namespace ModeSolver.Observables;

/// <summary>
/// A mode's re-entry during radiation domination with constant g_* = g_*s: the temperature at which k = aH, the Hubble
/// rate and horizon mass then, and the redshift factors to today. Relations (standard; physics.md sections 5 and 9):
/// rho = (pi^2/30) g T^4, H^2 = rho / (3 M_pl^2), a = (g_s0/g_s)^(1/3) T_0 / T (entropy conservation, a_0 = 1),
/// M_H = (4 pi / 3) rho / H^3 = 4 pi M_pl^2 / H. Energies in GeV, k in 1/Mpc, masses in solar masses.
/// </summary>
public static class RadiationEra
{
    /// <summary>Energy degrees of freedom today, photons and three massless neutrinos: 2 + (7/8) 6 (4/11)^(4/3) = 3.363.</summary>
    public static readonly double EnergyDofToday = 2 + 7.0 / 8.0 * 6 * Math.Pow(4.0 / 11.0, 4.0 / 3.0);

    /// <summary>1 GeV / c^2 in grams (CODATA 2018).</summary>
    public const double GramsPerGeV = 1.78266192e-24;

    /// <summary>Solar mass in grams (IAU 2015 nominal value with CODATA G, from memory).</summary>
    public const double SolarMassGrams = 1.98841e33;

    /// <summary>hbar in GeV s (CODATA 2018).</summary>
    public const double HbarGeVSeconds = 6.582119569e-25;

    /// <summary>1 Mpc in metres (physics.md section 0).</summary>
    public const double MpcMetres = 3.08568e22;

    /// <summary>Critical density today over h^2, 3 (100 km/s/Mpc)^2 M_pl^2, in GeV^4.</summary>
    public static readonly double CriticalDensityOverH2 =
        3 * Math.Pow(1e5 / MpcMetres * HbarGeVSeconds, 2) * Constants.ReducedPlanckMassGeV * Constants.ReducedPlanckMassGeV;

    /// <summary>Omega_r,0 h^2 of photons and massless neutrinos at T_0 (Fixsen 2009): about 4.16e-5.</summary>
    public static readonly double RadiationDensityH2 =
        Math.PI * Math.PI / 30 * EnergyDofToday * Math.Pow(Constants.CmbTemperatureGeV, 4) / CriticalDensityOverH2;

    /// <summary>Temperature (GeV) at which k (1/Mpc) = aH, with g_* = g_*s = <paramref name="g"/>.</summary>
    public static double ReentryTemperatureGeV(double kMpc, double g)
    {
        double kGeV = kMpc / Constants.GeVInInverseMpc;
        double entropy = Math.Cbrt(Constants.EntropyDofToday / g);
        return kGeV * Constants.ReducedPlanckMassGeV / (Constants.CmbTemperatureGeV * entropy * Math.PI * Math.Sqrt(g / 90));
    }

    /// <summary>Hubble rate (GeV) at temperature T (GeV).</summary>
    public static double HubbleGeV(double temperatureGeV, double g) =>
        Math.PI * Math.Sqrt(g / 90) * temperatureGeV * temperatureGeV / Constants.ReducedPlanckMassGeV;

    /// <summary>Horizon mass 4 pi M_pl^2 / H at the re-entry of k, in solar masses.</summary>
    public static double HorizonMassSolar(double kMpc, double g)
    {
        double h = HubbleGeV(ReentryTemperatureGeV(kMpc, g), g);
        double mPl = Constants.ReducedPlanckMassGeV;
        return 4 * Math.PI * mPl * mPl / h * GramsPerGeV / SolarMassGrams;
    }

    /// <summary>
    /// Omega_GW today over Omega_GW at the end of the radiation-era growth: c_g Omega_r,0 with
    /// c_g = (g_*/g_*0) (g_s0/g_s)^(4/3) (physics.md section 9).
    /// </summary>
    public static double TransferCg(double g) => g / EnergyDofToday * Math.Pow(Constants.EntropyDofToday / g, 4.0 / 3.0);

    /// <summary>
    /// Omega h^2 today of a matter component that was a fraction beta of the radiation density at the re-entry of k:
    /// beta rho_r(T) a(T)^3 / (rho_c / h^2), i.e. beta Omega_r,0 h^2 (g/g_0)(g_s0/g_s)(T/T_0).
    /// </summary>
    public static double MatterToday(double beta, double kMpc, double g)
    {
        double t = ReentryTemperatureGeV(kMpc, g);
        double rho = Math.PI * Math.PI / 30 * g * t * t * t * t;
        double a = Math.Cbrt(Constants.EntropyDofToday / g) * Constants.CmbTemperatureGeV / t;
        return beta * rho * a * a * a / CriticalDensityOverH2;
    }

    /// <summary>Frequency today in Hz of the comoving wavenumber k (1/Mpc): f = c k / (2 pi).</summary>
    public static double FrequencyHz(double kMpc) => 299792458.0 / MpcMetres * kMpc / (2 * Math.PI);
}
