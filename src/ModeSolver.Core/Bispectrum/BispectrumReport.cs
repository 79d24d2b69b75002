using System.Collections.Immutable;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The bispectrum results of a run (k in 1/Mpc). f_NL = (5/6) B / (P1 P2 + P2 P3 + P3 P1), zeta with spatial metric
/// a^2 e^(2 zeta) delta_ij (physics.md 8). Errors are the per-triangle estimates of <see cref="BispectrumPoint.Error"/>.
/// </summary>
/// <param name="KPivot">k_* (1/Mpc).</param>
/// <param name="Equilateral">f_NL of the equilateral triangle at k_*.</param>
/// <param name="Squeezed">f_NL of the triangle (k_*, k_*, ratio k_*).</param>
/// <param name="SqueezedRatio">k3/k1 of that triangle.</param>
/// <param name="Curve">The equilateral curve across k (may be empty).</param>
/// <param name="Shape">The shape grid at k1 = k_* (null when not asked for).</param>
/// <param name="Flags">Points where the exact f_NL leaves slow roll by more than the threshold, one line each.</param>
/// <param name="FlagThreshold">That threshold (absolute, in f_NL).</param>
public sealed record BispectrumReport(
    double KPivot, FnlValue Equilateral, FnlValue Squeezed, double SqueezedRatio,
    EquilateralCurve Curve, ShapeGrid? Shape, ImmutableArray<string> Flags, double FlagThreshold)
{
    /// <summary>f_NL at the triangles the run asked for (k in 1/Mpc), in their order.</summary>
    public ImmutableArray<TriangleValue> Triangles { get; init; } = [];

    /// <summary>Wall time of the stage (s).</summary>
    public double Seconds { get; init; }
}

/// <summary>One f_NL with its error estimate and the slow-roll value beside it.</summary>
/// <param name="FNL">Exact f_NL.</param>
/// <param name="Error">Its estimated absolute error.</param>
/// <param name="SlowRoll">Leading-order slow roll: (55/36) e1 + (5/12) e2 at exit (equilateral), (5/12)(1 - n_s) with the exact n_s (squeezed).</param>
public readonly record struct FnlValue(double FNL, double Error, double SlowRoll);

/// <summary>The equilateral f_NL(k).</summary>
/// <param name="K">k (1/Mpc), ascending.</param>
/// <param name="FNL">Exact f_NL.</param>
/// <param name="Error">Error estimates.</param>
/// <param name="SlowRoll">(55/36) e1 + (5/12) e2 at exit of each k.</param>
public sealed record EquilateralCurve(ImmutableArray<double> K, ImmutableArray<double> FNL, ImmutableArray<double> Error, ImmutableArray<double> SlowRoll);

/// <summary>f_NL over the triangle shapes (k1, x2 k1, x3 k1) with x3 &lt;= x2 &lt;= 1 and x2 + x3 &gt; 1; NaN outside.</summary>
/// <param name="K1">k1 (1/Mpc).</param>
/// <param name="X">The grid values of x2 and of x3 (the same for both axes).</param>
/// <param name="FNL">f_NL[i2 * X.Length + i3] at (X[i2], X[i3]).</param>
/// <param name="Error">The error estimates on the same grid.</param>
public sealed record ShapeGrid(double K1, ImmutableArray<double> X, ImmutableArray<double> FNL, ImmutableArray<double> Error);

/// <summary>f_NL at one triangle of the user's choice.</summary>
/// <param name="K1">k1 (1/Mpc).</param>
/// <param name="K2">k2 (1/Mpc).</param>
/// <param name="K3">k3 (1/Mpc).</param>
/// <param name="FNL">Exact f_NL.</param>
/// <param name="Error">Its error estimate.</param>
public readonly record struct TriangleValue(double K1, double K2, double K3, double FNL, double Error);
