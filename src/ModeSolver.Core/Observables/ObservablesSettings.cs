namespace ModeSolver.Observables;

/// <summary>Smoothing window of the density contrast in the black-hole estimate.</summary>
public enum PbhWindow
{
    /// <summary>W(kR) = exp(-(kR)^2 / 4) (Gaussian in k; e.g. Young, Byrnes &amp; Sasaki 2014, JCAP 07, 045, from memory).</summary>
    Gaussian,

    /// <summary>Real-space top hat, W(x) = 3 (sin x - x cos x) / x^3.</summary>
    TopHat,
}

/// <summary>Helpers for <see cref="PbhWindow"/>.</summary>
public static class PbhWindowText
{
    /// <summary>Deck and file code: "gaussian" or "top-hat".</summary>
    public static string Code(this PbhWindow w) => w == PbhWindow.TopHat ? "top-hat" : "gaussian";

    /// <summary>Formula as printed.</summary>
    public static string Formula(this PbhWindow w) =>
        w == PbhWindow.TopHat ? "W(x) = 3 (sin x - x cos x) / x^3 (real-space top hat)" : "W(x) = exp(-x^2/4) (Gaussian)";

    /// <summary>Parses a code; null when unknown.</summary>
    public static PbhWindow? Parse(string text) => text.Trim().ToLowerInvariant() switch
    {
        "gaussian" => PbhWindow.Gaussian,
        "top-hat" or "tophat" => PbhWindow.TopHat,
        _ => null,
    };
}

/// <summary>
/// The Gaussian approximation of the data in (n_s, r, alpha_s) (physics.md section 9): independent Gaussians, correlations
/// neglected. An approximation, not the likelihood.
/// </summary>
/// <param name="Ns">Central n_s = 0.9649 (Planck 2018 X, A&amp;A 641, A10).</param>
/// <param name="SigmaNs">sigma(n_s) = 0.0042 (Planck 2018 X).</param>
/// <param name="SigmaR">sigma(r) = 0.018, half the 95% bound r &lt; 0.036 (BICEP/Keck 2021, PRL 127, 151301), centred on r = 0.</param>
/// <param name="AlphaS">Central alpha_s = -0.0045 (Planck 2018 X, from memory).</param>
/// <param name="SigmaAlphaS">sigma(alpha_s) = 0.0067 (Planck 2018 X, from memory).</param>
/// <param name="UseAlphaS">Include alpha_s (3 degrees of freedom instead of 2).</param>
public sealed record DataConstraints(
    double Ns = 0.9649, double SigmaNs = 0.0042, double SigmaR = 0.018,
    double AlphaS = -0.0045, double SigmaAlphaS = 0.0067, bool UseAlphaS = false);

/// <summary>
/// Which observables to compute and every choice they depend on. Defaults: distance to the data and the peak summary on,
/// induced gravitational waves and black holes off (switched on in the deck's [observables] table or by --observables).
/// </summary>
public sealed record ObservablesSettings
{
    /// <summary>Report Delta chi^2 and the number of sigma of the pivot values.</summary>
    public bool Distance { get; init; } = true;
    /// <summary>Look for a small-scale peak and summarise it.</summary>
    public bool Peak { get; init; } = true;
    /// <summary>Scalar-induced gravitational waves.</summary>
    public bool InducedGw { get; init; }
    /// <summary>Primordial black holes.</summary>
    public bool Pbh { get; init; }

    /// <summary>A maximum of P_s counts as a peak when P_peak / A_s is at least this (our choice).</summary>
    public double PeakMinRatio { get; init; } = 10;

    /// <summary>g_* = g_*s at the re-entry of the modes (Standard Model content above ~100 GeV, common practice).</summary>
    public double GStar { get; init; } = 106.75;
    /// <summary>Radiation density today, Omega_r,0 h^2; null: from T_0 and g_*0 (4.16e-5, massless neutrinos).</summary>
    public double? OmegaRadiationH2 { get; init; }
    /// <summary>Wavenumbers per decade of the Omega_GW table.</summary>
    public int GwPointsPerDecade { get; init; } = 8;
    /// <summary>Relative tolerance of the Omega_GW quadrature.</summary>
    public double GwTolerance { get; init; } = 1e-4;

    /// <summary>Collapse threshold delta_c on comoving slices; 0.41 (Harada, Yoo &amp; Kohri 2013, Phys. Rev. D 88, 084051, from memory).</summary>
    public double DeltaC { get; init; } = 0.41;
    /// <summary>Black-hole mass as a fraction of the horizon mass at re-entry (0.2, common practice).</summary>
    public double Gamma { get; init; } = 0.2;
    /// <summary>Smoothing window.</summary>
    public PbhWindow Window { get; init; } = PbhWindow.Gaussian;
    /// <summary>Omega_DM h^2 = 0.120 (Planck 2018 VI, A&amp;A 641, A6).</summary>
    public double OmegaDmH2 { get; init; } = 0.120;
    /// <summary>Horizon scales per decade in k of the beta(M), f_PBH(M) table.</summary>
    public int PbhPointsPerDecade { get; init; } = 10;

    /// <summary>The data approximated as Gaussians.</summary>
    public DataConstraints Data { get; init; } = new();

    /// <summary>The defaults.</summary>
    public static ObservablesSettings Default { get; } = new();

    /// <summary>True when any observable is switched on.</summary>
    public bool Any => Distance || Peak || InducedGw || Pbh;
}
