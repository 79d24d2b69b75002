using ModeSolver.Estimates;
namespace ModeSolver.Diagnostics;

/// <summary>
/// One place where the exact result and slow roll disagree (or where the background leaves slow roll inside the
/// observable window).
/// </summary>
/// <param name="Kind">Short code: "spectrum-deviation", "pivot-deviation" or "background-phase" (see <see cref="FlagKinds"/>).</param>
/// <param name="Quantity">What is compared: "P_s", "P_t", "n_s", "r", "alpha_s", "n_t", "epsilon_1" or "|epsilon_2|".</param>
/// <param name="Message">One line for humans.</param>
/// <param name="Where">Location as text with units, e.g. "k = 1.000e-03 .. 2.500e-02 /Mpc" or "N = 12.30 .. 14.10".</param>
/// <param name="Lower">Lower end of the range (k in 1/Mpc, or N); for pivot flags the pivot k.</param>
/// <param name="Upper">Upper end of the range; for pivot flags the pivot k.</param>
/// <param name="Exact">Exact value at the worst point (for background phases: the peak value).</param>
/// <param name="SlowRoll">Slow-roll value at the worst point (NaN for background phases).</param>
/// <param name="Difference">Spectra: P_exact/P_SR - 1 at the worst point; pivot: exact minus slow roll; background: NaN.</param>
public sealed record Flag(
    string Kind,
    string Quantity,
    string Message,
    string Where,
    double Lower,
    double Upper,
    double Exact,
    double SlowRoll,
    double Difference);

/// <summary>The flag kind codes.</summary>
public static class FlagKinds
{
    /// <summary>A k range where |P_exact/P_SR - 1| exceeds the threshold.</summary>
    public const string SpectrumDeviation = "spectrum-deviation";

    /// <summary>A pivot quantity whose exact-minus-slow-roll difference exceeds a fraction of its observational error.</summary>
    public const string PivotDeviation = "pivot-deviation";

    /// <summary>An N range inside the observable window where epsilon_1 or |epsilon_2| is large.</summary>
    public const string BackgroundPhase = "background-phase";

    /// <summary>An N range where the entropic direction is light (m_s^2/H^2 &lt; 1) while the trajectory turns: the single-field reduction fails.</summary>
    public const string LightEntropicTurn = "light-entropic-turn";

    /// <summary>An N range where the entropic mass is negative (geometrical destabilisation when the curvature term drives it).</summary>
    public const string EntropicInstability = "entropic-instability";

    /// <summary>delta N and the mode equations disagree on P_zeta beyond their errors and the expected slow-roll difference.</summary>
    public const string DeltaNDisagreement = "delta-n-disagreement";

    /// <summary>The one-field model with the named fields frozen at the pivot's exit misses the n-field n_s or r beyond the errors.</summary>
    public const string FrozenReductionDiffers = "frozen-reduction-differs";
}

/// <summary>Which slow-roll estimate the exact results are compared against.</summary>
public enum SlowRollReference
{
    /// <summary>First-order Hubble-flow formulas.</summary>
    FirstOrder,
    /// <summary>Second-order Hubble-flow formulas (default).</summary>
    SecondOrder,
    /// <summary>Potential form (pivot quantities only; spectra fall back to second order).</summary>
    Potential,
}

/// <summary>Thresholds of the disagreement flags. Every field is settable.</summary>
/// <param name="SpectrumThreshold">Flag k where |P_exact/P_SR - 1| exceeds this (default 0.01).</param>
/// <param name="PivotFraction">Flag a pivot quantity when |exact - slow roll| exceeds this fraction of its sigma (default 0.1).</param>
/// <param name="SigmaNs">sigma(n_s) = 0.0042 (Planck 2018 X, A&amp;A 641, A10).</param>
/// <param name="SigmaR">Effective 1-sigma of r = 0.036/2: half the 95% upper bound of BICEP/Keck 2021 (PRL 127, 151301);
/// halving a 95% bound is common practice.</param>
/// <param name="SigmaAlphaS">sigma(alpha_s) = 0.0067 (Planck 2018 X, dn_s/dln k = -0.0045 +- 0.0067 at 68%, from memory; the value the distance to the data uses).</param>
/// <param name="SigmaNt">sigma(n_t) = sigma(r)/8 from the single-field consistency relation n_t = -r/8 (our choice:
/// n_t itself is not measured).</param>
/// <param name="Epsilon1Limit">Flag background phases with epsilon_1 above this inside the observable window (default 0.1).</param>
/// <param name="Epsilon2Limit">Flag background phases with |epsilon_2| above this inside the observable window (default 1).</param>
/// <param name="Reference">Slow-roll estimate the exact results are compared against (default second order).</param>
public sealed record FlagSettings(
    double SpectrumThreshold = 0.01,
    double PivotFraction = 0.1,
    double SigmaNs = 0.0042,
    double SigmaR = 0.036 / 2,
    double SigmaAlphaS = 0.0067,
    double SigmaNt = 0.036 / 2 / 8,
    double Epsilon1Limit = 0.1,
    double Epsilon2Limit = 1.0,
    SlowRollReference Reference = SlowRollReference.SecondOrder)
{
    /// <summary>The defaults.</summary>
    public static FlagSettings Default { get; } = new();

    /// <summary>Throws <see cref="ArgumentException"/> naming the first field that is not a finite positive number.</summary>
    public void Validate()
    {
        Check(SpectrumThreshold, "flag spectrum threshold");
        Check(PivotFraction, "flag pivot fraction");
        Check(SigmaNs, "sigma(n_s)");
        Check(SigmaR, "sigma(r)");
        Check(SigmaAlphaS, "sigma(alpha_s)");
        Check(SigmaNt, "sigma(n_t)");
        Check(Epsilon1Limit, "flag epsilon_1 limit");
        Check(Epsilon2Limit, "flag |epsilon_2| limit");
        if (!Enum.IsDefined(Reference))
            throw new ArgumentException($"flag settings: unknown slow-roll reference {(int)Reference}");

        static void Check(double v, string what)
        {
            if (!double.IsFinite(v) || v <= 0)
                throw new ArgumentException($"flag settings: {what} must be a finite positive number, got {v.ToString("R", System.Globalization.CultureInfo.InvariantCulture)}");
        }
    }
}
