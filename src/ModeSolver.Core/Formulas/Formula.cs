using System.Buffers;
using System.Runtime.CompilerServices;
using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// A formula in one variable (default <c>phi</c>) and named parameters, e.g. <c>V0*tanh(phi/sqrt(6*alpha))^2</c>,
/// parsed by our own recursive-descent parser and compiled once into a flat register program. Values and exact
/// derivatives of any order come from truncated Taylor arithmetic (automatic differentiation), never from finite
/// differences. Evaluation allocates nothing and is thread-safe: any number of threads may evaluate one instance.
/// </summary>
/// <remarks>
/// Language: numbers (1, 1.5, .5, 1e-10, 2.5E+3); + - * / ^ (^ is right-associative and binds tighter than unary minus,
/// so -phi^2 = -(phi^2)); parentheses; exp, log (natural; also ln), log10, sqrt, sin, cos, tan, sinh, cosh, tanh, asin, acos,
/// atan, asinh, acosh, atanh, abs, min(a,b), max(a,b), step(x) (0 for x &lt; 0, 1 for x &gt;= 0),
/// piecewise(cond1, value1, ..., otherwise) with conditions a &lt; b, a &lt;= b, a &gt; b, a &gt;= b; constants pi and e.
/// At a switch point (abs at 0, min/max at a tie) derivatives are the right-hand ones (phi approaching from above).
/// </remarks>
public sealed class Formula : IFieldFunction
{
    /// <summary>Highest derivative order <see cref="EvaluateDerivatives"/> accepts.</summary>
    public const int MaxOrder = 30;

    /// <summary>Default half-width of the range scanned for non-linear switching arguments by <see cref="NonSmoothPoints"/>.</summary>
    public const double DefaultScanRange = 1e3;

    private const int StackDoubles = 2048;
    private static readonly double[] Factorials = BuildFactorials();

    private readonly Node _root;
    private readonly CompiledProgram _program;
    private readonly List<SwitchFunction> _switches;
    private readonly Lazy<IReadOnlyList<double>> _nonSmooth;
    // Monomial fast path c*phi^n (n >= 2), the commonest potentials (quadratic, quartic): skips the interpreter.
    private readonly int _monomialPower;
    private readonly double _monomialScale;
    // Straight-line code generated for this program's shape (null where the runtime cannot compile code),
    // fed the program's constants; the interpreter stays the reference and the fallback.
    private readonly Func<double[], double, double>? _jitValue;
    private readonly Func<double[], double, Jet3>? _jitJet;
    private readonly double[] _constants;

    private Formula(string text, string variable, Node root, CompiledProgram program,
        IReadOnlyDictionary<string, double> parameters, IReadOnlyList<string> unused, List<SwitchFunction> switches)
    {
        Text = text;
        Variable = variable;
        _root = root;
        _program = program;
        Parameters = parameters;
        UnusedParameters = unused;
        _switches = switches;
        (_monomialPower, _monomialScale) = DetectMonomial(program);
        _constants = ProgramJit.Constants(program);
        if (_monomialPower == 0 && ProgramJit.For(program) is { } jit)
        {
            _jitValue = jit.Value;
            _jitJet = jit.Jet;
        }
        _nonSmooth = new Lazy<IReadOnlyList<double>>(
            () => NonSmoothPointsIn(-DefaultScanRange, DefaultScanRange, includeAllLinear: true).AsReadOnly(),
            LazyThreadSafetyMode.ExecutionAndPublication);
    }

    /// <summary>The source text.</summary>
    public string Text { get; }

    /// <summary>The name of the variable (default <c>phi</c>).</summary>
    public string Variable { get; }

    /// <summary>The parameters the formula was parsed with (a copy).</summary>
    public IReadOnlyDictionary<string, double> Parameters { get; }

    /// <summary>Parameters given but not used by the formula, sorted by name (the caller warns).</summary>
    public IReadOnlyList<string> UnusedParameters { get; }

    /// <summary>
    /// Field values where abs, min, max, step or a piecewise condition switches, sorted and unique.
    /// Switching arguments linear in the variable are solved exactly wherever the root lies; others are
    /// scanned over [-<see cref="DefaultScanRange"/>, <see cref="DefaultScanRange"/>] (see <see cref="NonSmoothPointsIn(double, double)"/>).
    /// </summary>
    /// <remarks>Computed on first use (a scan costs a few milliseconds per non-linear switch), then cached.</remarks>
    public IReadOnlyList<double> NonSmoothPoints => _nonSmooth.Value;

    /// <summary>The resolved syntax tree (parameters carry their values), for composing formulas.</summary>
    internal Node Root => _root;

    /// <summary>Number of instructions of the compiled program (after constant folding).</summary>
    public int InstructionCount => _program.Code.Length;

    /// <summary>
    /// Parses <paramref name="text"/> in <paramref name="variable"/> and the named <paramref name="parameters"/>.
    /// Throws <see cref="FormulaException"/> on any error (syntax, unknown or missing names, bad parameter names,
    /// constant parts that are not finite, text longer than 10,000 characters or nested deeper than 200 levels).
    /// </summary>
    public static Formula Parse(string text, IReadOnlyDictionary<string, double>? parameters = null, string variable = "phi")
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(variable);
        var (root, copy, unused) = Resolve(text, [variable], parameters);
        var program = Compiler.Compile(root, text);
        var switches = SwitchFunction.Collect(root, text);
        return new Formula(text, variable, root, program, copy, unused, switches);
    }

    /// <summary>
    /// Parses <paramref name="text"/> in several named <paramref name="variables"/> (e.g. <c>["phi", "chi"]</c>) and the
    /// named <paramref name="parameters"/>, for values, gradients, Hessians and third derivatives with exact mixed partials
    /// (<see cref="MultiFormula.Evaluate(ReadOnlySpan{double}, Span{double}, Span{double}, Span{double})"/>).
    /// Same language and errors as <see cref="Parse"/>; a formula in one variable evaluates exactly as <see cref="Parse"/>'s.
    /// </summary>
    public static MultiFormula Compile(string text, IReadOnlyList<string> variables, IReadOnlyDictionary<string, double>? parameters = null)
        => MultiFormula.Compile(text, variables, parameters);

    /// <summary>
    /// Checks the variable and parameter names and values, parses <paramref name="text"/> and resolves its names: the
    /// syntax tree (variable i reads register i), a sorted copy of the parameters and the unused parameter names.
    /// Throws <see cref="FormulaException"/> on any error.
    /// </summary>
    internal static (Node Root, SortedDictionary<string, double> Parameters, string[] Unused) Resolve(
        string text, IReadOnlyList<string> variables, IReadOnlyDictionary<string, double>? parameters)
    {
        for (int i = 0; i < variables.Count; i++)
        {
            string variable = variables[i];
            if (variable is null || !Builtins.IsIdentifier(variable) || Builtins.IsReserved(variable))
                throw new FormulaException(text, 0, "a variable name",
                    $"formula error: '{variable}' cannot be the variable name (it must be a name that is not a function or constant)");
            for (int j = 0; j < i; j++)
                if (variables[j] == variable)
                    throw new FormulaException(text, 0, "distinct variable names", $"formula error: variable '{variable}' is named twice");
        }
        var copy = new SortedDictionary<string, double>(StringComparer.Ordinal);
        if (parameters != null)
        {
            foreach (var (name, value) in parameters)
            {
                if (!Builtins.IsIdentifier(name))
                    throw new FormulaException(text, 0, "a parameter name", $"formula error: parameter name '{name}' is not a valid name (letters, digits, '_', not starting with a digit)");
                if (variables.Contains(name))
                    throw new FormulaException(text, 0, "a parameter name", $"formula error: parameter '{name}' has the same name as the variable");
                if (Builtins.IsReserved(name))
                    throw new FormulaException(text, 0, "a parameter name", $"formula error: parameter '{name}' has the name of a built-in function or constant");
                if (!double.IsFinite(value))
                    throw new FormulaException(text, 0, "a finite value", $"formula error: parameter '{name}' is not a finite number ({value})");
                copy[name] = value;
            }
        }
        var (root, names) = Parser.ParseTree(text, variables, copy);
        var missing = names.Where(n => !copy.ContainsKey(n.Name)).ToList();
        if (missing.Count > 0)
        {
            string list = string.Join(", ", missing.Select(m => $"'{m.Name}'"));
            string known = $"{string.Join(", ", variables)}, pi, e";
            string message = copy.Count == 0
                ? $"formula error at column {missing[0].Column}: missing parameter{(missing.Count == 1 ? "" : "s")} {list} in formula (known: {known}; no parameters given)"
                : $"formula error at column {missing[0].Column}: unknown name(s) {list} in formula (known: {known}, and parameters {string.Join(", ", copy.Keys)})";
            throw new FormulaException(text, missing[0].Column, "a known name", message);
        }
        var used = new HashSet<string>(names.Select(n => n.Name), StringComparer.Ordinal);
        var unused = copy.Keys.Where(k => !used.Contains(k)).ToArray();
        return (root, copy, unused);
    }

    /// <summary>
    /// Names used in <paramref name="text"/> other than the variable, the constants pi and e and function names,
    /// in order of first use (for "missing parameter" lists). Throws <see cref="FormulaException"/> on a syntax error.
    /// </summary>
    public static IReadOnlyList<string> ReferencedNames(string text) => ReferencedNames(text, "phi");

    /// <summary>As <see cref="ReferencedNames(string)"/> with another variable name.</summary>
    public static IReadOnlyList<string> ReferencedNames(string text, string variable)
    {
        ArgumentNullException.ThrowIfNull(text);
        return Parser.CollectNames(text, variable).Select(n => n.Name).ToArray();
    }

    /// <summary>f(phi), value only (fast path).</summary>
    // Small enough to inline into the caller, so c*phi^2 costs a multiply; the rest goes through ValueOther.
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Value(double phi) => _monomialPower == 2 ? phi * phi * _monomialScale : ValueOther(phi);

    private double ValueOther(double phi)
        => _monomialPower != 0 ? Taylor.PowIntScalar(phi, _monomialPower) * _monomialScale
         : _jitValue != null ? _jitValue(_constants, phi)
         : ValueProgram(phi);

    /// <summary>f(phi) by the interpreter (the reference for the generated code).</summary>
    internal double ValueInterpreted(double phi) => ValueProgram(phi);

    /// <summary>The order-3 jet by the interpreter (the reference for the generated code).</summary>
    internal Jet3 EvaluateInterpreted(double phi) => EvaluateProgram(phi);

    /// <summary>True when <see cref="Value"/> and <see cref="Evaluate"/> run generated code (not for c*phi^n, which has its own path).</summary>
    internal bool IsGenerated => _jitJet != null;

    /// <summary>f(phi) by the generated code (requires <see cref="IsGenerated"/>).</summary>
    internal double ValueGenerated(double phi) => _jitValue!(_constants, phi);

    /// <summary>The order-3 jet by the generated code (requires <see cref="IsGenerated"/>).</summary>
    internal Jet3 EvaluateGenerated(double phi) => _jitJet!(_constants, phi);

    [SkipLocalsInit]
    private unsafe double ValueProgram(double phi)
    {
        int count = _program.RegisterCount;
        if (count > StackDoubles) return ValueRented(phi);
        double* r = stackalloc double[count];
        return _program.RunValue(phi, r);
    }

    [MethodImpl(MethodImplOptions.NoInlining)]
    private unsafe double ValueRented(double phi)
    {
        var rented = ArrayPool<double>.Shared.Rent(_program.RegisterCount);
        try
        {
            fixed (double* r = rented) return _program.RunValue(phi, r);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <summary>f, f', f'', f''' at <paramref name="phi"/>, exact up to rounding (generated straight-line code, or an unrolled third-order path).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Jet3 Evaluate(double phi)
        => _monomialPower == 2 ? new Jet3(phi * phi * _monomialScale, 2 * phi * _monomialScale, 2 * _monomialScale, 0)
         : EvaluateOther(phi);

    private Jet3 EvaluateOther(double phi)
        => _monomialPower != 0 ? MonomialJet(phi)
         : _jitJet != null ? _jitJet(_constants, phi)
         : EvaluateProgram(phi);

    [SkipLocalsInit]
    private unsafe Jet3 EvaluateProgram(double phi)
    {
        int count = _program.RegisterCount * 4;
        if (count > StackDoubles) return EvaluateRented(phi);
        double* s = stackalloc double[count];
        return Jet3Evaluator.Run(_program, phi, s);
    }

    [MethodImpl(MethodImplOptions.NoInlining)]
    private unsafe Jet3 EvaluateRented(double phi)
    {
        var rented = ArrayPool<double>.Shared.Rent(_program.RegisterCount * 4);
        try
        {
            fixed (double* s = rented) return Jet3Evaluator.Run(_program, phi, s);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <summary>
    /// d[k] = k-th derivative at <paramref name="phi"/> for k = 0 .. d.Length-1 (up to <see cref="MaxOrder"/>), exact up to rounding.
    /// </summary>
    [SkipLocalsInit]
    public unsafe void EvaluateDerivatives(double phi, Span<double> d)
    {
        if (d.Length == 0) return;
        int n = d.Length - 1;
        if (n > MaxOrder) throw new ArgumentException($"derivative order {n} exceeds the maximum {MaxOrder}", nameof(d));
        if (n == 0) { d[0] = Value(phi); return; }
        int count = _program.RegisterCount * (n + 1);
        if (count <= StackDoubles)
        {
            double* s = stackalloc double[count];
            Copy(_program.RunSeries(phi, n, s), d);
            return;
        }
        var rented = ArrayPool<double>.Shared.Rent(count);
        try
        {
            fixed (double* s = rented) Copy(_program.RunSeries(phi, n, s), d);
        }
        finally
        {
            ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <summary>Recognises programs computing c*phi^n (n >= 2): [PowInt] or [PowInt, MulC].</summary>
    private static (int Power, double Scale) DetectMonomial(CompiledProgram p)
    {
        var code = p.Code;
        if (code.Length == 0 || code.Length > 2) return (0, 0);
        var first = code[0];
        if (first.Op != Op.PowInt || first.A != 0 || first.N < 2) return (0, 0);
        if (code.Length == 1) return p.Result == first.Dst ? (first.N, 1.0) : (0, 0);
        var second = code[1];
        if (second.Op != Op.MulC || second.A != first.Dst || p.Result != second.Dst) return (0, 0);
        return (first.N, second.C);
    }

    private Jet3 MonomialJet(double phi)
    {
        int n = _monomialPower;
        double c = _monomialScale;
        if (n == 2) return new Jet3(phi * phi * c, 2 * phi * c, 2 * c, 0);
        double m = n;
        return new Jet3(Taylor.PowIntScalar(phi, n) * c, m * Taylor.PowIntScalar(phi, n - 1) * c,
            m * (m - 1) * Taylor.PowIntScalar(phi, n - 2) * c, m * (m - 1) * (m - 2) * Taylor.PowIntScalar(phi, n - 3) * c);
    }

    private static unsafe void Copy(double* c, Span<double> d)
    {
        for (int k = 0; k < d.Length; k++) d[k] = c[k] * Factorials[k];
    }

    /// <summary>
    /// Switch points inside [<paramref name="min"/>, <paramref name="max"/>]: exact roots of linear switching arguments,
    /// and sign changes of the others found on a grid over the range (uniform plus geometric toward zero), refined by
    /// safeguarded Newton with exact derivatives. Sorted and unique.
    /// </summary>
    public IReadOnlyList<double> NonSmoothPointsIn(double min, double max) => NonSmoothPointsIn(min, max, includeAllLinear: false);

    private List<double> NonSmoothPointsIn(double min, double max, bool includeAllLinear)
    {
        if (!(min < max) || !double.IsFinite(min) || !double.IsFinite(max))
            throw new ArgumentException($"scan range [{min}, {max}] must be finite with min < max");
        var roots = new List<double>();
        foreach (var s in _switches)
        {
            if (s.IsLinear && includeAllLinear)
            {
                if (double.IsFinite(s.LinearRoot)) roots.Add(s.LinearRoot);
            }
            else s.AddRoots(min, max, roots);
        }
        roots.Sort();
        var unique = new List<double>(roots.Count);
        foreach (double x in roots)
            if (unique.Count == 0 || Math.Abs(x - unique[^1]) > 1e-13 * Math.Max(1, Math.Abs(x))) unique.Add(x);
        return unique;
    }

    /// <summary>Canonical text (parameters by name) that parses back, with the same parameters, to the same function.</summary>
    public override string ToString() => Printer.Print(_root, inlineParameters: false);

    /// <summary>Canonical text; with <paramref name="inlineParameters"/> the parameter values are written as numbers (round-trip exact).</summary>
    public string ToString(bool inlineParameters) => Printer.Print(_root, inlineParameters);

    private static double[] BuildFactorials()
    {
        var f = new double[MaxOrder + 1];
        f[0] = 1;
        for (int k = 1; k <= MaxOrder; k++) f[k] = f[k - 1] * k;
        return f;
    }
}
