namespace ModeSolver.Spectra;

/// <summary>
/// Exact primordial spectra sampled in k (background units), ascending. n_s, n_t and alpha_s are exact derivatives at
/// each sample (sensitivity equations), not differences of samples. NaN entries mean "not computed" (scalar-only or
/// tensor-only runs).
/// </summary>
public sealed record PrimordialSpectrum
{
    /// <summary>Wavenumbers (background units), ascending.</summary>
    public required double[] K { get; init; }
    /// <summary>Scalar power P_s.</summary>
    public required double[] Ps { get; init; }
    /// <summary>Tensor power P_t (both polarisations).</summary>
    public required double[] Pt { get; init; }
    /// <summary>r = P_t / P_s.</summary>
    public required double[] R { get; init; }
    /// <summary>n_s = 1 + d ln P_s / d ln k.</summary>
    public required double[] Ns { get; init; }
    /// <summary>n_t = d ln P_t / d ln k.</summary>
    public required double[] Nt { get; init; }
    /// <summary>alpha_s = d n_s / d ln k.</summary>
    public required double[] AlphaS { get; init; }
    /// <summary>alpha_t = d n_t / d ln k.</summary>
    public required double[] AlphaT { get; init; }
    /// <summary>Estimated relative error of P at each sample.</summary>
    public required double[] ErrorEstimate { get; init; }
    /// <summary>
    /// False where <see cref="ErrorEstimate"/> is not a bound: the mode started after a fast feature whose missed excitation
    /// is too large for its first-order bound (<see cref="Perturbations.ModeResult.StartedInFeature"/>).
    /// Empty means all bounded.
    /// </summary>
    public bool[] ErrorBounded { get; init; } = [];
    /// <summary>Right-hand-side evaluations of each mode.</summary>
    public required int[] RhsEvaluations { get; init; }
    /// <summary>True where the mode froze before the end of inflation; false where it was read off at NEnd.</summary>
    public required bool[] FrozenBeforeEnd { get; init; }
    /// <summary>k of the samples re-run at a tighter tolerance.</summary>
    public required double[] CheckK { get; init; }
    /// <summary>Measured relative change of P (larger of P_s, P_t) at each check.</summary>
    public required double[] CheckDeviation { get; init; }
    /// <summary>Largest error estimate of the run.</summary>
    public double MaxRelativeError { get; init; }
    /// <summary>Mean right-hand-side evaluations per mode (samples only; checks excluded).</summary>
    public double MeanRhsEvaluationsPerMode { get; init; }
    /// <summary>Largest right-hand-side evaluations of one mode.</summary>
    public int MaxRhsEvaluationsPerMode { get; init; }
    /// <summary>Tolerance the spectrum was computed to.</summary>
    public double Tolerance { get; init; }

    /// <summary>Number of samples.</summary>
    public int Count => K.Length;

    /// <summary>P_s at k (cubic Hermite in ln k of ln P_s with the exact slopes n_s - 1).</summary>
    public double InterpolatePs(double k) => Math.Exp(Hermite(k, Ps, Ns, 1.0, log: true));
    /// <summary>P_t at k (cubic Hermite in ln k of ln P_t with the exact slopes n_t).</summary>
    public double InterpolatePt(double k) => Math.Exp(Hermite(k, Pt, Nt, 0.0, log: true));
    /// <summary>r = P_t / P_s at k.</summary>
    public double InterpolateR(double k) => InterpolatePt(k) / InterpolatePs(k);
    /// <summary>n_s at k (cubic Hermite with the exact alpha_s).</summary>
    public double InterpolateNs(double k) => Hermite(k, Ns, AlphaS, 0.0, log: false);
    /// <summary>n_t at k (cubic Hermite with the exact alpha_t).</summary>
    public double InterpolateNt(double k) => Hermite(k, Nt, AlphaT, 0.0, log: false);
    /// <summary>alpha_s at k (linear in ln k).</summary>
    public double InterpolateAlphaS(double k)
    {
        CheckRange(k);
        if (K.Length == 1) return AlphaS[0];
        int i = LogHermite.Interval(K, k, out double t, out _);
        return (1 - t) * AlphaS[i] + t * AlphaS[i + 1];
    }

    private void CheckRange(double k)
    {
        if (!(k >= K[0] * (1 - 1e-12) && k <= K[^1] * (1 + 1e-12)))
            throw new ArgumentOutOfRangeException(nameof(k), k, $"k = {k:G6} lies outside the computed range [{K[0]:G6}, {K[^1]:G6}]");
    }

    private double Hermite(double k, double[] f, double[] slope, double slopeOffset, bool log)
    {
        CheckRange(k);
        if (K.Length == 1) return log ? Math.Log(f[0]) : f[0];
        return LogHermite.Value(K, f, slope, slopeOffset, log, k);
    }
}
