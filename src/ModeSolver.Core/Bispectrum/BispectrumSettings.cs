namespace ModeSolver.Bispectrum;

/// <summary>Numerical settings of the in-in integration of the tree-level bispectrum.</summary>
public sealed record BispectrumSettings
{
    /// <summary>Target relative accuracy of the mode histories (default 1e-7); the error estimate reruns them at a tenth of it.</summary>
    public double Tolerance { get; init; } = 1e-7;

    /// <summary>
    /// Damping kappa of the early-time factor exp(-kappa K/(aH)) (Chen, Easther &amp; Lim 2007, JCAP 06, 023), K the perimeter.
    /// The integral is computed at kappa, kappa/2 and kappa/4 on the same nodes and extrapolated to kappa = 0 (default 0.4).
    /// </summary>
    public double Damping { get; init; } = 0.4;

    /// <summary>
    /// Start of the in-in integral as K/(aH); 0 chooses it so that the most weakly damped variant, exp(-kappa/4 K/aH),
    /// has fallen below the tolerance times the growth of the integrand there. The error estimate also starts twice as deep.
    /// </summary>
    public double StartDepth { get; init; }

    /// <summary>
    /// End of the integral as k_max/(aH) (default 1e-3), k_max the largest side: late enough that zeta has frozen and the
    /// field-redefinition terms with spatial or time derivatives, of relative size (k/aH)^2, are negligible.
    /// The error estimate compares with an end ten times earlier in k/aH. Capped at the end of inflation.
    /// </summary>
    public double EndDepth { get; init; } = 1e-3;

    /// <summary>Largest e-fold width of one quadrature panel before adaptive halving (default 0.5).</summary>
    public double MaxPanel { get; init; } = 0.5;

    /// <summary>
    /// Phase advance K/(aH) dN of one panel before adaptive halving (default 5 radians): the panel is integrated by
    /// 10-point Gauss-Legendre whole and in two halves, and halved again where the two disagree by more than 1e-2
    /// tolerance of its integral of |integrand|.
    /// </summary>
    public double PanelPhase { get; init; } = 5.0;

    /// <summary>Whether to rerun the histories at a tenth of the tolerance for the error estimate (default true).</summary>
    public bool EstimateTolerance { get; init; } = true;

    /// <summary>Throws <see cref="ArgumentOutOfRangeException"/> on a setting outside its range.</summary>
    public void Validate()
    {
        if (!(Tolerance >= 1e-12 && Tolerance <= 1e-3)) throw new ArgumentOutOfRangeException(nameof(Tolerance), Tolerance, "bispectrum tolerance must lie in [1e-12, 1e-3]");
        if (!(Damping > 0 && Damping <= 2)) throw new ArgumentOutOfRangeException(nameof(Damping), Damping, "damping kappa must lie in (0, 2]");
        if (StartDepth != 0 && !(StartDepth >= 20 && StartDepth <= 1e5)) throw new ArgumentOutOfRangeException(nameof(StartDepth), StartDepth, "start depth K/aH must lie in [20, 1e5] (or 0 for automatic)");
        if (!(EndDepth > 0 && EndDepth <= 0.1)) throw new ArgumentOutOfRangeException(nameof(EndDepth), EndDepth, "end depth k/aH must lie in (0, 0.1]");
        if (!(MaxPanel > 0 && MaxPanel <= 1)) throw new ArgumentOutOfRangeException(nameof(MaxPanel), MaxPanel, "panel width must lie in (0, 1] e-folds");
        if (!(PanelPhase > 0 && PanelPhase <= 8)) throw new ArgumentOutOfRangeException(nameof(PanelPhase), PanelPhase, "panel phase must lie in (0, 8] radians");
    }

    /// <summary>
    /// The start depth used: K/(aH) where (K/aH)^2 exp(-kappa/4 K/aH) = tolerance / 100 (the integrand grows as (K/aH)^2
    /// inside the horizon), at least 40.
    /// </summary>
    public double EffectiveStartDepth
    {
        get
        {
            if (StartDepth != 0) return StartDepth;
            double kMin = 0.25 * Damping, target = Math.Log(100.0 / Tolerance);
            double x = 40;
            for (int i = 0; i < 60; i++) x = (target + 2.0 * Math.Log(x)) / kMin; // fixed point: kMin x - 2 ln x = target
            return Math.Max(40.0, x);
        }
    }
}
