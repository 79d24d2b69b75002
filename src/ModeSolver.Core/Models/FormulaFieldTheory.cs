using System.Buffers;
using System.Globalization;
using ModeSolver.Formulas;

namespace ModeSolver.Models;

/// <summary>
/// An n-field theory given as formulas in named fields (physics.md section 7): in the Einstein frame a potential V(phi^I)
/// and a symmetric field-space metric G_IJ(phi^K) (the identity when not given); or in the Jordan frame V_J(phi^I),
/// Omega^2(phi^I) and K^J_IJ(phi^K) (the identity when not given), metric or Palatini formulation, mapped exactly to the
/// Einstein frame: V = V_J / Omega^4 and G_IJ = K^J_IJ / Omega^2 + (3/2) d_I ln Omega^2 d_J ln Omega^2 (metric; Palatini
/// drops the second term; Kaiser 2010, Phys. Rev. D 81, 084044). Gradients, Hessians and metric derivatives are exact up to
/// rounding: the partial derivatives of the formulas come from <see cref="MultiFormula"/> (truncated Taylor arithmetic, to
/// third order for Omega^2) and the frame map is differentiated by hand below, never by finite differences. Christoffel
/// symbols and the Riemann tensor follow through <see cref="FieldGeometry"/>.
/// </summary>
/// <remarks>
/// Non-smooth surfaces are the zero sets of the formulas' switching arguments (abs, step, min, max, piecewise conditions;
/// <see cref="SwitchingArguments"/>); a Jordan-frame theory has the boundary Omega^2 = 0 (valid where Omega^2 &gt; 0), and a
/// metric that depends on the fields the boundary where it stops being positive definite (<see cref="SmallestMetricPivot"/>
/// falling through zero): the background stops there and names the field values.
/// With one field the theory equals <see cref="EinsteinFrameTheory"/> (G = K) or <see cref="JordanFrameTheory"/> to round-off.
/// Evaluations allocate nothing (stack or pooled work arrays) and are thread-safe.
/// </remarks>
public sealed partial class FormulaFieldTheory : IFieldTheory
{
    // Work arrays up to this many doubles live on the stack; larger ones are rented from the shared pool.
    private const int StackDoubles = 512;

    private readonly int _n;
    private readonly string[] _names;
    private readonly MultiFormula _potential;   // V (Einstein frame) or V_J (Jordan frame)
    private readonly MetricFormulas _metric;    // G_IJ (Einstein frame) or K^J_IJ (Jordan frame)
    private readonly MultiFormula? _omega2;     // Omega^2 (Jordan frame), else null
    private readonly double _inducedScale;      // 3/2 in the metric formulation, 0 in Palatini (and the Einstein frame)
    private readonly FieldSurface[] _nonSmooth;
    private readonly FieldSurface[] _boundaries;

    private FormulaFieldTheory(string[] names, MultiFormula potential, MetricFormulas metric, MultiFormula? omega2, bool palatini,
        string description, IReadOnlyDictionary<string, double>? parameters, IEnumerable<string> texts)
    {
        _n = names.Length;
        _names = names;
        _potential = potential;
        _metric = metric;
        _omega2 = omega2;
        IsPalatini = omega2 is not null && palatini;
        _inducedScale = omega2 is not null && !palatini ? 1.5 : 0.0;
        Description = description;
        _nonSmooth = SwitchSurfaces(names, texts, parameters);
        var boundaries = new List<FieldSurface>(2);
        if (omega2 is not null) boundaries.Add(FieldSurface.FromFunction("Omega^2 = 0", phi => omega2.Value(phi[.._n]), SurfaceCrossing.Falling));
        // A metric that depends on the fields may stop being positive definite: the smallest pivot of its Cholesky
        // factorisation falls through zero there (the valid side is pivot > 0).
        if (!metric.IsConstant)
            boundaries.Add(FieldSurface.FromFunction("G_IJ not positive definite: smallest Cholesky pivot = 0", SmallestMetricPivot, SurfaceCrossing.Falling));
        _boundaries = [.. boundaries];
    }

    /// <summary>The smallest pivot of the Cholesky factorisation of G_IJ at <paramref name="phi"/>: positive exactly where G is positive definite.</summary>
    public double SmallestMetricPivot(ReadOnlySpan<double> phi)
    {
        int n2 = _n * _n, length = 2 * n2;
        double[]? rented = null;
        Span<double> work = length <= StackDoubles ? stackalloc double[length] : (rented = ArrayPool<double>.Shared.Rent(length)).AsSpan(0, length);
        try
        {
            var g = work[..n2];
            Metric(phi, g);
            return FieldGeometry.SmallestPivot(g, _n, work[n2..]);
        }
        finally
        {
            if (rented is not null) ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <summary>An Einstein-frame theory: V(phi^I) and G_IJ(phi^K) as formulas in <paramref name="fields"/>.</summary>
    /// <param name="fields">The field names in field order (at least one, distinct; they are the formulas' variables).</param>
    /// <param name="potential">V as a formula.</param>
    /// <param name="metric">G_IJ as n rows of n formulas, symmetric (the same formula at [I][J] and [J][I]), or null for the identity.</param>
    /// <param name="parameters">Named parameter values the formulas use.</param>
    /// <param name="description">One-line description (a default lists the formulas).</param>
    /// <exception cref="FormulaException">a formula does not parse (an unknown name, a field not in <paramref name="fields"/>).</exception>
    /// <exception cref="TheoryException">the metric is not n x n or not symmetric.</exception>
    public static FormulaFieldTheory Einstein(IReadOnlyList<string> fields, string potential, IReadOnlyList<IReadOnlyList<string>>? metric = null,
        IReadOnlyDictionary<string, double>? parameters = null, string? description = null)
    {
        var names = CheckFields(fields);
        ArgumentNullException.ThrowIfNull(potential);
        var v = MultiFormula.Compile(potential, names, parameters);
        var g = MetricFormulas.Create(names, metric, parameters, "metric G_IJ");
        description ??= $"{names.Length}-field theory ({string.Join(", ", names)}): V = {potential}" + (metric is null ? "" : $", G = {MetricFormulas.Describe(metric)}");
        return new FormulaFieldTheory(names, v, g, null, false, description, parameters, Texts(potential, metric, null));
    }

    /// <summary>
    /// A Jordan-frame theory Omega^2 R_J/2 - (1/2) K^J_IJ d phi^I d phi^J - V_J mapped to the Einstein frame (physics.md section 7).
    /// </summary>
    /// <param name="fields">The field names in field order.</param>
    /// <param name="potentialJ">V_J as a formula.</param>
    /// <param name="omegaSquared">Omega^2 as a formula.</param>
    /// <param name="kineticJ">K^J_IJ as n rows of n formulas (symmetric), or null for the identity.</param>
    /// <param name="palatini">True for the Palatini formulation, false for metric.</param>
    /// <param name="parameters">Named parameter values the formulas use.</param>
    /// <param name="description">One-line description (a default lists the formulas).</param>
    /// <exception cref="FormulaException">a formula does not parse.</exception>
    /// <exception cref="TheoryException">K^J is not n x n or not symmetric.</exception>
    public static FormulaFieldTheory Jordan(IReadOnlyList<string> fields, string potentialJ, string omegaSquared,
        IReadOnlyList<IReadOnlyList<string>>? kineticJ = null, bool palatini = false, IReadOnlyDictionary<string, double>? parameters = null,
        string? description = null)
    {
        var names = CheckFields(fields);
        ArgumentNullException.ThrowIfNull(potentialJ);
        ArgumentNullException.ThrowIfNull(omegaSquared);
        var v = MultiFormula.Compile(potentialJ, names, parameters);
        var w = MultiFormula.Compile(omegaSquared, names, parameters);
        var k = MetricFormulas.Create(names, kineticJ, parameters, "kinetic matrix K^J_IJ");
        description ??= $"{names.Length}-field Jordan-frame theory ({string.Join(", ", names)}): V_J = {potentialJ}, Omega^2 = {omegaSquared}"
            + (kineticJ is null ? "" : $", K_J = {MetricFormulas.Describe(kineticJ)}") + (palatini ? " (Palatini)" : " (metric)");
        return new FormulaFieldTheory(names, v, k, w, palatini, description, parameters, Texts(potentialJ, kineticJ, omegaSquared));
    }

    /// <inheritdoc/>
    public string Description { get; }

    /// <inheritdoc/>
    public int FieldCount => _n;

    /// <inheritdoc/>
    public IReadOnlyList<string> FieldNames => _names;

    /// <summary>True for a Jordan-frame input (mapped to the Einstein frame).</summary>
    public bool IsJordanFrame => _omega2 is not null;

    /// <summary>True for the Palatini formulation of a Jordan-frame input.</summary>
    public bool IsPalatini { get; }

    /// <inheritdoc/>
    public bool IsCanonical => _omega2 is null && _metric.IsIdentity;

    /// <inheritdoc/>
    public IReadOnlyList<FieldSurface> NonSmoothSurfaces => _nonSmooth;

    /// <inheritdoc/>
    public IReadOnlyList<FieldSurface> Boundaries => _boundaries;

    /// <summary>Omega^2 at <paramref name="phi"/> (1 in the Einstein frame).</summary>
    public double OmegaSquared(ReadOnlySpan<double> phi) => _omega2 is null ? 1.0 : _omega2.Value(phi[.._n]);

    /// <inheritdoc/>
    public double Potential(ReadOnlySpan<double> phi)
    {
        phi = phi[.._n];
        if (_omega2 is null) return _potential.Value(phi);
        double w = _omega2.Value(phi);
        return _potential.Value(phi) / (w * w);
    }

    /// <inheritdoc/>
    public double PotentialGradient(ReadOnlySpan<double> phi, Span<double> gradient) => PotentialJets(phi, gradient[.._n], Span<double>.Empty);

    /// <inheritdoc/>
    public void PotentialHessian(ReadOnlySpan<double> phi, Span<double> hessian)
    {
        int n = _n;
        Span<double> gradient = n <= 64 ? stackalloc double[n] : new double[n];
        PotentialJets(phi, gradient, hessian[..(n * n)]);
    }

    /// <inheritdoc/>
    public void Metric(ReadOnlySpan<double> phi, Span<double> metric) => WithWork(MetricWork(0), phi, metric, Span<double>.Empty, Span<double>.Empty);

    /// <summary>d_K G_IJ at [K * n^2 + I * n + J] (the layout of <see cref="FieldGeometry"/>), exact.</summary>
    public void MetricDerivative(ReadOnlySpan<double> phi, Span<double> derivative)
    {
        int n2 = _n * _n;
        double[] g = ArrayPool<double>.Shared.Rent(n2);
        try
        {
            WithWork(MetricWork(1), phi, g.AsSpan(0, n2), derivative[..(n2 * _n)], Span<double>.Empty);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(g);
        }
    }

    /// <summary>d_M d_K G_IJ at [(M * n + K) * n^2 + I * n + J], exact.</summary>
    public void MetricSecondDerivative(ReadOnlySpan<double> phi, Span<double> derivative)
    {
        int n = _n, n2 = n * n, n3 = n2 * n;
        double[] g = ArrayPool<double>.Shared.Rent(n2 + n3);
        try
        {
            WithWork(MetricWork(2), phi, g.AsSpan(0, n2), g.AsSpan(n2, n3), derivative[..(n3 * n)]);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(g);
        }
    }

    /// <inheritdoc/>
    public bool InverseMetric(ReadOnlySpan<double> phi, Span<double> inverse)
    {
        int n2 = _n * _n;
        double[] work = ArrayPool<double>.Shared.Rent(2 * n2);
        try
        {
            var g = work.AsSpan(0, n2);
            Metric(phi, g);
            return FieldGeometry.Inverse(g, _n, inverse, work.AsSpan(n2, n2));
        }
        finally
        {
            ArrayPool<double>.Shared.Return(work);
        }
    }

    /// <inheritdoc/>
    public void Christoffel(ReadOnlySpan<double> phi, Span<double> christoffel)
    {
        int n = _n, n2 = n * n, n3 = n2 * n;
        if (IsCanonical) { christoffel[..n3].Clear(); return; }
        GeometryFromMetric(phi, christoffel, 1);
    }

    /// <inheritdoc/>
    public void Riemann(ReadOnlySpan<double> phi, Span<double> riemann)
    {
        int n = _n, n4 = n * n * n * n;
        if (IsCanonical) { riemann[..n4].Clear(); return; }
        GeometryFromMetric(phi, riemann, 2);
    }

    // The Christoffel symbols (order 1) or the Riemann tensor (order 2) from the exact metric jets, in pooled work arrays.
    private void GeometryFromMetric(ReadOnlySpan<double> phi, Span<double> result, int order)
    {
        int n = _n, n2 = n * n, n3 = n2 * n, n4 = n3 * n;
        int jets = n2 + n3 + (order == 2 ? n4 : 0);
        int own = jets + (order == 2 ? FieldGeometry.RiemannFromMetricScratch(n) : FieldGeometry.ChristoffelFromMetricScratch(n));
        int length = own + MetricWork(order);
        double[] work = ArrayPool<double>.Shared.Rent(length);
        try
        {
            var span = work.AsSpan(0, length);
            var g = span[..n2];
            var dg = span.Slice(n2, n3);
            var ddg = order == 2 ? span.Slice(n2 + n3, n4) : Span<double>.Empty;
            var scratch = span[jets..own];
            MetricJets(phi, g, dg, ddg, span[own..]);
            if (order == 2) FieldGeometry.RiemannFromMetric(n, g, dg, ddg, result, scratch);
            else FieldGeometry.ChristoffelFromMetric(n, g, dg, result, scratch);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(work);
        }
    }

    // The metric jets with a work array of the given length on the stack or from the pool.
    private void WithWork(int length, ReadOnlySpan<double> phi, Span<double> g, Span<double> dg, Span<double> ddg)
    {
        double[]? rented = null;
        Span<double> work = length <= StackDoubles ? stackalloc double[length] : (rented = ArrayPool<double>.Shared.Rent(length)).AsSpan(0, length);
        try
        {
            MetricJets(phi, g, dg, ddg, work);
        }
        finally
        {
            if (rented is not null) ArrayPool<double>.Shared.Return(rented);
        }
    }

    private static string[] CheckFields(IReadOnlyList<string> fields)
    {
        ArgumentNullException.ThrowIfNull(fields);
        if (fields.Count < 1) throw new TheoryException("a field theory needs at least one field name");
        return fields.ToArray();
    }

    private static IEnumerable<string> Texts(string potential, IReadOnlyList<IReadOnlyList<string>>? matrix, string? omega2)
    {
        yield return potential;
        if (omega2 is not null) yield return omega2;
        if (matrix is null) yield break;
        foreach (var row in matrix)
            foreach (string entry in row) yield return entry;
    }

    // The zero sets of every switching argument of the formulas, each once.
    private static FieldSurface[] SwitchSurfaces(string[] names, IEnumerable<string> texts, IReadOnlyDictionary<string, double>? parameters)
    {
        var arguments = new List<string>();
        foreach (string text in texts)
            foreach (string g in SwitchingArguments.Of(text, names, parameters))
                if (!arguments.Contains(g)) arguments.Add(g);
        var surfaces = new FieldSurface[arguments.Count];
        int n = names.Length;
        for (int i = 0; i < surfaces.Length; i++)
        {
            var f = MultiFormula.Compile(arguments[i], names);
            surfaces[i] = FieldSurface.FromFunction(string.Create(CultureInfo.InvariantCulture, $"{arguments[i]} = 0"), phi => f.Value(phi[..n]));
        }
        return surfaces;
    }
}
