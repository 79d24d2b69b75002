using System.Buffers;

namespace ModeSolver.Models;

/// <summary>A function of the n field values with an array result (gradient, matrix, derivative tensor), written into <paramref name="result"/>. Allocation-free.</summary>
public delegate void FieldArray(ReadOnlySpan<double> phi, Span<double> result);

/// <summary>
/// An n-field theory written in C#: a potential V(phi) and a field-space metric G_IJ(phi) (identity when not given), with
/// the derivatives either supplied in closed form or computed by <see cref="NumericalDerivatives"/>.
/// Christoffel symbols and the Riemann tensor follow from them through <see cref="FieldGeometry"/>.
/// </summary>
/// <remarks>
/// Layouts are those of <see cref="IFieldTheory"/> and <see cref="FieldGeometry"/>: gradient [I], Hessian and metric
/// [I * n + J], d_K G_IJ at [K * n^2 + I * n + J], d_M d_K G_IJ at [(M * n + K) * n^2 + I * n + J].
/// </remarks>
public sealed class MetricFieldTheory : IFieldTheory
{
    private readonly int _n;
    private readonly FieldScalar _potential;
    private readonly FieldArray? _gradient;
    private readonly FieldArray? _hessian;
    private readonly FieldArray? _metric;
    private readonly FieldArray? _metricDerivative;
    private readonly FieldArray? _metricSecondDerivative;
    private readonly string[] _names;
    private readonly FieldSurface[] _nonSmooth;
    private readonly FieldSurface[] _boundaries;

    /// <summary>
    /// Creates the theory. Every derivative left null is computed by <see cref="NumericalDerivatives"/> from the function
    /// it differentiates (the gradient from V, the Hessian from the gradient, the metric derivatives from the metric).
    /// </summary>
    /// <param name="fieldNames">The n field names in field order.</param>
    /// <param name="potential">V(phi), unscaled.</param>
    /// <param name="metric">G_IJ(phi) (n x n, symmetric), or null for canonical fields (G = identity).</param>
    /// <param name="gradient">V_I in closed form, or null.</param>
    /// <param name="hessian">d_I d_J V in closed form, or null.</param>
    /// <param name="metricDerivative">d_K G_IJ in closed form, or null.</param>
    /// <param name="metricSecondDerivative">d_M d_K G_IJ in closed form, or null (only the Riemann tensor needs it).</param>
    /// <param name="description">One-line description.</param>
    /// <param name="nonSmooth">Surfaces where V or G is not smooth.</param>
    /// <param name="boundaries">Boundaries of the valid region.</param>
    public MetricFieldTheory(IReadOnlyList<string> fieldNames, FieldScalar potential, FieldArray? metric = null,
        FieldArray? gradient = null, FieldArray? hessian = null, FieldArray? metricDerivative = null, FieldArray? metricSecondDerivative = null,
        string? description = null, IReadOnlyList<FieldSurface>? nonSmooth = null, IReadOnlyList<FieldSurface>? boundaries = null)
    {
        ArgumentNullException.ThrowIfNull(fieldNames);
        ArgumentNullException.ThrowIfNull(potential);
        if (fieldNames.Count < 1) throw new ArgumentException("a theory needs at least one field", nameof(fieldNames));
        _n = fieldNames.Count;
        _names = fieldNames.ToArray();
        _potential = potential;
        _metric = metric;
        _gradient = gradient;
        _hessian = hessian;
        _metricDerivative = metricDerivative;
        _metricSecondDerivative = metricSecondDerivative;
        Description = description ?? $"{_n}-field theory ({string.Join(", ", _names)})";
        _nonSmooth = nonSmooth?.ToArray() ?? Array.Empty<FieldSurface>();
        _boundaries = boundaries?.ToArray() ?? Array.Empty<FieldSurface>();
    }

    /// <inheritdoc/>
    public string Description { get; }

    /// <inheritdoc/>
    public int FieldCount => _n;

    /// <inheritdoc/>
    public IReadOnlyList<string> FieldNames => _names;

    /// <inheritdoc/>
    public bool IsCanonical => _metric is null;

    /// <inheritdoc/>
    public IReadOnlyList<FieldSurface> NonSmoothSurfaces => _nonSmooth;

    /// <inheritdoc/>
    public IReadOnlyList<FieldSurface> Boundaries => _boundaries;

    /// <inheritdoc/>
    public double Potential(ReadOnlySpan<double> phi) => _potential(phi[.._n]);

    /// <inheritdoc/>
    public double PotentialGradient(ReadOnlySpan<double> phi, Span<double> gradient)
    {
        phi = phi[.._n];
        if (_gradient is not null) _gradient(phi, gradient);
        else NumericalDerivatives.Gradient(_potential, phi, gradient);
        return _potential(phi);
    }

    /// <inheritdoc/>
    public void PotentialHessian(ReadOnlySpan<double> phi, Span<double> hessian)
    {
        phi = phi[.._n];
        if (_hessian is not null) _hessian(phi, hessian);
        else if (_gradient is not null) NumericalDerivatives.Jacobian(_gradient, _n, phi, hessian[..(_n * _n)]);
        else NumericalDerivatives.Hessian(_potential, phi, hessian);
        // Symmetrise the numerical forms (exact for closed forms that are symmetric already).
        if (_hessian is null) Symmetrise(hessian, _n);
    }

    /// <inheritdoc/>
    public void Metric(ReadOnlySpan<double> phi, Span<double> metric)
    {
        phi = phi[.._n];
        if (_metric is not null) { _metric(phi, metric); return; }
        metric[..(_n * _n)].Clear();
        for (int i = 0; i < _n; i++) metric[i * _n + i] = 1.0;
    }

    /// <inheritdoc/>
    public bool InverseMetric(ReadOnlySpan<double> phi, Span<double> inverse)
    {
        int n2 = _n * _n;
        Span<double> g = n2 <= 256 ? stackalloc double[n2] : new double[n2];
        Span<double> scratch = n2 <= 256 ? stackalloc double[n2] : new double[n2];
        Metric(phi, g);
        return FieldGeometry.Inverse(g, _n, inverse, scratch);
    }

    /// <summary>d_K G_IJ at [K * n^2 + I * n + J]: the closed form, zero for canonical fields, or numerical.</summary>
    public void MetricDerivative(ReadOnlySpan<double> phi, Span<double> derivative)
    {
        phi = phi[.._n];
        int n3 = _n * _n * _n;
        if (_metric is null) { derivative[..n3].Clear(); return; }
        if (_metricDerivative is not null) { _metricDerivative(phi, derivative); return; }
        NumericalDerivatives.Jacobian(_metric, _n * _n, phi, derivative[..n3], transposed: true);
    }

    /// <summary>d_M d_K G_IJ at [(M * n + K) * n^2 + I * n + J]: the closed form, zero for canonical fields, or numerical.</summary>
    public void MetricSecondDerivative(ReadOnlySpan<double> phi, Span<double> derivative)
    {
        phi = phi[.._n];
        int n4 = _n * _n * _n * _n;
        if (_metric is null) { derivative[..n4].Clear(); return; }
        if (_metricSecondDerivative is not null) { _metricSecondDerivative(phi, derivative); return; }
        if (_metricDerivative is not null)
        {
            // d_M of (d_K G_IJ) laid out [K n^2 + I n + J]: the Jacobian's [M, (K, I, J)] is exactly [(M n + K) n^2 + I n + J].
            NumericalDerivatives.Jacobian(_metricDerivative, _n * _n * _n, phi, derivative[..n4], transposed: true);
            return;
        }
        NumericalDerivatives.SecondDerivatives(_metric, _n * _n, phi, derivative[..n4]);
    }

    /// <inheritdoc/>
    public void Christoffel(ReadOnlySpan<double> phi, Span<double> christoffel)
    {
        int n = _n, n2 = n * n, n3 = n2 * n;
        if (_metric is null) { christoffel[..n3].Clear(); return; }
        double[]? rented = null;
        Span<double> work = 2 * n2 + n3 <= 2048 ? stackalloc double[2 * n2 + n3] : (rented = ArrayPool<double>.Shared.Rent(2 * n2 + n3));
        try
        {
            var g = work[..n2];
            var inverse = work.Slice(n2, n2);
            var dg = work.Slice(2 * n2, n3);
            Metric(phi, g);
            if (!FieldGeometry.Inverse(g, n, inverse, dg[..n2])) { christoffel[..n3].Fill(double.NaN); return; }
            MetricDerivative(phi, dg);
            FieldGeometry.Christoffel(n, inverse, dg, christoffel);
        }
        finally
        {
            if (rented is not null) ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <inheritdoc/>
    public void Riemann(ReadOnlySpan<double> phi, Span<double> riemann)
    {
        int n = _n, n2 = n * n, n3 = n2 * n, n4 = n3 * n;
        if (_metric is null) { riemann[..n4].Clear(); return; }
        int length = 2 * n2 + 2 * n3 + 2 * n4 + FieldGeometry.ChristoffelDerivativeScratch(n);
        double[] work = ArrayPool<double>.Shared.Rent(length);
        try
        {
            var span = work.AsSpan(0, length);
            var g = span[..n2];
            var inverse = span.Slice(n2, n2);
            var dg = span.Slice(2 * n2, n3);
            var gamma = span.Slice(2 * n2 + n3, n3);
            var ddg = span.Slice(2 * n2 + 2 * n3, n4);
            var dgamma = span.Slice(2 * n2 + 2 * n3 + n4, n4);
            var scratch = span[(2 * n2 + 2 * n3 + 2 * n4)..];
            Metric(phi, g);
            if (!FieldGeometry.Inverse(g, n, inverse, gamma[..n2])) { riemann[..n4].Fill(double.NaN); return; }
            MetricDerivative(phi, dg);
            MetricSecondDerivative(phi, ddg);
            FieldGeometry.Christoffel(n, inverse, dg, gamma);
            FieldGeometry.ChristoffelDerivative(n, inverse, dg, ddg, dgamma, scratch);
            FieldGeometry.Riemann(n, gamma, dgamma, riemann);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(work);
        }
    }

    private static void Symmetrise(Span<double> m, int n)
    {
        for (int i = 0; i < n; i++)
            for (int j = i + 1; j < n; j++)
            {
                double s = 0.5 * (m[i * n + j] + m[j * n + i]);
                m[i * n + j] = s;
                m[j * n + i] = s;
            }
    }
}
