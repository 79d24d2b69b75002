namespace ModeSolver.Models;

/// <summary>
/// Field-space geometry from the metric and its derivatives (physics.md section 7): Cholesky factor, inverse, Christoffel
/// symbols, their derivatives, the Riemann tensor, Ricci tensor and Ricci scalar. Pure functions on spans, allocation-free.
/// </summary>
/// <remarks>
/// Layouts are those of <see cref="IFieldTheory"/>; metric derivatives are d_K G_IJ at [K * n^2 + I * n + J] and
/// d_M d_K G_IJ at [(M * n + K) * n^2 + I * n + J]; Christoffel derivatives d_M Gamma^I_JK at [M * n^3 + (I * n + J) * n + K].
/// Conventions: Gamma^I_JK = (1/2) G^IL (d_J G_LK + d_K G_LJ - d_L G_JK);
/// R^I_JKL = d_K Gamma^I_LJ - d_L Gamma^I_KJ + Gamma^I_KM Gamma^M_LJ - Gamma^I_LM Gamma^M_KJ; R_JL = R^I_JIL; R = G^JL R_JL
/// (positive on a sphere).
/// </remarks>
public static class FieldGeometry
{
    /// <summary>
    /// The Cholesky factor L (lower triangular, row-major n x n, G = L L^T) of the symmetric <paramref name="metric"/>.
    /// Returns false (and leaves <paramref name="lower"/> partly written) when G is not positive definite or not finite.
    /// </summary>
    public static bool Cholesky(ReadOnlySpan<double> metric, int n, Span<double> lower)
    {
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                double s = metric[i * n + j];
                for (int k = 0; k < j; k++) s -= lower[i * n + k] * lower[j * n + k];
                if (i == j)
                {
                    if (!(s > 0) || !double.IsFinite(s)) return false;
                    lower[i * n + i] = Math.Sqrt(s);
                }
                else
                {
                    lower[i * n + j] = s / lower[j * n + j];
                }
            }
            for (int j = i + 1; j < n; j++) lower[i * n + j] = 0.0;
        }
        return true;
    }

    /// <summary>Solves G x = b with the Cholesky factor from <see cref="Cholesky"/>; <paramref name="x"/> may alias <paramref name="b"/>.</summary>
    public static void CholeskySolve(ReadOnlySpan<double> lower, int n, ReadOnlySpan<double> b, Span<double> x)
    {
        for (int i = 0; i < n; i++)
        {
            double s = b[i];
            for (int k = 0; k < i; k++) s -= lower[i * n + k] * x[k];
            x[i] = s / lower[i * n + i];
        }
        for (int i = n - 1; i >= 0; i--)
        {
            double s = x[i];
            for (int k = i + 1; k < n; k++) s -= lower[k * n + i] * x[k];
            x[i] = s / lower[i * n + i];
        }
    }

    /// <summary>
    /// The inverse of the symmetric positive-definite <paramref name="metric"/> through its Cholesky factor, using
    /// <paramref name="scratch"/> (n^2) for the factor. Returns false where G is not positive definite.
    /// </summary>
    public static bool Inverse(ReadOnlySpan<double> metric, int n, Span<double> inverse, Span<double> scratch)
    {
        var lower = scratch[..(n * n)];
        if (!Cholesky(metric, n, lower)) return false;
        for (int j = 0; j < n; j++)
        {
            // Solve G x = e_j into row j of the inverse (symmetric, so rows are columns).
            var x = inverse.Slice(j * n, n);
            x.Clear();
            x[j] = 1.0;
            CholeskySolve(lower, n, x, x);
        }
        return true;
    }

    /// <summary>The smallest leading-minor pivot of G's Cholesky factorisation, squared (positive exactly when G is positive definite); NaN for non-finite input. Scratch n^2.</summary>
    public static double SmallestPivot(ReadOnlySpan<double> metric, int n, Span<double> scratch)
    {
        double min = double.PositiveInfinity;
        var lower = scratch[..(n * n)];
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j <= i; j++)
            {
                double s = metric[i * n + j];
                for (int k = 0; k < j; k++) s -= lower[i * n + k] * lower[j * n + k];
                if (i == j)
                {
                    if (double.IsNaN(s)) return double.NaN;
                    min = Math.Min(min, s);
                    if (!(s > 0)) return min;
                    lower[i * n + i] = Math.Sqrt(s);
                }
                else lower[i * n + j] = s / lower[j * n + j];
            }
        }
        return min;
    }

    /// <summary>Gamma^I_JK from the inverse metric and the metric derivatives d_K G_IJ.</summary>
    public static void Christoffel(int n, ReadOnlySpan<double> inverse, ReadOnlySpan<double> metricDerivative, Span<double> christoffel)
    {
        int n2 = n * n;
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++)
                for (int k = j; k < n; k++)
                {
                    double s = 0;
                    for (int l = 0; l < n; l++)
                        s += inverse[i * n + l] * (metricDerivative[j * n2 + l * n + k] + metricDerivative[k * n2 + l * n + j] - metricDerivative[l * n2 + j * n + k]);
                    christoffel[(i * n + j) * n + k] = 0.5 * s;
                    christoffel[(i * n + k) * n + j] = 0.5 * s;
                }
    }

    /// <summary>The scratch length <see cref="ChristoffelDerivative"/> needs: n^3 + n^2.</summary>
    public static int ChristoffelDerivativeScratch(int n) => n * n * n + n * n;

    /// <summary>
    /// d_M Gamma^I_JK from the inverse metric, d_K G_IJ and d_M d_K G_IJ:
    /// d_M Gamma^I_JK = (d_M G^IL) Gamma_LJK + G^IL d_M Gamma_LJK with d_M G^IL = -G^IA (d_M G_AB) G^BL and
    /// Gamma_LJK = (1/2)(d_J G_LK + d_K G_LJ - d_L G_JK). Uses <paramref name="scratch"/> of <see cref="ChristoffelDerivativeScratch"/>.
    /// </summary>
    public static void ChristoffelDerivative(int n, ReadOnlySpan<double> inverse, ReadOnlySpan<double> metricDerivative,
        ReadOnlySpan<double> metricSecondDerivative, Span<double> christoffelDerivative, Span<double> scratch)
    {
        int n2 = n * n, n3 = n2 * n;
        var first = scratch[..n3];          // Gamma_LJK
        var dInverse = scratch.Slice(n3, n2); // d_M G^IL for one M
        for (int l = 0; l < n; l++)
            for (int j = 0; j < n; j++)
                for (int k = 0; k < n; k++)
                    first[(l * n + j) * n + k] = 0.5 * (metricDerivative[j * n2 + l * n + k] + metricDerivative[k * n2 + l * n + j] - metricDerivative[l * n2 + j * n + k]);
        for (int m = 0; m < n; m++)
        {
            for (int i = 0; i < n; i++)
                for (int l = 0; l < n; l++)
                {
                    double s = 0;
                    for (int a = 0; a < n; a++)
                        for (int b = 0; b < n; b++)
                            s += inverse[i * n + a] * metricDerivative[m * n2 + a * n + b] * inverse[b * n + l];
                    dInverse[i * n + l] = -s;
                }
            for (int i = 0; i < n; i++)
                for (int j = 0; j < n; j++)
                    for (int k = 0; k < n; k++)
                    {
                        double s = 0;
                        for (int l = 0; l < n; l++)
                        {
                            double dFirst = 0.5 * (metricSecondDerivative[(m * n + j) * n2 + l * n + k] + metricSecondDerivative[(m * n + k) * n2 + l * n + j]
                                                   - metricSecondDerivative[(m * n + l) * n2 + j * n + k]);
                            s += dInverse[i * n + l] * first[(l * n + j) * n + k] + inverse[i * n + l] * dFirst;
                        }
                        christoffelDerivative[m * n3 + (i * n + j) * n + k] = s;
                    }
        }
    }

    /// <summary>R^I_JKL = d_K Gamma^I_LJ - d_L Gamma^I_KJ + Gamma^I_KM Gamma^M_LJ - Gamma^I_LM Gamma^M_KJ.</summary>
    public static void Riemann(int n, ReadOnlySpan<double> christoffel, ReadOnlySpan<double> christoffelDerivative, Span<double> riemann)
    {
        int n3 = n * n * n;
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++)
                for (int k = 0; k < n; k++)
                    for (int l = 0; l < n; l++)
                    {
                        double s = christoffelDerivative[k * n3 + (i * n + l) * n + j] - christoffelDerivative[l * n3 + (i * n + k) * n + j];
                        for (int m = 0; m < n; m++)
                            s += christoffel[(i * n + k) * n + m] * christoffel[(m * n + l) * n + j] - christoffel[(i * n + l) * n + m] * christoffel[(m * n + k) * n + j];
                        riemann[((i * n + j) * n + k) * n + l] = s;
                    }
    }

    /// <summary>The scratch length <see cref="ChristoffelFromMetric"/> needs: 2 n^2.</summary>
    public static int ChristoffelFromMetricScratch(int n) => 2 * n * n;

    /// <summary>
    /// Gamma^I_JK from the metric and d_K G_IJ: the inverse through the Cholesky factor, then <see cref="Christoffel"/>.
    /// Returns false (and fills <paramref name="christoffel"/> with NaN) where G is not positive definite.
    /// </summary>
    public static bool ChristoffelFromMetric(int n, ReadOnlySpan<double> metric, ReadOnlySpan<double> metricDerivative, Span<double> christoffel, Span<double> scratch)
    {
        int n2 = n * n;
        var inverse = scratch[..n2];
        if (!Inverse(metric, n, inverse, scratch.Slice(n2, n2))) { christoffel[..(n2 * n)].Fill(double.NaN); return false; }
        Christoffel(n, inverse, metricDerivative, christoffel);
        return true;
    }

    /// <summary>The scratch length <see cref="RiemannFromMetric"/> needs: 2 n^2 + n^3 + n^4 + <see cref="ChristoffelDerivativeScratch"/>.</summary>
    public static int RiemannFromMetricScratch(int n) => 2 * n * n + n * n * n + n * n * n * n + ChristoffelDerivativeScratch(n);

    /// <summary>
    /// R^I_JKL from the metric, d_K G_IJ and d_M d_K G_IJ (inverse, Christoffel symbols and their derivatives, then
    /// <see cref="Riemann"/>). Returns false (and fills <paramref name="riemann"/> with NaN) where G is not positive definite.
    /// </summary>
    public static bool RiemannFromMetric(int n, ReadOnlySpan<double> metric, ReadOnlySpan<double> metricDerivative,
        ReadOnlySpan<double> metricSecondDerivative, Span<double> riemann, Span<double> scratch)
    {
        int n2 = n * n, n3 = n2 * n, n4 = n3 * n;
        var inverse = scratch[..n2];
        var gamma = scratch.Slice(n2, n3);
        var dgamma = scratch.Slice(n2 + n3, n4);
        var rest = scratch.Slice(n2 + n3 + n4, Math.Max(n2, ChristoffelDerivativeScratch(n)));
        if (!Inverse(metric, n, inverse, rest[..n2])) { riemann[..n4].Fill(double.NaN); return false; }
        Christoffel(n, inverse, metricDerivative, gamma);
        ChristoffelDerivative(n, inverse, metricDerivative, metricSecondDerivative, dgamma, rest);
        Riemann(n, gamma, dgamma, riemann);
        return true;
    }

    /// <summary>The Ricci tensor R_JL = R^I_JIL (n x n).</summary>
    public static void Ricci(int n, ReadOnlySpan<double> riemann, Span<double> ricci)
    {
        for (int j = 0; j < n; j++)
            for (int l = 0; l < n; l++)
            {
                double s = 0;
                for (int i = 0; i < n; i++) s += riemann[((i * n + j) * n + i) * n + l];
                ricci[j * n + l] = s;
            }
    }

    /// <summary>The Ricci scalar G^JL R_JL.</summary>
    public static double RicciScalar(int n, ReadOnlySpan<double> inverse, ReadOnlySpan<double> ricci)
    {
        double s = 0;
        for (int i = 0; i < n * n; i++) s += inverse[i] * ricci[i];
        return s;
    }

    /// <summary>
    /// The field-space Ricci scalar of <paramref name="theory"/> at <paramref name="phi"/> from its inverse metric and Riemann
    /// tensor. Allocates its work arrays: for diagnostics and tests, not for right-hand sides.
    /// </summary>
    public static double RicciScalar(IFieldTheory theory, ReadOnlySpan<double> phi)
    {
        ArgumentNullException.ThrowIfNull(theory);
        int n = theory.FieldCount;
        var inverse = new double[n * n];
        var riemann = new double[n * n * n * n];
        var ricci = new double[n * n];
        if (!theory.InverseMetric(phi, inverse))
            throw new ArgumentException("the field-space metric is not positive definite here", nameof(phi));
        theory.Riemann(phi, riemann);
        Ricci(n, riemann, ricci);
        return RicciScalar(n, inverse, ricci);
    }
}
