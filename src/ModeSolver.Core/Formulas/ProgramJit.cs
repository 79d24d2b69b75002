using System.Collections.Concurrent;
using System.Linq.Expressions;
using System.Runtime.CompilerServices;
using System.Text;
using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// Straight-line code for one register program, built with System.Linq.Expressions (never C# source): every
/// register becomes locals (value, or value and three normalised Taylor coefficients), each instruction the same
/// arithmetic as <see cref="CompiledProgram.RunValue"/> and <see cref="Jet3Evaluator.Run"/> in the same order,
/// so results agree with the interpreter bit for bit. The code reads instruction constants from an array
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

    /// <summary>An expression with C# arithmetic operators, so kernels read (and associate) as in the interpreter.</summary>
    private readonly struct X
    {
        public readonly Expression E;
        public X(Expression e) => E = e;
        public static implicit operator X(double d) => new(Expression.Constant(d));
        public static X operator +(X a, X b) => new(Expression.Add(a.E, b.E));
        public static X operator -(X a, X b) => new(Expression.Subtract(a.E, b.E));
        public static X operator *(X a, X b) => new(Expression.Multiply(a.E, b.E));
        public static X operator /(X a, X b) => new(Expression.Divide(a.E, b.E));
        public static X operator -(X a) => new(Expression.Negate(a.E));
    }

    private sealed class Builder
    {
        private readonly CompiledProgram _p;
        private readonly ParameterExpression _c = Expression.Parameter(typeof(double[]), "c");
        private readonly ParameterExpression _phi = Expression.Parameter(typeof(double), "phi");
        private readonly List<ParameterExpression> _locals = new();
        private readonly List<Expression> _body = new();
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
                    _locals.Add(v);
                }
            }
            // Registers start at zero (as stackalloc'd scratch need not, but no program reads a register before writing it).
            foreach (var i in p.Code)
                if (i.Op is Op.JumpIfNot or Op.Jump && !_labels.ContainsKey(i.N)) _labels[i.N] = Expression.Label($"L{i.N}");
        }

        private X R(int k, int j) => new(_reg[k][j]);
        private X C(int pc) => new(Expression.ArrayIndex(_c, Expression.Constant(pc)));

        private X Let(X value)
        {
            var v = Expression.Variable(typeof(double));
            _locals.Add(v);
            _body.Add(Expression.Assign(v, value.E));
            return new X(v);
        }

        private void Set(int k, int j, X value) => _body.Add(Expression.Assign(_reg[k][j], value.E));

        private static X Call(string name, X a) => new(Expression.Call(typeof(Math).GetMethod(name, [typeof(double)])!, a.E));
        private static X Call(string name, X a, X b) => new(Expression.Call(typeof(Math).GetMethod(name, [typeof(double), typeof(double)])!, a.E, b.E));
        private const System.Reflection.BindingFlags Flags = System.Reflection.BindingFlags.Static | System.Reflection.BindingFlags.NonPublic | System.Reflection.BindingFlags.Public;
        private static X Helper([System.Diagnostics.CodeAnalysis.DynamicallyAccessedMembers(System.Diagnostics.CodeAnalysis.DynamicallyAccessedMemberTypes.PublicMethods | System.Diagnostics.CodeAnalysis.DynamicallyAccessedMemberTypes.NonPublicMethods)] Type type, string name, params X[] args) => new(Expression.Call(type.GetMethod(name, Flags)!, args.Select(a => a.E)));

        private Expression Cond(int relation, X a, X b) => (Relation)relation switch
        {
            Relation.Less => Expression.LessThan(a.E, b.E),
            Relation.LessEqual => Expression.LessThanOrEqual(a.E, b.E),
            Relation.Greater => Expression.GreaterThan(a.E, b.E),
            _ => Expression.GreaterThanOrEqual(a.E, b.E),
        };

        /// <summary>x^m with exactly the multiplications of <see cref="Taylor.PowIntScalar"/>.</summary>
        private X PowInt(X x, int m)
        {
            if (m == 2) return Let(x * x);
            long e = Math.Abs((long)m);
            if (e == 0) return 1.0;
            X b = x, r = 0.0;
            bool first = true;
            while (true)
            {
                if ((e & 1) != 0)
                {
                    if (first) { r = b; first = false; }
                    else r = Let(r * b);
                }
                e >>= 1;
                if (e == 0) break;
                b = Let(b * b);
            }
            return m < 0 ? Let(1.0 / r) : r;
        }

        private void PlaceLabel(int pc)
        {
            if (_labels.TryGetValue(pc, out var l)) _body.Add(Expression.Label(l));
        }

        public Func<double[], double, double> BuildValue()
        {
            var code = _p.Code;
            _body.Add(Expression.Assign(_reg[0][0], _phi));
            for (int pc = 0; pc < code.Length; pc++)
            {
                PlaceLabel(pc);
                var I = code[pc];
                X a = R(I.A, 0);
                X b = R(I.B, 0);
                X c = C(pc);
                int d = I.Dst;
                switch (I.Op)
                {
                    case Op.LoadConst: Set(d, 0, c); break;
                    case Op.Copy: Set(d, 0, a); break;
                    case Op.Neg: Set(d, 0, -a); break;
                    case Op.Add: Set(d, 0, a + b); break;
                    case Op.Sub: Set(d, 0, a - b); break;
                    case Op.Mul: Set(d, 0, a * b); break;
                    case Op.Div: Set(d, 0, a / b); break;
                    case Op.AddC: Set(d, 0, a + c); break;
                    case Op.MulC: Set(d, 0, a * c); break;
                    case Op.SubCR: Set(d, 0, c - a); break;
                    case Op.DivC: Set(d, 0, a / c); break;
                    case Op.DivCR: Set(d, 0, c / a); break;
                    case Op.PowInt: Set(d, 0, I.N == 2 ? a * a : PowInt(a, I.N)); break;
                    case Op.PowC: Set(d, 0, Call("Pow", a, c)); break;
                    case Op.CPow: Set(d, 0, Call("Pow", c, a)); break;
                    case Op.Pow: Set(d, 0, Call("Pow", a, b)); break;
                    case Op.Exp or Op.Log or Op.Log10 or Op.Sqrt or Op.Sin or Op.Cos or Op.Tan or Op.Sinh or Op.Cosh or Op.Tanh
                        or Op.Asin or Op.Acos or Op.Atan or Op.Asinh or Op.Acosh or Op.Atanh or Op.Abs:
                        Set(d, 0, Call(I.Op.ToString(), a));
                        break;
                    case Op.Step: Set(d, 0, Helper(typeof(CompiledProgram), nameof(CompiledProgram.StepScalar), a)); break;
                    case Op.Min: Set(d, 0, Helper(typeof(CompiledProgram), nameof(CompiledProgram.MinScalar), a, b)); break;
                    case Op.Max: Set(d, 0, Helper(typeof(CompiledProgram), nameof(CompiledProgram.MaxScalar), a, b)); break;
                    case Op.JumpIfNot: _body.Add(Expression.IfThen(Expression.Not(Cond(I.Aux, a, b)), Expression.Goto(_labels[I.N]))); break;
                    case Op.Jump: _body.Add(Expression.Goto(_labels[I.N])); break;
                    default: throw new InvalidOperationException($"no code for {I.Op}");
                }
            }
            PlaceLabel(code.Length);
            _body.Add(_reg[_p.Result][0]);
            var block = Expression.Block(typeof(double), _locals, _body);
            return Expression.Lambda<Func<double[], double, double>>(block, _c, _phi).Compile();
        }

        private void Compose(int a, int d, X f0, X f1, X f2, X f3)
        {
            // Same as Jet3Evaluator.Compose; the inputs are evaluated into locals first (d may alias a).
            f0 = Let(f0); f1 = Let(f1); f2 = Let(f2); f3 = Let(f3);
            X a1 = Let(R(a, 1)), a2 = Let(R(a, 2)), a3 = Let(R(a, 3));
            Set(d, 0, f0);
            Set(d, 1, f1 * a1);
            Set(d, 2, f1 * a2 + 0.5 * f2 * a1 * a1);
            Set(d, 3, f1 * a3 + f2 * a1 * a2 + f3 * a1 * a1 * a1 / 6);
        }

        private void Set4(int d, X v0, X v1, X v2, X v3)
        {
            // Evaluate all four before storing, in case d aliases an input.
            v0 = Let(v0); v1 = Let(v1); v2 = Let(v2); v3 = Let(v3);
            Set(d, 0, v0); Set(d, 1, v1); Set(d, 2, v2); Set(d, 3, v3);
        }

        public Func<double[], double, Jet3> BuildJet()
        {
            EmitJetBody();
            _body.Add(JetOf(_p.Result));
            var block = Expression.Block(typeof(Jet3), _locals, _body);
            return Expression.Lambda<Func<double[], double, Jet3>>(block, _c, _phi).Compile();
        }

        /// <summary>The jets of two result registers from one run of the program (fused evaluation).</summary>
        public Func<double[], double, JetPair> BuildJetPair(int first, int second)
        {
            EmitJetBody();
            var ctor = typeof(JetPair).GetConstructor([typeof(Jet3), typeof(Jet3)])!;
            _body.Add(Expression.New(ctor, JetOf(first), JetOf(second)));
            var block = Expression.Block(typeof(JetPair), _locals, _body);
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
            Set(0, 0, new X(_phi)); Set(0, 1, 1.0); Set(0, 2, 0.0); Set(0, 3, 0.0);
            for (int pc = 0; pc < code.Length; pc++)
            {
                PlaceLabel(pc);
                var I = code[pc];
                int A = I.A, B = I.B, D = I.Dst;
                X a0 = R(A, 0), a1 = R(A, 1), a2 = R(A, 2), a3 = R(A, 3);
                X b0 = R(B, 0), b1 = R(B, 1), b2 = R(B, 2), b3 = R(B, 3);
                X c = C(pc);
                switch (I.Op)
                {
                    case Op.LoadConst: Set4(D, c, 0.0, 0.0, 0.0); break;
                    case Op.Copy: Set4(D, a0, a1, a2, a3); break;
                    case Op.Neg: Set4(D, -a0, -a1, -a2, -a3); break;
                    case Op.Add: Set4(D, a0 + b0, a1 + b1, a2 + b2, a3 + b3); break;
                    case Op.Sub: Set4(D, a0 - b0, a1 - b1, a2 - b2, a3 - b3); break;
                    case Op.Mul:
                        Set4(D, a0 * b0, a0 * b1 + a1 * b0, a0 * b2 + a1 * b1 + a2 * b0, a0 * b3 + a1 * b2 + a2 * b1 + a3 * b0);
                        break;
                    case Op.Div:
                    {
                        X q0 = Let(a0 / b0);
                        X q1 = Let((a1 - b1 * q0) / b0);
                        X q2 = Let((a2 - b1 * q1 - b2 * q0) / b0);
                        Set4(D, q0, q1, q2, (a3 - b1 * q2 - b2 * q1 - b3 * q0) / b0);
                        break;
                    }
                    case Op.AddC: Set4(D, a0 + c, a1, a2, a3); break;
                    case Op.MulC: { X k = Let(c); Set4(D, a0 * k, a1 * k, a2 * k, a3 * k); break; }
                    case Op.SubCR: Set4(D, c - a0, -a1, -a2, -a3); break;
                    case Op.DivC: { X k = Let(c); Set4(D, a0 / k, a1 / k, a2 / k, a3 / k); break; }
                    case Op.DivCR:
                    {
                        X r = Let(1.0 / a0), q = Let(c / a0);
                        Compose(A, D, q, -q * r, 2 * q * r * r, -6 * q * r * r * r);
                        break;
                    }
                    case Op.PowInt:
                    {
                        int m = I.N;
                        if (m == 2) Set4(D, a0 * a0, 2 * a0 * a1, 2 * a0 * a2 + a1 * a1, 2 * (a0 * a3 + a1 * a2));
                        else if (m == 0) Set4(D, 1.0, 0.0, 0.0, 0.0);
                        else
                        {
                            double mm = m;
                            X x = Let(a0);
                            X p0 = PowInt(x, m), p1 = PowInt(x, m - 1), p2 = PowInt(x, m - 2);
                            X f3 = m == 1 || m == 2 ? 0.0 : mm * (mm - 1) * (mm - 2) * PowInt(x, m - 3);
                            Compose(A, D, p0, mm * p1, mm * (mm - 1) * p2, f3);
                        }
                        break;
                    }
                    case Op.PowC:
                    {
                        X k = Let(c), x = Let(a0), p = Let(Call("Pow", x, k)), r = Let(1.0 / x);
                        Compose(A, D, p, k * p * r, k * (k - 1) * p * r * r, k * (k - 1) * (k - 2) * p * r * r * r);
                        break;
                    }
                    case Op.CPow:
                    {
                        X k = Let(c), p = Let(Call("Pow", k, a0)), l = Let(Call("Log", k));
                        Compose(A, D, p, l * p, l * l * p, l * l * l * p);
                        break;
                    }
                    case Op.Pow:
                    {
                        int L = I.Aux, M = I.Aux + 1;
                        X x = Let(a0), r = Let(1.0 / x);
                        Compose(A, L, Call("Log", x), r, -r * r, 2 * r * r * r);
                        X l0 = R(L, 0), l1 = R(L, 1), l2 = R(L, 2), l3 = R(L, 3);
                        X y0 = Let(b0), y1 = Let(b1), y2 = Let(b2), y3 = Let(b3);
                        Set4(M, y0 * l0, y0 * l1 + y1 * l0, y0 * l2 + y1 * l1 + y2 * l0, y0 * l3 + y1 * l2 + y2 * l1 + y3 * l0);
                        X p = Let(Call("Pow", x, y0));
                        Compose(M, D, p, p, p, p);
                        break;
                    }
                    case Op.Exp: { X e = Let(Call("Exp", a0)); Compose(A, D, e, e, e, e); break; }
                    case Op.Log: { X r = Let(1.0 / a0); Compose(A, D, Call("Log", a0), r, -r * r, 2 * r * r * r); break; }
                    case Op.Log10:
                    {
                        X r = Let(1.0 / a0);
                        X k = 1 / Math.Log(10);
                        Compose(A, D, Call("Log10", a0), r * k, -r * r * k, 2 * r * r * r * k);
                        break;
                    }
                    case Op.Sqrt:
                    {
                        X x = Let(a0), q = Let(Call("Sqrt", x)), h = Let(0.5 / q), r = Let(1.0 / x);
                        Compose(A, D, q, h, -0.5 * h * r, 0.75 * h * r * r);
                        break;
                    }
                    case Op.Sin: { X sn = Let(Call("Sin", a0)), cs = Let(Call("Cos", a0)); Compose(A, D, sn, cs, -sn, -cs); break; }
                    case Op.Cos: { X sn = Let(Call("Sin", a0)), cs = Let(Call("Cos", a0)); Compose(A, D, cs, -sn, -cs, sn); break; }
                    case Op.Tan:
                    {
                        X t = Let(Call("Tan", a0)), w = Let(1.0 + t * t);
                        Compose(A, D, t, w, 2 * t * w, 2 * w * (1.0 + 3 * t * t));
                        break;
                    }
                    case Op.Sinh: { X sh = Let(Call("Sinh", a0)), ch = Let(Call("Cosh", a0)); Compose(A, D, sh, ch, sh, ch); break; }
                    case Op.Cosh: { X sh = Let(Call("Sinh", a0)), ch = Let(Call("Cosh", a0)); Compose(A, D, ch, sh, ch, sh); break; }
                    case Op.Tanh:
                    {
                        X t = Let(Call("Tanh", a0)), ch = Let(Call("Cosh", a0)), w = Let(1.0 / (ch * ch));
                        Compose(A, D, t, w, -2 * t * w, 2 * w * (2 * t * t - w));
                        break;
                    }
                    case Op.Asin:
                    case Op.Acos:
                    {
                        bool acos = I.Op == Op.Acos;
                        X x = Let(a0), g = Let(1.0 / Call("Sqrt", (1.0 - x) * (1.0 + x))), g3 = Let(g * g * g);
                        X sg = acos ? -1.0 : 1.0;
                        Compose(A, D, Call(acos ? "Acos" : "Asin", x), sg * g, sg * x * g3, sg * (1.0 + 2 * x * x) * g3 * g * g);
                        break;
                    }
                    case Op.Atan:
                    {
                        X x = Let(a0), q = Let(1.0 / (1.0 + x * x));
                        Compose(A, D, Call("Atan", x), q, -2 * x * q * q, (6 * x * x - 2.0) * q * q * q);
                        break;
                    }
                    case Op.Asinh:
                    {
                        X x = Let(a0), g = Let(1.0 / Call("Sqrt", 1.0 + x * x)), g3 = Let(g * g * g);
                        Compose(A, D, Call("Asinh", x), g, -x * g3, (2 * x * x - 1.0) * g3 * g * g);
                        break;
                    }
                    case Op.Acosh:
                    {
                        X x = Let(a0), g = Let(1.0 / Call("Sqrt", (x - 1.0) * (x + 1.0))), g3 = Let(g * g * g);
                        Compose(A, D, Call("Acosh", x), g, -x * g3, (2 * x * x + 1.0) * g3 * g * g);
                        break;
                    }
                    case Op.Atanh:
                    {
                        X x = Let(a0), q = Let(1.0 / ((1.0 - x) * (1.0 + x)));
                        Compose(A, D, Call("Atanh", x), q, 2 * x * q * q, (2.0 + 6 * x * x) * q * q * q);
                        break;
                    }
                    case Op.Abs:
                    {
                        X sign = Let(Helper(typeof(ProgramJit), nameof(AbsSign), a0, a1, a2, a3));
                        Set4(D, Call("Abs", a0), sign * a1, sign * a2, sign * a3);
                        break;
                    }
                    case Op.Step: Set4(D, Helper(typeof(CompiledProgram), nameof(CompiledProgram.StepScalar), a0), 0.0, 0.0, 0.0); break;
                    case Op.Min:
                    case Op.Max:
                    {
                        var sel = Expression.Variable(typeof(int));
                        _locals.Add(sel);
                        _body.Add(Expression.Assign(sel, Expression.Call(typeof(ProgramJit).GetMethod(nameof(Choose), Flags)!,
                            a0.E, a1.E, a2.E, a3.E, b0.E, b1.E, b2.E, b3.E, Expression.Constant(I.Op == Op.Min))));
                        X Pick(X x, X y) => new(Expression.Condition(Expression.Equal(sel, Expression.Constant(0)), x.E,
                            Expression.Condition(Expression.Equal(sel, Expression.Constant(1)), y.E, Expression.Constant(double.NaN))));
                        Set4(D, Pick(a0, b0), Pick(a1, b1), Pick(a2, b2), Pick(a3, b3));
                        break;
                    }
                    case Op.JumpIfNot: _body.Add(Expression.IfThen(Expression.Not(Cond(I.Aux, a0, b0)), Expression.Goto(_labels[I.N]))); break;
                    case Op.Jump: _body.Add(Expression.Goto(_labels[I.N])); break;
                    default: throw new InvalidOperationException($"no code for {I.Op}");
                }
            }
            PlaceLabel(code.Length);
        }
    }

    /// <summary>The sign ladder of <see cref="Jet3Evaluator"/>'s Abs: the right-hand direction at a0 = 0.</summary>
    internal static double AbsSign(double a0, double a1, double a2, double a3)
        => a0 > 0 ? 1 : a0 < 0 ? -1 : a1 < 0 ? -1 : a1 > 0 ? 1 : a2 < 0 ? -1 : a2 > 0 ? 1 : a3 < 0 ? -1 : 1;

    /// <summary>Lexicographic choice of <see cref="Jet3Evaluator"/>'s Select: 0 takes the first series, 1 the second, 2 NaN.</summary>
    internal static int Choose(double a0, double a1, double a2, double a3, double b0, double b1, double b2, double b3, bool min)
    {
        if (double.IsNaN(a0) || double.IsNaN(b0)) return 2;
        int cmp = a0.CompareTo(b0);
        if (cmp == 0) cmp = a1.CompareTo(b1);
        if (cmp == 0) cmp = a2.CompareTo(b2);
        if (cmp == 0) cmp = a3.CompareTo(b3);
        return (min ? cmp <= 0 : cmp >= 0) ? 0 : 1;
    }
}
