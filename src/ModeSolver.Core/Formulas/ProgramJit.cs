using System.Collections.Concurrent;
using System.Linq.Expressions;
using System.Runtime.CompilerServices;
using System.Text;
using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// Straight-line code for one register program, built with System.Linq.Expressions (never C# source): every
/// register becomes locals (value, or value and three normalised Taylor coefficients), each instruction the same
/// kernel as the interpreter (<see cref="Kernels"/>, run here on <see cref="Expr"/>), so results agree with the
/// interpreter bit for bit by construction. The code reads instruction constants from an array
/// argument (entry pc = instruction pc's C), so one compiled pair serves every parameter value of a formula shape.
/// </summary>
internal sealed class ProgramJit
{
    private const int CacheLimit = 512;
    private static readonly ConcurrentDictionary<string, ProgramJit> Cache = new(StringComparer.Ordinal);

    private ProgramJit(Func<double[], double, double> value, Func<double[], double, Jet3> jet)
    {
        Value = value;
        Jet = jet;
    }

    private ProgramJit(Func<double[], double, JetPair> pair)
    {
        Value = static (_, _) => double.NaN; // a fused entry serves Pair only
        Jet = static (_, _) => new Jet3(double.NaN, double.NaN, double.NaN, double.NaN);
        Pair = pair;
    }

    /// <summary>f(phi) given the constants array.</summary>
    public Func<double[], double, double> Value { get; }

    /// <summary>The order-3 jet (f, f', f'', f''') given the constants array.</summary>
    public Func<double[], double, Jet3> Jet { get; }

    /// <summary>True where the runtime can compile code (false under AOT without a JIT).</summary>
    public static bool Supported => RuntimeFeature.IsDynamicCodeSupported && RuntimeFeature.IsDynamicCodeCompiled;

    /// <summary>The constants array for <paramref name="program"/> (entry pc = Code[pc].C).</summary>
    public static double[] Constants(CompiledProgram program)
    {
        var c = new double[program.Code.Length];
        for (int i = 0; i < c.Length; i++) c[i] = program.Code[i].C;
        return c;
    }

    /// <summary>Compiled code for the shape of <paramref name="program"/> (cached by shape, bounded), or null if unsupported.</summary>
    public static ProgramJit? For(CompiledProgram program)
    {
        if (!Supported) return null;
        string key = Key(program);
        if (Cache.TryGetValue(key, out var hit)) return hit;
        var built = new ProgramJit(new Builder(program, jet: false).BuildValue(), new Builder(program, jet: true).BuildJet());
        if (Cache.Count >= CacheLimit) Cache.Clear();
        return Cache.GetOrAdd(key, built);
    }

    /// <summary>
    /// Compiled fused code returning the jets of registers <paramref name="first"/> and <paramref name="second"/> of
    /// <paramref name="program"/> (cached by shape in the same bounded cache), or null if unsupported.
    /// </summary>
    public static Func<double[], double, JetPair>? PairFor(CompiledProgram program, int first, int second)
    {
        if (!Supported) return null;
        string key = "pair:" + first + ":" + second + ":" + Key(program);
        if (Cache.TryGetValue(key, out var hit)) return hit.Pair;
        var built = new ProgramJit(new Builder(program, jet: true).BuildJetPair(first, second));
        if (Cache.Count >= CacheLimit) Cache.Clear();
        return Cache.GetOrAdd(key, built).Pair;
    }

    /// <summary>The fused two-result code (only for entries made by <see cref="PairFor"/>).</summary>
    private Func<double[], double, JetPair>? Pair { get; }

    /// <summary>The program's shape: everything but the constants.</summary>
    internal static string Key(CompiledProgram p)
    {
        var sb = new StringBuilder(16 + p.Code.Length * 12);
        sb.Append(p.RegisterCount).Append(':').Append(p.Result);
        foreach (var i in p.Code)
            sb.Append(';').Append((int)i.Op).Append(',').Append(i.Dst).Append(',').Append(i.A).Append(',')
              .Append(i.B).Append(',').Append(i.Aux).Append(',').Append(i.N);
        return sb.ToString();
    }

    private sealed class Builder
    {
        private readonly CompiledProgram _p;
        private readonly ParameterExpression _c = Expression.Parameter(typeof(double[]), "c");
        private readonly ParameterExpression _phi = Expression.Parameter(typeof(double), "phi");
        private readonly Expr.Scope _scope = new();
        private readonly ParameterExpression[][] _reg;
        private readonly Dictionary<int, LabelTarget> _labels = new();

        public Builder(CompiledProgram p, bool jet)
        {
            _p = p;
            int width = jet ? 4 : 1;
            _reg = new ParameterExpression[p.RegisterCount][];
            for (int k = 0; k < p.RegisterCount; k++)
            {
                _reg[k] = new ParameterExpression[width];
                for (int j = 0; j < width; j++)
                {
                    var v = Expression.Variable(typeof(double), $"r{k}_{j}");
                    _reg[k][j] = v;
                    _scope.Locals.Add(v);
                }
            }
            // Registers start at zero (as stackalloc'd scratch need not, but no program reads a register before writing it).
            foreach (var i in p.Code)
                if (i.Op is Op.JumpIfNot or Op.Jump && !_labels.ContainsKey(i.N)) _labels[i.N] = Expression.Label($"L{i.N}");
        }

        private List<Expression> Body => _scope.Body;
        private Expr R(int k, int j) => new(_reg[k][j], _scope);
        private Series3<Expr> R4(int k) => new(R(k, 0), R(k, 1), R(k, 2), R(k, 3));
        private Expr C(int pc) => new(Expression.ArrayIndex(_c, Expression.Constant(pc)), _scope);

        private void Set(int k, int j, Expr value) => Body.Add(Expression.Assign(_reg[k][j], value.E));

        private void Set4(int d, in Series3<Expr> v)
        {
            // Evaluate all four before storing, in case d aliases an input.
            Expr v0 = Expr.Let(v.C0), v1 = Expr.Let(v.C1), v2 = Expr.Let(v.C2), v3 = Expr.Let(v.C3);
            Set(d, 0, v0); Set(d, 1, v1); Set(d, 2, v2); Set(d, 3, v3);
        }

        private static Expression Cond(int relation, Expr a, Expr b) => (Relation)relation switch
        {
            Relation.Less => Expression.LessThan(a.E, b.E),
            Relation.LessEqual => Expression.LessThanOrEqual(a.E, b.E),
            Relation.Greater => Expression.GreaterThan(a.E, b.E),
            _ => Expression.GreaterThanOrEqual(a.E, b.E),
        };

        private void PlaceLabel(int pc)
        {
            if (_labels.TryGetValue(pc, out var l)) Body.Add(Expression.Label(l));
        }

        /// <summary>Jumps (the only instructions without a kernel); false for every other instruction.</summary>
        private bool EmitJump(in Instr I)
        {
            if (I.Op == Op.JumpIfNot)
            {
                Body.Add(Expression.IfThen(Expression.Not(Cond(I.Aux, R(I.A, 0), R(I.B, 0))), Expression.Goto(_labels[I.N])));
                return true;
            }
            if (I.Op == Op.Jump)
            {
                Body.Add(Expression.Goto(_labels[I.N]));
                return true;
            }
            return false;
        }

        public Func<double[], double, double> BuildValue()
        {
            var code = _p.Code;
            Body.Add(Expression.Assign(_reg[0][0], _phi));
            for (int pc = 0; pc < code.Length; pc++)
            {
                PlaceLabel(pc);
                var I = code[pc];
                if (EmitJump(I)) continue;
                Set(I.Dst, 0, Kernels.Value(I.Op, R(I.A, 0), R(I.B, 0), C(pc), I.N));
            }
            PlaceLabel(code.Length);
            Body.Add(_reg[_p.Result][0]);
            var block = Expression.Block(typeof(double), _scope.Locals, Body);
            return Expression.Lambda<Func<double[], double, double>>(block, _c, _phi).Compile();
        }

        public Func<double[], double, Jet3> BuildJet()
        {
            EmitJetBody();
            Body.Add(JetOf(_p.Result));
            var block = Expression.Block(typeof(Jet3), _scope.Locals, Body);
            return Expression.Lambda<Func<double[], double, Jet3>>(block, _c, _phi).Compile();
        }

        /// <summary>The jets of two result registers from one run of the program (fused evaluation).</summary>
        public Func<double[], double, JetPair> BuildJetPair(int first, int second)
        {
            EmitJetBody();
            var ctor = typeof(JetPair).GetConstructor([typeof(Jet3), typeof(Jet3)])!;
            Body.Add(Expression.New(ctor, JetOf(first), JetOf(second)));
            var block = Expression.Block(typeof(JetPair), _scope.Locals, Body);
            return Expression.Lambda<Func<double[], double, JetPair>>(block, _c, _phi).Compile();
        }

        private NewExpression JetOf(int res)
        {
            var ctor = typeof(Jet3).GetConstructor([typeof(double), typeof(double), typeof(double), typeof(double)])!;
            return Expression.New(ctor, R(res, 0).E, R(res, 1).E, (2 * R(res, 2)).E, (6 * R(res, 3)).E);
        }

        private void EmitJetBody()
        {
            var code = _p.Code;
            Set(0, 0, new Expr(_phi, _scope)); Set(0, 1, 1.0); Set(0, 2, 0.0); Set(0, 3, 0.0);
            for (int pc = 0; pc < code.Length; pc++)
            {
                PlaceLabel(pc);
                var I = code[pc];
                if (EmitJump(I)) continue;
                Set4(I.Dst, Kernels.Jet(I.Op, R4(I.A), R4(I.B), C(pc), I.N));
            }
            PlaceLabel(code.Length);
        }
    }
}
