using ModeSolver.Perturbations;

namespace ModeSolver.Spectra;

/// <summary>What <see cref="SpectrumSolver"/> computes: a k range in background units (k/aH = k exp(-N)/H), sampling and accuracy.</summary>
public sealed record SpectrumSettings
{
    /// <summary>Smallest k (background units).</summary>
    public required double KMin { get; init; }

    /// <summary>Largest k (background units).</summary>
    public required double KMax { get; init; }

    /// <summary>Number of log-spaced samples before refinement (at least 2).</summary>
    public int KCount { get; init; } = 64;

    /// <summary>Target relative accuracy of P_s and P_t at the samples and of their interpolation between samples (default 1e-5).</summary>
    public double Tolerance { get; init; } = 1e-5;

    /// <summary>Insert samples where the cubic Hermite interpolation of ln P is not within <see cref="Tolerance"/> (default on).</summary>
    public bool Refine { get; init; } = true;

    /// <summary>Upper limit on the number of samples after refinement.</summary>
    public int MaxPoints { get; init; } = 2000;

    /// <summary>Threads used for the modes; 0 means all processors. Results do not depend on it.</summary>
    public int DegreeOfParallelism { get; init; }

    /// <summary>Extra k values to sample exactly (for example the pivot).</summary>
    public IReadOnlyList<double> ExtraK { get; init; } = Array.Empty<double>();

    /// <summary>Scalar, tensor or both (default both).</summary>
    public ModeKinds Kinds { get; init; } = ModeKinds.Both;

    /// <summary>Initial data of the modes (default local-index Hankel).</summary>
    public InitialDataKind InitialData { get; init; } = InitialDataKind.LocalIndexHankel;

    /// <summary>Accuracy asked of each mode; default <see cref="Tolerance"/>/3 (the rest is left for interpolation).</summary>
    public double? ModeTolerance { get; init; }

    /// <summary>Number of samples re-run at a 10x tighter mode tolerance (deeper start) to measure the error (default 5, plus the extra k).</summary>
    public int ErrorChecks { get; init; } = 5;

    internal ModeSettings ModeSettings(double tolFactor = 1.0) => new()
    {
        Tolerance = (ModeTolerance ?? Tolerance / 3.0) * tolFactor,
        Kinds = Kinds,
        InitialData = InitialData,
        Derivatives = true,
    };

    internal void Validate()
    {
        if (!(KMin > 0) || !double.IsFinite(KMin)) throw new ArgumentOutOfRangeException(nameof(KMin), KMin, "kMin must be positive and finite");
        if (!(KMax >= KMin) || !double.IsFinite(KMax)) throw new ArgumentOutOfRangeException(nameof(KMax), KMax, $"kMax must be finite and at least kMin = {KMin:G6}");
        if (KCount < 2 && KMax > KMin) throw new ArgumentOutOfRangeException(nameof(KCount), KCount, "kCount must be at least 2");
        if (KCount < 1) throw new ArgumentOutOfRangeException(nameof(KCount), KCount, "kCount must be at least 1");
        if (!(Tolerance > 0 && Tolerance < 0.1)) throw new ArgumentOutOfRangeException(nameof(Tolerance), Tolerance, "tolerance must lie in (0, 0.1)");
        if (MaxPoints < KCount) throw new ArgumentOutOfRangeException(nameof(MaxPoints), MaxPoints, $"maxPoints must be at least kCount = {KCount}");
        if (DegreeOfParallelism < 0) throw new ArgumentOutOfRangeException(nameof(DegreeOfParallelism), DegreeOfParallelism, "degree of parallelism must be 0 (all) or positive");
        if (ErrorChecks < 0) throw new ArgumentOutOfRangeException(nameof(ErrorChecks), ErrorChecks, "error checks must be 0 or more");
        if (ModeTolerance is { } mt && !(mt > 0 && mt < 0.1)) throw new ArgumentOutOfRangeException(nameof(ModeTolerance), mt, "mode tolerance must lie in (0, 0.1)");
        foreach (double k in ExtraK)
            if (!(k >= KMin && k <= KMax)) throw new ArgumentOutOfRangeException(nameof(ExtraK), k, $"extra k = {k:G6} lies outside [kMin, kMax] = [{KMin:G6}, {KMax:G6}]");
    }
}
