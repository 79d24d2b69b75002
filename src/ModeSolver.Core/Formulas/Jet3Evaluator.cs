using System.Runtime.CompilerServices;
using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// The order-3 interpreter: the program run on 4-coefficient Taylor series (<see cref="Series3{T}"/>), each instruction
/// by its kernel in <see cref="Kernels.Jet"/>. The same loop serves plain doubles (<see cref="Real"/>) and
/// double-double arithmetic (<see cref="Extended"/>); the generated code (<see cref="ProgramJit"/>) runs the same kernels.
/// </summary>
internal static unsafe class Jet3Evaluator
{
    /// <summary>Runs the program; <paramref name="s"/> holds 4 doubles per register.</summary>
    public static Jet3 Run(CompiledProgram program, double phi, double* s)
    {
        var r = new Span<Series3<Real>>(s, program.RegisterCount);
        Run(program, (Real)phi, r);
        return Read(r, program.Result);
    }

    /// <summary>Runs the program at <paramref name="phi"/>; <paramref name="r"/> holds one series per register.</summary>
    [SkipLocalsInit]
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void Run<T>(CompiledProgram program, T phi, Span<Series3<T>> r) where T : struct, IFormulaNumber<T>
    {
        r[0] = new Series3<T>(phi, 1.0, 0.0, 0.0);
        var code = program.Code;
        for (int pc = 0; pc < code.Length; pc++)
        {
            ref readonly Instr I = ref code[pc];
            switch (I.Op)
            {
                case Op.JumpIfNot:
                    if (!CompiledProgram.Holds(I.Aux, ToDouble(r[I.A].C0), ToDouble(r[I.B].C0))) pc = I.N - 1;
                    break;
                case Op.Jump: pc = I.N - 1; break;
                default: Kernels.Jet(I.Op, r[I.A], r[I.B], (T)I.C, I.N, out r[I.Dst]); break;
            }
        }
    }

    /// <summary>Register <paramref name="register"/> of a finished run as derivatives (f, f', f'', f''').</summary>
    public static Jet3 Read(ReadOnlySpan<Series3<Real>> r, int register)
    {
        ref readonly var x = ref r[register];
        return new Jet3(x.C0.V, x.C1.V, 2 * x.C2.V, 6 * x.C3.V);
    }

    /// <summary>Register <paramref name="register"/> of a finished extended-precision run, rounded to double.</summary>
    public static Jet3 Read(ReadOnlySpan<Series3<Extended>> r, int register)
    {
        ref readonly var x = ref r[register];
        return new Jet3(x.C0.V.ToDouble(), x.C1.V.ToDouble(), 2 * x.C2.V.ToDouble(), 6 * x.C3.V.ToDouble());
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double ToDouble<T>(T x) where T : struct, IFormulaNumber<T>
    {
        if (typeof(T) == typeof(Real)) return Unsafe.As<T, Real>(ref x).V;
        if (typeof(T) == typeof(Extended)) return Unsafe.As<T, Extended>(ref x).V.Hi;
        throw new NotSupportedException($"no comparison for {typeof(T).Name}");
    }
}
