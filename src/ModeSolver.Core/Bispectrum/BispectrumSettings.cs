namespace ModeSolver.Bispectrum;

/// <summary>Numerical settings of the in-in integration of the tree-level bispectrum.</summary>
public sealed record BispectrumSettings
{
    /// <summary>Target relative accuracy of the mode histories (default 1e-7); the error estimate reruns them at a tenth of it.</summary>
    public double Tolerance { get; init; } = 1e-7;

    /// <summary>
    /// Start of the numerical in-in integral as K/(aH), K the perimeter (default 50). Earlier times enter through the
    /// kappa -> 0 limit of the convergence factor exp(-kappa K/(aH)) taken analytically (<see cref="EarlyTimes"/>); the error
    /// estimate also starts twice as deep.
    /// </summary>
    public double StartDepth { get; init; } = 50;

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
        if (!(StartDepth >= 10 && StartDepth <= 1e4)) throw new ArgumentOutOfRangeException(nameof(StartDepth), StartDepth, "start depth K/aH must lie in [10, 1e4]");
        if (!(EndDepth > 0 && EndDepth <= 0.1)) throw new ArgumentOutOfRangeException(nameof(EndDepth), EndDepth, "end depth k/aH must lie in (0, 0.1]");
        if (!(MaxPanel > 0 && MaxPanel <= 1)) throw new ArgumentOutOfRangeException(nameof(MaxPanel), MaxPanel, "panel width must lie in (0, 1] e-folds");
        if (!(PanelPhase > 0 && PanelPhase <= 8)) throw new ArgumentOutOfRangeException(nameof(PanelPhase), PanelPhase, "panel phase must lie in (0, 8] radians");
    }
}
