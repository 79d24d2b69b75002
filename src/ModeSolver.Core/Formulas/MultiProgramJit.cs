using System.Linq.Expressions;
using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>Generated value code of a program in several variables: f at the n doubles at <paramref name="point"/>.</summary>
internal delegate double MultiValueCode(double[] constants, nint point);

/// <summary>
/// Generated series code of a program in several variables: writes the result register's <see cref="MultiLayout.Width"/>
/// slots (value, gradient, distinct second and third partials) to <paramref name="result"/>.
/// </summary>
internal delegate void MultiSeriesCode(double[] constants, nint point, nint result);

/// <summary>
/// Straight-line code for a program in several variables (<see cref="MultiFormula"/>), built with System.Linq.Expressions:
/// every register becomes <see cref="MultiLayout.Width"/> locals, every instruction the kernel the interpreter runs
/// (<see cref="Kernels.Value"/>, <see cref="MultiKernels.Run"/>) on <see cref="Expr"/>, with the layout's loops unrolled
/// at build time; so results agree with the interpreter bit for bit by construction. The point and the result are passed
/// as addresses (expression trees take no spans; the caller pins them), the constants as an array, so one compiled
/// delegate serves every parameter value of a shape (cached by shape, order and variable count).
/// </summary>
internal static class MultiProgramJit
{
    /// <summary>Largest registers x slots compiled; larger programs stay on the interpreter (compile time grows with the locals).</summary>
    public const int MaxLocals = 20_000;

    private static readonly ShapeCache<Delegate> Cache = new();

    /// <summary>Value code for <paramref name="program"/> in <paramref name="variables"/> variables, or null where the runtime cannot compile code.</summary>
    public static MultiValueCode? ValueFor(CompiledProgram program, int variables)
    {
        if (!ProgramJit.Supported || program.RegisterCount > MaxLocals) return null;
        return (MultiValueCode)Cache.GetOrAdd("mvalue:" + variables + ":" + ProgramJit.Key(program),
            () => new Builder(program, new MultiLayout(variables, 1), width: 1).BuildValue());
    }

    /// <summary>Series code for <paramref name="program"/> in <paramref name="layout"/>, or null (no compiler, or too large).</summary>
    public static MultiSeriesCode? SeriesFor(CompiledProgram program, MultiLayout layout)
    {
        if (!ProgramJit.Supported || (long)program.RegisterCount * layout.Width > MaxLocals) return null;
        return (MultiSeriesCode)Cache.GetOrAdd("mseries:" + layout.N + ":" + layout.Order + ":" + ProgramJit.Key(program),
            () => new Builder(program, layout, layout.Width).BuildSeries());
    }

    /// <summary>Pointer access for the generated code (expression trees have no pointer types).</summary>
    internal static unsafe class Memory
    {
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public static double Load(nint p, int i) => ((double*)p)[i];

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public static void Store(nint p, int i, double v) => ((double*)p)[i] = v;
    }

    /// <summary>A register as the kernels see it: its locals; a write is an assignment statement at that point.</summary>
    private readonly struct LocalRegister(ParameterExpression[] slots, Expr.Scope scope) : IMultiRegister<Expr>
    {
        public Expr this[int slot] => new(slots[slot], scope);

        public void Set(int slot, Expr value) => scope.Body.Add(Expression.Assign(slots[slot], value.E));

        public ReadOnlySpan<Expr> Slots(int width)
        {
            var all = new Expr[width];
            for (int k = 0; k < width; k++) all[k] = this[k];
            return all;
        }
    }

    private sealed class Builder(CompiledProgram p, MultiLayout layout, int width) : CodeBuilder(p, width)
    {
        private readonly ParameterExpression _point = Expression.Parameter(typeof(nint), "point");
        private readonly ParameterExpression _result = Expression.Parameter(typeof(nint), "result");
        private static readonly System.Reflection.MethodInfo Load = typeof(Memory).GetMethod(nameof(Memory.Load))!;
        private static readonly System.Reflection.MethodInfo Store = typeof(Memory).GetMethod(nameof(Memory.Store))!;

        private LocalRegister Reg(int k) => new(Register(k), Scope);

        private Expr Coordinate(int v) => new(Expression.Call(Load, _point, Expression.Constant(v)), Scope);

        public MultiValueCode BuildValue()
        {
            for (int v = 0; v < layout.N; v++) Set(v, 0, Coordinate(v));
            EmitCode((pc, I) => Set(I.Dst, 0, Kernels.Value(I.Op, R(I.A, 0), R(I.B, 0), C(pc), I.N)));
            Body.Add(Register(Program.Result)[0]);
            var block = Expression.Block(typeof(double), Scope.Locals, Body);
            return Expression.Lambda<MultiValueCode>(block, Constants, _point).Compile();
        }

        public MultiSeriesCode BuildSeries()
        {
            int w = layout.Width;
            // The variables' registers as the interpreter loads them: value, a unit gradient entry, zeros.
            for (int v = 0; v < layout.N; v++)
                for (int k = 0; k < w; k++)
                    Set(v, k, k == 0 ? Coordinate(v) : k == 1 + v ? 1.0 : 0.0);
            EmitCode((pc, I) => MultiKernels.Run<Expr, LocalRegister>(layout, I.Op, Reg(I.Dst), Reg(I.A), Reg(I.B),
                Reg(I.Aux), Reg(Math.Min(I.Aux + 1, Program.RegisterCount - 1)), C(pc), I.N));
            var res = Register(Program.Result);
            for (int k = 0; k < w; k++) Body.Add(Expression.Call(Store, _result, Expression.Constant(k), res[k]));
            var block = Expression.Block(typeof(void), Scope.Locals, Body);
            return Expression.Lambda<MultiSeriesCode>(block, Constants, _point, _result).Compile();
        }
    }
}
