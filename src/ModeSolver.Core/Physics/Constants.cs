namespace ModeSolver.Physics;

/// <summary>Physical constants and unit conversions (physics.md section 0 and 5). Reduced Planck units inside the core.</summary>
public static class Constants
{
    /// <summary>Reduced Planck mass in GeV (physics.md section 0).</summary>
    public const double ReducedPlanckMassGeV = 2.435e18;

    /// <summary>1 GeV expressed in 1/Mpc (hbar c = 1.97327e-16 GeV m, 1 Mpc = 3.08568e22 m).</summary>
    public const double GeVInInverseMpc = 1.5637e38;

    /// <summary>CMB temperature today, 2.7255 K = 2.3487e-13 GeV (Fixsen 2009, ApJ 707, 916).</summary>
    public const double CmbTemperatureGeV = 2.3487e-13;

    /// <summary>Entropy degrees of freedom today: photons and three neutrino species, 43/11.</summary>
    public const double EntropyDofToday = 43.0 / 11.0;

    /// <summary>Default relativistic degrees of freedom at reheating (Standard Model content, common practice).</summary>
    public const double DefaultReheatingDof = 106.75;

    /// <summary>Default pivot scale in 1/Mpc.</summary>
    public const double DefaultPivotK = 0.05;

    /// <summary>Default scalar amplitude at the pivot: ln(1e10 A_s) = 3.044 (Planck 2018 VI, A&amp;A 641, A6).</summary>
    public const double DefaultScalarAmplitude = 2.099e-9;

    /// <summary>Euler-Mascheroni constant.</summary>
    public const double EulerGamma = 0.57721566490153286061;

    /// <summary>C = gamma_E + ln 2 - 2 of the second-order slow-roll formulas (Stewart &amp; Lyth 1993).</summary>
    public const double SlowRollC = EulerGamma + 0.69314718055994530942 - 2.0;
}
