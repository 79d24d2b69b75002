using System.Buffers;
using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>
/// A formula in several named variables (e.g. <c>exp(2*b*phi)*chi^2</c> in <c>phi</c>, <c>chi</c>) and named parameters,
/// for field-space functions of several fields: a potential V(phi^a) or a metric component G_ab(phi^c). Gives the value,
/// the gradient, the Hessian and the third partial derivatives, exact up to rounding (truncated multivariate Taylor
/// arithmetic, never finite differences), with mixed partials symmetric by construction. Same language as
/// <see cref="Formula"/>; made by <see cref="Formula.Compile"/>. Evaluation is thread-safe and allocates nothing, except
/// that the first evaluation of each kind (value; order 1, 2 or 3) generates its straight-line code, where the runtime can.
/// </summary>
/// <remarks>
/// With one variable every result is the one-variable <see cref="Formula"/>'s, bit for bit (it runs that path).
/// At a switch point of abs, min or max the derivatives are those of the branch selected by the first non-zero
/// partial derivative in the order value, gradient, second partials (lexicographic in the variable order).
/// Tensors are row-major and full: hessian[i*n + j] = d^2 f / d x_i d x_j, third[(i*n + j)*n + k].
/// </remarks>
public sealed class MultiFormula
{
    /// <summary>Highest derivative order of <see cref="Evaluate(ReadOnlySpan{double}, Span{double}, Span{double}, Span{double})"/>.</summary>
    public const int MaxOrder = 3;

    private const int StackDoubles = 4096;
    private readonly CompiledProgram _program;
    private readonly MultiLayout _first, _second, _third;
    private readonly Formula? _single; // the one-variable path (bit-identical to Formula)
    private readonly string[] _variables;
    // Generated straight-line code (MultiProgramJit), compiled on first use of each order (value, 1, 2, 3); null where
    // the runtime cannot compile code or the program is too large. The interpreter stays the reference and the fallback.
    private readonly double[] _constants;
    private readonly Lazy<MultiValueCode?> _valueCode;
    private readonly Lazy<MultiSeriesCode?>[] _seriesCode;

    private MultiFormula(string text, string[] variables, CompiledProgram program, IReadOnlyDictionary<string, double> parameters,
        IReadOnlyList<string> unused, Formula? single)
    {
        Text = text;
        _variables = variables;
        _program = program;
        Parameters = parameters;
        UnusedParameters = unused;
        _single = single;
        _first = new MultiLayout(variables.Length, 1);
        _second = new MultiLayout(variables.Length, 2);
        _third = new MultiLayout(variables.Length, 3);
        _constants = ProgramJit.Constants(program);
        _valueCode = new(() => MultiProgramJit.ValueFor(program, variables.Length), LazyThreadSafetyMode.PublicationOnly);
        _seriesCode = new Lazy<MultiSeriesCode?>[3];
        for (int order = 1; order <= 3; order++)
        {
            var layout = LayoutOf(order);
            _seriesCode[order - 1] = new(() => MultiProgramJit.SeriesFor(program, layout), LazyThreadSafetyMode.PublicationOnly);
        }
    }

    private MultiLayout LayoutOf(int order) => order == 3 ? _third : order == 2 ? _second : _first;

    /// <summary>The source text.</summary>
    public string Text { get; }

    /// <summary>The variable names, in the order of the point's coordinates.</summary>
    public IReadOnlyList<string> Variables => _variables;

    /// <summary>Number of variables n.</summary>
    public int VariableCount => _variables.Length;

    /// <summary>The parameters the formula was parsed with (a copy).</summary>
    public IReadOnlyDictionary<string, double> Parameters { get; }

    /// <summary>Parameters given but not used by the formula, sorted by name (the caller warns).</summary>
    public IReadOnlyList<string> UnusedParameters { get; }

    /// <summary>
    /// Parses <paramref name="text"/> in the <paramref name="variables"/> (at least one, distinct) and the named
    /// <paramref name="parameters"/>. Throws <see cref="FormulaException"/> on any error, as <see cref="Formula.Parse"/>.
    /// </summary>
    public static MultiFormula Compile(string text, IReadOnlyList<string> variables, IReadOnlyDictionary<string, double>? parameters = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(variables);
        if (variables.Count == 0)
            throw new FormulaException(text, 0, "a variable name", "formula error: no variable names given (at least one, e.g. phi)");
        var names = variables.ToArray();
        var (root, copy, unused) = Formula.Resolve(text, names, parameters);
        var program = Compiler.Compile(root, text, names.Length);
        Formula? single = names.Length == 1 ? Formula.Parse(text, parameters, names[0]) : null;
        return new MultiFormula(text, names, program, copy, unused, single);
    }

    /// <summary>f at <paramref name="point"/> (one coordinate per variable).</summary>
    public unsafe double Value(ReadOnlySpan<double> point)
    {
        CheckPoint(point);
        if (_single != null) return _single.Value(point[0]);
        if (_valueCode.Value is { } code)
            fixed (double* x = point) return code(_constants, (nint)x);
        return ValueProgram(point);
    }

    /// <summary>True when <see cref="Value"/> and <see cref="Evaluate(ReadOnlySpan{double}, Span{double}, Span{double}, Span{double})"/> run generated code (several variables, a runtime that compiles code).</summary>
    internal bool IsGenerated => _single == null && _valueCode.Value != null && _seriesCode[2].Value != null;

    /// <summary>f by the interpreter (the reference for the generated code).</summary>
    internal double ValueInterpreted(ReadOnlySpan<double> point)
    {
        CheckPoint(point);
        return ValueProgram(point);
    }

    /// <summary>As <see cref="Evaluate(ReadOnlySpan{double}, Span{double}, Span{double}, Span{double})"/> by the interpreter (the reference for the generated code).</summary>
    internal double EvaluateInterpreted(ReadOnlySpan<double> point, Span<double> gradient, Span<double> hessian, Span<double> third)
        => Evaluate(point, gradient, hessian, third, generated: false);

    [SkipLocalsInit]
    private unsafe double ValueProgram(ReadOnlySpan<double> point)
    {
        int count = _program.RegisterCount;
        if (count > StackDoubles) return ValueRented(point);
        double* r = stackalloc double[count];
        return _program.RunValue(point, r);
    }

    [MethodImpl(MethodImplOptions.NoInlining)]
    private unsafe double ValueRented(ReadOnlySpan<double> point)
    {
        var rented = ArrayPool<double>.Shared.Rent(_program.RegisterCount);
        try
        {
            fixed (double* r = rented) return _program.RunValue(point, r);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <summary>
    /// f, its gradient (n entries) and its Hessian (n*n, row-major, symmetric) at <paramref name="point"/>; returns f.
    /// An empty <paramref name="hessian"/> skips the second derivatives.
    /// </summary>
    public double Evaluate(ReadOnlySpan<double> point, Span<double> gradient, Span<double> hessian)
        => Evaluate(point, gradient, hessian, Span<double>.Empty);

    /// <summary>
    /// f, its gradient (n), Hessian (n*n) and third partial derivatives (n*n*n, third[(i*n + j)*n + k]) at
    /// <paramref name="point"/>; returns f. Empty spans skip the orders from there on (an empty third: order 2).
    /// </summary>
    public double Evaluate(ReadOnlySpan<double> point, Span<double> gradient, Span<double> hessian, Span<double> third)
        => Evaluate(point, gradient, hessian, third, generated: true);

    [SkipLocalsInit]
    private unsafe double Evaluate(ReadOnlySpan<double> point, Span<double> gradient, Span<double> hessian, Span<double> third, bool generated)
    {
        CheckPoint(point);
        int n = _variables.Length;
        int order = hessian.IsEmpty ? 1 : third.IsEmpty ? 2 : 3;
        if (gradient.Length != n) throw new ArgumentException($"gradient has {gradient.Length} entries, the formula has {n} variables", nameof(gradient));
        if (order >= 2 && hessian.Length != n * n) throw new ArgumentException($"hessian has {hessian.Length} entries, expected {n * n}", nameof(hessian));
        if (order >= 3 && third.Length != n * n * n) throw new ArgumentException($"third has {third.Length} entries, expected {n * n * n}", nameof(third));
        if (_single != null)
        {
            var j = _single.Evaluate(point[0]);
            gradient[0] = j.D1;
            if (order >= 2) hessian[0] = j.D2;
            if (order >= 3) third[0] = j.D3;
            return j.Value;
        }
        var layout = LayoutOf(order);
        if (generated && _seriesCode[order - 1].Value is { } code)
        {
            double* r = stackalloc double[layout.Width];
            fixed (double* x = point) code(_constants, (nint)x, (nint)r);
            return Store(layout, r, order, gradient, hessian, third);
        }
        int count = _program.RegisterCount * layout.Width;
        if (count <= StackDoubles)
        {
            double* s = stackalloc double[count];
            return Store(layout, MultiJetEvaluator.Run(_program, layout, point, s), order, gradient, hessian, third);
        }
        var rented = ArrayPool<double>.Shared.Rent(count);
        try
        {
            fixed (double* s = rented) return Store(layout, MultiJetEvaluator.Run(_program, layout, point, s), order, gradient, hessian, third);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    private static unsafe double Store(MultiLayout layout, double* r, int order, Span<double> gradient, Span<double> hessian, Span<double> third)
    {
        int n = layout.N;
        for (int i = 0; i < n; i++) gradient[i] = r[1 + i];
        if (order >= 2)
            for (int k = 0; k < n * n; k++) hessian[k] = r[layout.PairOf[k]];
        if (order >= 3)
            for (int k = 0; k < n * n * n; k++) third[k] = r[layout.TripleOf[k]];
        return r[0];
    }

    private void CheckPoint(ReadOnlySpan<double> point)
    {
        if (point.Length != _variables.Length)
            throw new ArgumentException($"point has {point.Length} coordinates, the formula has {_variables.Length} variables ({string.Join(", ", _variables)})", nameof(point));
    }

    /// <summary>The source text.</summary>
    public override string ToString() => Text;
}
