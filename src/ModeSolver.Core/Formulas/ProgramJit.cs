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
    private static readonly ShapeCache<ProgramJit> Cache = new();

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
        return Cache.GetOrAdd(Key(program), () => new ProgramJit(new Builder(program, jet: false).BuildValue(), new Builder(program, jet: true).BuildJet()));
    }

    /// <summary>
    /// Compiled fused code returning the jets of registers <paramref name="first"/> and <paramref name="second"/> of
    /// <paramref name="program"/> (cached by shape in the same bounded cache), or null if unsupported.
    /// </summary>
    public static Func<double[], double, JetPair>? PairFor(CompiledProgram program, int first, int second)
    {
        if (!Supported) return null;
        return Cache.GetOrAdd("pair:" + first + ":" + second + ":" + Key(program),
            () => new ProgramJit(new Builder(program, jet: true).BuildJetPair(first, second))).Pair;
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

    private sealed class Builder(CompiledProgram p, bool jet) : CodeBuilder(p, jet ? 4 : 1)
    {
        private readonly ParameterExpression _phi = Expression.Parameter(typeof(double), "phi");

        private Series3<Expr> R4(int k) => new(R(k, 0), R(k, 1), R(k, 2), R(k, 3));

        private void Set4(int d, in Series3<Expr> v)
        {
            // Evaluate all four before storing, in case d aliases an input.
            Expr v0 = Expr.Let(v.C0), v1 = Expr.Let(v.C1), v2 = Expr.Let(v.C2), v3 = Expr.Let(v.C3);
            Set(d, 0, v0); Set(d, 1, v1); Set(d, 2, v2); Set(d, 3, v3);
        }

        public Func<double[], double, double> BuildValue()
        {
            Body.Add(Expression.Assign(Register(0)[0], _phi));
            EmitCode((pc, I) => Set(I.Dst, 0, Kernels.Value(I.Op, R(I.A, 0), R(I.B, 0), C(pc), I.N)));
            Body.Add(Register(Program.Result)[0]);
            var block = Expression.Block(typeof(double), Scope.Locals, Body);
            return Expression.Lambda<Func<double[], double, double>>(block, Constants, _phi).Compile();
        }

        public Func<double[], double, Jet3> BuildJet()
        {
            EmitJetBody();
            Body.Add(JetOf(Program.Result));
            var block = Expression.Block(typeof(Jet3), Scope.Locals, Body);
            return Expression.Lambda<Func<double[], double, Jet3>>(block, Constants, _phi).Compile();
        }

        /// <summary>The jets of two result registers from one run of the program (fused evaluation).</summary>
        public Func<double[], double, JetPair> BuildJetPair(int first, int second)
        {
            EmitJetBody();
            var ctor = typeof(JetPair).GetConstructor([typeof(Jet3), typeof(Jet3)])!;
            Body.Add(Expression.New(ctor, JetOf(first), JetOf(second)));
            var block = Expression.Block(typeof(JetPair), Scope.Locals, Body);
            return Expression.Lambda<Func<double[], double, JetPair>>(block, Constants, _phi).Compile();
        }

        private NewExpression JetOf(int res)
        {
            var ctor = typeof(Jet3).GetConstructor([typeof(double), typeof(double), typeof(double), typeof(double)])!;
            return Expression.New(ctor, R(res, 0).E, R(res, 1).E, (2 * R(res, 2)).E, (6 * R(res, 3)).E);
        }

        private void EmitJetBody()
        {
            Set(0, 0, new Expr(_phi, Scope)); Set(0, 1, 1.0); Set(0, 2, 0.0); Set(0, 3, 0.0);
            EmitCode((pc, I) =>
            {
                Kernels.Jet(I.Op, R4(I.A), R4(I.B), C(pc), I.N, out var v);
                Set4(I.Dst, v);
            });
        }
    }
}
