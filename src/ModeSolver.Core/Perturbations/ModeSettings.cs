namespace ModeSolver.Perturbations;

/// <summary>Which Bunch-Davies initial data start a mode.</summary>
public enum InitialDataKind
{
    /// <summary>Exact power-law (Hankel) solution with the local index nu from U and (1 - e1) at the start (physics.md 3). Accurate from k/aH ~ 3-5.</summary>
    LocalIndexHankel,
    /// <summary>Quasi-de Sitter form exp(-i k tau)(1 - i/(k tau))/sqrt(2k), tau = -1/((1 - e1) aH): the Hankel form with nu = 3/2.</summary>
    QuasiDeSitter,
}

/// <summary>Which perturbations one mode integration carries.</summary>
[Flags]
public enum ModeKinds
{
    /// <summary>Comoving curvature perturbation zeta (Mukhanov-Sasaki).</summary>
    Scalar = 1,
    /// <summary>Tensor amplitude h (one polarisation; P_t counts both).</summary>
    Tensor = 2,
    /// <summary>Both in one system (one background evaluation per right-hand side).</summary>
    Both = Scalar | Tensor,
}

/// <summary>Settings of one mode integration.</summary>
public sealed record ModeSettings
{
    /// <summary>Target relative accuracy of P_s and P_t (default 1e-6). Sets the step tolerance, the start depth and the stop.</summary>
    public double Tolerance { get; init; } = 1e-6;

    /// <summary>
    /// Smallest k/aH at the start; 0 chooses it from <see cref="Tolerance"/> and <see cref="InitialData"/> (7 at 1e-6 for the
    /// Hankel data, at most 20: deeper starts add integration error to the second k-derivative, whose block is ~(k/aH)^2
    /// larger inside the horizon than after exit). The start goes deeper where the estimated initial-data error exceeds the
    /// tolerance, before any non-smooth point the mode is inside the horizon at, and to at least twice the background's
    /// oscillation frequency per e-fold where the background oscillates (resonant features).
    /// </summary>
    public double StartDepth { get; init; }

    /// <summary>Largest k/aH at which the mode may be declared frozen; 0 chooses it from <see cref="Tolerance"/>.</summary>
    public double StopDepth { get; init; }

    /// <summary>Initial data (default: local-index Hankel).</summary>
    public InitialDataKind InitialData { get; init; } = InitialDataKind.LocalIndexHankel;

    /// <summary>Scalar, tensor or both (default both).</summary>
    public ModeKinds Kinds { get; init; } = ModeKinds.Both;

    /// <summary>Also integrate the first and second k-derivatives (sensitivities) for exact n_s, n_t, alpha_s (default true).</summary>
    public bool Derivatives { get; init; } = true;

    /// <summary>Step budget of one mode.</summary>
    public int MaxSteps { get; init; } = 20_000;

    /// <summary>Ratio of the integrator's relative tolerance to <see cref="Tolerance"/> (default 0.5).</summary>
    public double StepToleranceRatio { get; init; } = 0.5;

    internal void Validate()
    {
        if (!(Tolerance > 0 && Tolerance < 0.1)) throw new ArgumentOutOfRangeException(nameof(Tolerance), Tolerance, "mode tolerance must lie in (0, 0.1)");
        if (StartDepth != 0 && !(StartDepth >= 1)) throw new ArgumentOutOfRangeException(nameof(StartDepth), StartDepth, "start depth k/aH must be at least 1 (or 0 for automatic)");
        if (StopDepth != 0 && !(StopDepth > 0 && StopDepth < 1)) throw new ArgumentOutOfRangeException(nameof(StopDepth), StopDepth, "stop depth k/aH must lie in (0, 1) (or 0 for automatic)");
        if ((Kinds & ModeKinds.Both) == 0) throw new ArgumentOutOfRangeException(nameof(Kinds), Kinds, "choose scalar, tensor or both");
        if (MaxSteps < 10) throw new ArgumentOutOfRangeException(nameof(MaxSteps), MaxSteps, "step budget too small");
        if (!(StepToleranceRatio > 0 && StepToleranceRatio <= 1)) throw new ArgumentOutOfRangeException(nameof(StepToleranceRatio), StepToleranceRatio, "step tolerance ratio must lie in (0, 1]");
    }

    /// <summary>The start depth actually used.</summary>
    public double EffectiveStartDepth => StartDepth != 0 ? StartDepth
        : InitialData == InitialDataKind.LocalIndexHankel ? Math.Max(4.0, Math.Min(20.0, 7.0 * Math.Pow(1e-6 / Tolerance, 1.0 / 3.0)))
        : Math.Max(5.0, Math.Min(400.0, 50.0 * Math.Sqrt(1e-5 / Tolerance)));

    /// <summary>The stop depth actually used.</summary>
    public double EffectiveStopDepth => StopDepth != 0 ? StopDepth : Math.Min(0.1, 3.0 * Math.Sqrt(Tolerance));
}

/// <summary>The result of one mode integration at wavenumber <paramref name="K"/> (background units).</summary>
/// <param name="K">Wavenumber (background units: k/aH = K exp(-N)/H).</param>
/// <param name="Ps">Scalar power k^3 |zeta|^2 / (2 pi^2) (NaN when not integrated).</param>
/// <param name="Pt">Tensor power 8 k^3 |u/a|^2 / (2 pi^2), both polarisations (NaN when not integrated).</param>
/// <param name="NsMinusOne">d ln P_s / d ln k (NaN without derivatives).</param>
/// <param name="AlphaS">d^2 ln P_s / d ln k^2.</param>
/// <param name="Nt">d ln P_t / d ln k.</param>
/// <param name="NStart">N where the mode started.</param>
/// <param name="NFinal">N where it stopped.</param>
/// <param name="StartDepth">k/aH at the start.</param>
/// <param name="FinalDepth">k/aH at the stop.</param>
/// <param name="FrozenBeforeEnd">True when the mode froze before the end of inflation; false when it was read off at NEnd.</param>
/// <param name="RhsEvaluations">Right-hand-side evaluations (each one background evaluation).</param>
/// <param name="Steps">Accepted plus rejected steps.</param>
/// <param name="ErrorEstimate">Estimated relative error of P (integrator and stop parts; see notes).</param>
public sealed record ModeResult(
    double K, double Ps, double Pt, double NsMinusOne, double AlphaS, double Nt,
    double NStart, double NFinal, double StartDepth, double FinalDepth, bool FrozenBeforeEnd,
    int RhsEvaluations, int Steps, double ErrorEstimate)
{
    /// <summary>r = P_t / P_s.</summary>
    public double R => Pt / Ps;
    /// <summary>d n_t / d ln k (NaN without derivatives).</summary>
    public double AlphaT { get; init; } = double.NaN;
    /// <summary>n_s = 1 + d ln P_s / d ln k.</summary>
    public double Ns => 1.0 + NsMinusOne;
    /// <summary>
    /// True when the mode started after (part of) a fast feature it was inside the horizon for, and the first-order bound
    /// on the excitation it missed exceeds 0.1: <see cref="ErrorEstimate"/> is then not a bound.
    /// </summary>
    public bool StartedInFeature { get; init; }
}
