namespace ModeSolver.Models;

/// <summary>
/// A theory of n scalar fields on a curved field space in the Einstein frame (physics.md section 7):
/// S = int sqrt(-g) [ R/2 - (1/2) G_IJ(phi) d phi^I d phi^J - V(phi) ], reduced Planck units, fields phi^I, I = 0..n-1.
/// </summary>
/// <remarks>
/// Every evaluation writes into caller-provided spans and allocates nothing. Index layouts (row-major, I the first index):
/// matrices (Hessian, metric, inverse) at [I * n + J]; Christoffel symbols Gamma^I_JK at [(I * n + J) * n + K];
/// the Riemann tensor R^I_JKL (physics.md section 7 convention) at [((I * n + J) * n + K) * n + L].
/// One field is the special case n = 1 (<see cref="SingleFieldTheory"/>: G = K, Gamma = K'/(2K), no curvature).
/// A theory may be written in C# (<see cref="MetricFieldTheory"/>) or built from formulas in named fields; any source of V,
/// G_IJ and their derivatives can implement this interface, and <see cref="FieldGeometry"/> derives the curvature from them.
/// </remarks>
public interface IFieldTheory
{
    /// <summary>One-line human description.</summary>
    string Description { get; }

    /// <summary>The number of fields n (at least 1).</summary>
    int FieldCount { get; }

    /// <summary>The fields' names in field order (used in messages and outputs).</summary>
    IReadOnlyList<string> FieldNames { get; }

    /// <summary>V(phi), unscaled. <paramref name="phi"/> holds the n field values (a longer span is read only up to n).</summary>
    double Potential(ReadOnlySpan<double> phi);

    /// <summary>The gradient V_I = d V / d phi^I into <paramref name="gradient"/> (length n); returns V.</summary>
    double PotentialGradient(ReadOnlySpan<double> phi, Span<double> gradient);

    /// <summary>The coordinate Hessian d_I d_J V into <paramref name="hessian"/> (n x n); the covariant one subtracts Gamma^K_IJ V_K.</summary>
    void PotentialHessian(ReadOnlySpan<double> phi, Span<double> hessian);

    /// <summary>The field-space metric G_IJ into <paramref name="metric"/> (n x n, symmetric).</summary>
    void Metric(ReadOnlySpan<double> phi, Span<double> metric);

    /// <summary>The inverse metric G^IJ into <paramref name="inverse"/> (n x n); false where G is not positive definite.</summary>
    bool InverseMetric(ReadOnlySpan<double> phi, Span<double> inverse);

    /// <summary>The Christoffel symbols Gamma^I_JK of G into <paramref name="christoffel"/> (n^3, symmetric in J, K).</summary>
    void Christoffel(ReadOnlySpan<double> phi, Span<double> christoffel);

    /// <summary>The Riemann tensor R^I_JKL of G into <paramref name="riemann"/> (n^4).</summary>
    void Riemann(ReadOnlySpan<double> phi, Span<double> riemann);

    /// <summary>True when G_IJ is the identity everywhere (canonical fields): then Gamma and R vanish.</summary>
    bool IsCanonical { get; }

    /// <summary>Surfaces g(phi) = 0 where V or G is not smooth; the background stops and restarts exactly on them.</summary>
    IReadOnlyList<FieldSurface> NonSmoothSurfaces { get; }

    /// <summary>
    /// Surfaces bounding the region where the theory is valid (a pole of the metric, Omega^2 = 0): the theory is valid on the
    /// side each surface is left from (see <see cref="FieldSurface.Crossing"/>); the background stops when one is crossed.
    /// </summary>
    IReadOnlyList<FieldSurface> Boundaries { get; }
}
