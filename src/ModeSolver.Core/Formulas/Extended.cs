using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>
/// A <see cref="DoubleDouble"/> as an <see cref="IFormulaNumber{T}"/>: the extended-precision interpreter's arithmetic
/// (about 32 digits), for the smooth operations <see cref="Supports"/> lists. Where a derivative is a difference of
/// nearly equal terms (the Einstein-frame slope of a plateau flatter than 1e-12, e.g. the Palatini map at
/// xi phi^2 ~ 1e11), double arithmetic leaves only noise; here about 32 digits survive the cancellation.
/// </summary>
internal readonly struct Extended : IFormulaNumber<Extended>
{
    /// <summary>The value.</summary>
    public readonly DoubleDouble V;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Extended(DoubleDouble v) => V = v;

    /// <summary>True when every instruction of the program has an extended-precision kernel (the smooth operations with double-double functions).</summary>
    public static bool Supports(CompiledProgram program)
    {
        foreach (var i in program.Code)
        {
            switch (i.Op)
            {
                case Op.LoadConst: case Op.Copy: case Op.Neg: case Op.Add: case Op.Sub: case Op.Mul: case Op.Div:
                case Op.AddC: case Op.MulC: case Op.SubCR: case Op.DivC: case Op.DivCR: case Op.PowInt: case Op.PowC:
                case Op.CPow: case Op.Pow: case Op.Exp: case Op.Log: case Op.Log10: case Op.Sqrt:
                case Op.Sinh: case Op.Cosh: case Op.Tanh:
                    break;
                default:
                    return false;
            }
        }
        return true;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static implicit operator Extended(double c) => new(c);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Extended operator +(Extended a, Extended b) => new(a.V + b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Extended operator -(Extended a, Extended b) => new(a.V - b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Extended operator *(Extended a, Extended b) => new(a.V * b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Extended operator /(Extended a, Extended b) => new(a.V / b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Extended operator -(Extended a) => new(-a.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Extended Let(Extended x) => x;

    /// <summary>a^b = exp(b log a) for a &gt; 0; the double power otherwise (a negative base with an integer exponent, zero).</summary>
    public static Extended Pow(Extended a, Extended b)
        => a.V.Hi > 0 ? new(DoubleDouble.Exp(b.V * DoubleDouble.Log(a.V))) : new(Math.Pow(a.V.Hi, b.V.Hi));

    public static Extended Exp(Extended x) => new(DoubleDouble.Exp(x.V));
    public static Extended Log(Extended x) => new(DoubleDouble.Log(x.V));
    public static Extended Log10(Extended x) => new(DoubleDouble.Log(x.V) * (1.0 / DoubleDouble.Log(10.0)));
    public static Extended Sqrt(Extended x) => new(DoubleDouble.Sqrt(x.V));

    public static Extended Sinh(Extended x)
    {
        DoubleDouble e = DoubleDouble.Exp(x.V);
        return new(0.5 * (e - 1.0 / e));
    }

    public static Extended Cosh(Extended x)
    {
        DoubleDouble e = DoubleDouble.Exp(x.V);
        return new(0.5 * (e + 1.0 / e));
    }

    /// <summary>tanh = sign (1 - 2/(e^{2|x|} + 1)): no cancellation where tanh saturates.</summary>
    public static Extended Tanh(Extended x)
    {
        double sign = x.V.Hi < 0 ? -1 : 1;
        DoubleDouble e2 = DoubleDouble.Exp(2.0 * (sign * x.V));
        return new(sign * (1.0 - 2.0 / (e2 + 1.0)));
    }

    private static Extended Unsupported([CallerMemberName] string name = "") =>
        throw new NotSupportedException($"no extended-precision {name.ToLowerInvariant()} (see {nameof(Extended)}.{nameof(Supports)})");

    public static Extended Sin(Extended x) => Unsupported();
    public static Extended Cos(Extended x) => Unsupported();
    public static Extended Tan(Extended x) => Unsupported();
    public static Extended Asin(Extended x) => Unsupported();
    public static Extended Acos(Extended x) => Unsupported();
    public static Extended Atan(Extended x) => Unsupported();
    public static Extended Asinh(Extended x) => Unsupported();
    public static Extended Acosh(Extended x) => Unsupported();
    public static Extended Atanh(Extended x) => Unsupported();
    public static Extended Abs(Extended x) => Unsupported();
    public static Extended Step(Extended x) => Unsupported();
    public static Extended Min(Extended a, Extended b) => Unsupported();
    public static Extended Max(Extended a, Extended b) => Unsupported();
    public static Extended AbsSign(Extended a0, Extended a1, Extended a2, Extended a3) => Unsupported();
    public static Extended Choose(Extended a0, Extended a1, Extended a2, Extended a3, Extended b0, Extended b1, Extended b2, Extended b3, bool min) => Unsupported();
    public static Extended Pick(Extended choice, Extended x, Extended y) => Unsupported();
    public static Extended FirstSign(ReadOnlySpan<Extended> a) => Unsupported();
    public static Extended ChooseSeries(ReadOnlySpan<Extended> a, ReadOnlySpan<Extended> b, bool min) => Unsupported();
}
