namespace ModeSolver.Bispectrum;

/// <summary>What a run asks of the bispectrum stage (plain numbers; k in 1/Mpc).</summary>
public sealed record BispectrumRequest
{
    /// <summary>Points of the equilateral curve f_NL(k) across the run's k range (0: the pivot only).</summary>
    public int EquilateralPoints { get; init; }

    /// <summary>k3/k1 of the isosceles squeezed triangle (k, k, ratio k) at the pivot.</summary>
    public double SqueezedRatio { get; init; } = 0.01;

    /// <summary>Points per side of the shape grid over (x2, x3) = (k2/k1, k3/k1) at k1 = k_pivot (0: none).</summary>
    public int ShapeGrid { get; init; }

    /// <summary>Flag a point where |f_NL exact - slow roll| exceeds this plus the point's error estimate.</summary>
    public double FlagThreshold { get; init; } = 0.05;

    /// <summary>Triangles of the user's choice (k in 1/Mpc).</summary>
    public IReadOnlyList<Triangle> Triangles { get; init; } = [];

    /// <summary>Numerical settings of the in-in integral.</summary>
    public BispectrumSettings Numerics { get; init; } = new();
}
