using System.Collections.Concurrent;
using System.Linq.Expressions;

namespace ModeSolver.Formulas;

/// <summary>
/// What every code generator of a register program shares (<see cref="ProgramJit"/>, <see cref="MultiProgramJit"/>):
/// each register as <c>width</c> double locals, the constants-array argument (entry pc = instruction pc's C), the labels
/// and jumps of piecewise, and the walk over the instructions. The kernels themselves come from <see cref="Kernels"/>
/// and <see cref="MultiKernels"/> run on <see cref="Expr"/>.
/// </summary>
internal abstract class CodeBuilder
{
    private readonly ParameterExpression[][] _reg;
    private readonly Dictionary<int, LabelTarget> _labels = new();

    protected CodeBuilder(CompiledProgram program, int width)
    {
        Program = program;
        _reg = new ParameterExpression[program.RegisterCount][];
        for (int k = 0; k < program.RegisterCount; k++)
        {
            _reg[k] = new ParameterExpression[width];
            for (int j = 0; j < width; j++)
            {
                var v = Expression.Variable(typeof(double), $"r{k}_{j}");
                _reg[k][j] = v;
                Scope.Locals.Add(v);
            }
        }
        // Registers start at zero (as stackalloc'd scratch need not, but no program reads a register before writing it).
        foreach (var i in program.Code)
            if (i.Op is Op.JumpIfNot or Op.Jump && !_labels.ContainsKey(i.N)) _labels[i.N] = Expression.Label($"L{i.N}");
    }

    /// <summary>The program being compiled.</summary>
    protected CompiledProgram Program { get; }

    /// <summary>The constants argument.</summary>
    protected ParameterExpression Constants { get; } = Expression.Parameter(typeof(double[]), "c");

    /// <summary>Locals and statements of the code.</summary>
    protected Expr.Scope Scope { get; } = new();

    protected List<Expression> Body => Scope.Body;

    /// <summary>The locals of register <paramref name="k"/>.</summary>
    protected ParameterExpression[] Register(int k) => _reg[k];

    /// <summary>Slot <paramref name="j"/> of register <paramref name="k"/>.</summary>
    protected Expr R(int k, int j) => new(_reg[k][j], Scope);

    /// <summary>The constant of instruction <paramref name="pc"/>.</summary>
    protected Expr C(int pc) => new(Expression.ArrayIndex(Constants, Expression.Constant(pc)), Scope);

    protected void Set(int k, int j, Expr value) => Body.Add(Expression.Assign(_reg[k][j], value.E));

    private static Expression Cond(int relation, Expr a, Expr b) => (Relation)relation switch
    {
        Relation.Less => Expression.LessThan(a.E, b.E),
        Relation.LessEqual => Expression.LessThanOrEqual(a.E, b.E),
        Relation.Greater => Expression.GreaterThan(a.E, b.E),
        _ => Expression.GreaterThanOrEqual(a.E, b.E),
    };

    /// <summary>
    /// Every instruction in order: jumps (on slot 0, the values) here, the rest by <paramref name="emit"/>(pc, instruction),
    /// with the labels of piecewise placed before their instructions and at the end.
    /// </summary>
    protected void EmitCode(Action<int, Instr> emit)
    {
        var code = Program.Code;
        for (int pc = 0; pc < code.Length; pc++)
        {
            if (_labels.TryGetValue(pc, out var l)) Body.Add(Expression.Label(l));
            var I = code[pc];
            if (I.Op == Op.JumpIfNot)
                Body.Add(Expression.IfThen(Expression.Not(Cond(I.Aux, R(I.A, 0), R(I.B, 0))), Expression.Goto(_labels[I.N])));
            else if (I.Op == Op.Jump)
                Body.Add(Expression.Goto(_labels[I.N]));
            else
                emit(pc, I);
        }
        if (_labels.TryGetValue(code.Length, out var end)) Body.Add(Expression.Label(end));
    }
}

/// <summary>A bounded cache of generated code keyed by program shape (cleared when full), safe for concurrent use.</summary>
internal sealed class ShapeCache<T> where T : class
{
    private const int Limit = 512;
    private readonly ConcurrentDictionary<string, T> _entries = new(StringComparer.Ordinal);

    /// <summary>The entry for <paramref name="key"/>, built by <paramref name="build"/> on a miss.</summary>
    public T GetOrAdd(string key, Func<T> build)
    {
        if (_entries.TryGetValue(key, out var hit)) return hit;
        var built = build();
        if (_entries.Count >= Limit) _entries.Clear();
        return _entries.GetOrAdd(key, built);
    }
}
