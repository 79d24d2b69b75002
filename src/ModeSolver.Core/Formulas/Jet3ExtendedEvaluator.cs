using ModeSolver.Models;

namespace ModeSolver.Formulas;

/// <summary>
/// The order-3 jet evaluator of <see cref="Jet3Evaluator"/> in double-double arithmetic (<see cref="DoubleDouble"/>), for
/// smooth programs built from arithmetic, powers, exp, log, sqrt and the hyperbolic functions. Where a derivative is a
/// difference of nearly equal terms (the Einstein-frame slope of a plateau flatter than 1e-12, e.g. the Palatini map at
/// xi phi^2 ~ 1e11), double arithmetic leaves only noise; here about 32 digits survive the cancellation, and the
/// results are rounded to double at the end. Same chain rule (Faa di Bruno on normalised coefficients); kept parallel to
/// the double kernels instead of one generic evaluator so that the double path (the hot one) stays as it is.
/// </summary>
internal static class Jet3ExtendedEvaluator
{
    /// <summary>True when every instruction of the program has a double-double kernel here.</summary>
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

    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization)]
    private static void Compose(Span<DoubleDouble> a, Span<DoubleDouble> d, DoubleDouble f0, DoubleDouble f1, DoubleDouble f2, DoubleDouble f3)
    {
        DoubleDouble a1 = a[1], a2 = a[2], a3 = a[3];
        d[0] = f0;
        d[1] = f1 * a1;
        d[2] = f1 * a2 + 0.5 * f2 * a1 * a1;
        d[3] = f1 * a3 + f2 * a1 * a2 + f3 * a1 * a1 * a1 / 6.0;
    }

    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization)]
    private static DoubleDouble PowInt(DoubleDouble x, int m)
    {
        if (m < 0) return 1.0 / PowInt(x, -m);
        DoubleDouble r = 1.0, b = x;
        while (m > 0)
        {
            if ((m & 1) != 0) r *= b;
            b *= b;
            m >>= 1;
        }
        return r;
    }

    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization)]
    private static DoubleDouble Pow(DoubleDouble a, double c) =>
        a.Hi > 0 ? DoubleDouble.Exp(c * DoubleDouble.Log(a)) : new DoubleDouble(Math.Pow(a.Hi, c));

    /// <summary>Runs the program at <paramref name="phi"/>; <paramref name="s"/> holds 4 coefficients per register.</summary>
    /// <remarks>
    /// Compiled optimised at its first call: a run of the command line is over before tiered compilation would replace
    /// the unoptimised first version, whose un-inlined double-double operators made it about ten times slower.
    /// </remarks>
    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization)]
    public static void Run(CompiledProgram program, double phi, Span<DoubleDouble> s)
    {
        s[0] = phi; s[1] = 1.0; s[2] = 0.0; s[3] = 0.0;
        var code = program.Code;
        for (int pc = 0; pc < code.Length; pc++)
        {
            ref readonly Instr I = ref code[pc];
            var d = s.Slice(I.Dst << 2, 4);
            var a = s.Slice(I.A << 2, 4);
            var b = s.Slice(I.B << 2, 4);
            switch (I.Op)
            {
                case Op.LoadConst: d[0] = I.C; d[1] = 0.0; d[2] = 0.0; d[3] = 0.0; break;
                case Op.Copy: a.CopyTo(d); break;
                case Op.Neg: for (int k = 0; k < 4; k++) d[k] = -a[k]; break;
                case Op.Add: for (int k = 0; k < 4; k++) d[k] = a[k] + b[k]; break;
                case Op.Sub: for (int k = 0; k < 4; k++) d[k] = a[k] - b[k]; break;
                case Op.Mul:
                {
                    DoubleDouble a0 = a[0], a1 = a[1], a2 = a[2], a3 = a[3], b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3];
                    d[0] = a0 * b0;
                    d[1] = a0 * b1 + a1 * b0;
                    d[2] = a0 * b2 + a1 * b1 + a2 * b0;
                    d[3] = a0 * b3 + a1 * b2 + a2 * b1 + a3 * b0;
                    break;
                }
                case Op.Div:
                {
                    // One double-double division, then products (a division costs several products).
                    DoubleDouble b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3], rb = 1.0 / b0;
                    var c0 = a[0] * rb;
                    var c1 = (a[1] - b1 * c0) * rb;
                    var c2 = (a[2] - b1 * c1 - b2 * c0) * rb;
                    d[3] = (a[3] - b1 * c2 - b2 * c1 - b3 * c0) * rb;
                    d[0] = c0; d[1] = c1; d[2] = c2;
                    break;
                }
                case Op.AddC: d[0] = a[0] + I.C; d[1] = a[1]; d[2] = a[2]; d[3] = a[3]; break;
                case Op.MulC: for (int k = 0; k < 4; k++) d[k] = a[k] * I.C; break;
                case Op.SubCR: d[0] = I.C - a[0]; d[1] = -a[1]; d[2] = -a[2]; d[3] = -a[3]; break;
                case Op.DivC: for (int k = 0; k < 4; k++) d[k] = a[k] / I.C; break;
                case Op.DivCR:
                {
                    DoubleDouble r = 1.0 / a[0], q = I.C * r;
                    Compose(a, d, q, -q * r, 2.0 * q * r * r, -6.0 * q * r * r * r);
                    break;
                }
                case Op.PowInt:
                {
                    int m = I.N;
                    if (m == 0) { d[0] = 1.0; d[1] = 0.0; d[2] = 0.0; d[3] = 0.0; break; }
                    double mm = m;
                    DoubleDouble a0 = a[0];
                    // a0^(m-3) once, then the higher powers by products (a0 = 0 with m < 3 keeps the direct form).
                    DoubleDouble p3, p2, p1, p0;
                    if (m >= 3 || a0.Hi != 0)
                    {
                        p3 = PowInt(a0, m - 3); p2 = p3 * a0; p1 = p2 * a0; p0 = p1 * a0;
                    }
                    else
                    {
                        p3 = 0.0; p2 = PowInt(a0, m - 2); p1 = PowInt(a0, m - 1); p0 = PowInt(a0, m);
                    }
                    Compose(a, d, p0, mm * p1, m == 1 ? 0.0 : mm * (mm - 1) * p2, m == 1 || m == 2 ? 0.0 : mm * (mm - 1) * (mm - 2) * p3);
                    break;
                }
                case Op.PowC:
                {
                    double c = I.C;
                    DoubleDouble a0 = a[0], p = Pow(a0, c), r = 1.0 / a0;
                    Compose(a, d, p, c * p * r, c * (c - 1) * p * r * r, c * (c - 1) * (c - 2) * p * r * r * r);
                    break;
                }
                case Op.CPow:
                {
                    DoubleDouble l = DoubleDouble.Log(I.C), p = DoubleDouble.Exp(a[0] * l);
                    Compose(a, d, p, l * p, l * l * p, l * l * l * p);
                    break;
                }
                case Op.Pow:
                {
                    var l = s.Slice(I.Aux << 2, 4);
                    var m = s.Slice((I.Aux + 1) << 2, 4);
                    DoubleDouble a0 = a[0], r = 1.0 / a0;
                    Compose(a, l, DoubleDouble.Log(a0), r, -r * r, 2.0 * r * r * r);
                    DoubleDouble b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3];
                    m[0] = b0 * l[0];
                    m[1] = b0 * l[1] + b1 * l[0];
                    m[2] = b0 * l[2] + b1 * l[1] + b2 * l[0];
                    m[3] = b0 * l[3] + b1 * l[2] + b2 * l[1] + b3 * l[0];
                    var p = a0.Hi > 0 ? DoubleDouble.Exp(m[0]) : new DoubleDouble(Math.Pow(a0.Hi, b0.Hi));
                    Compose(m, d, p, p, p, p);
                    break;
                }
                case Op.Exp: { var e = DoubleDouble.Exp(a[0]); Compose(a, d, e, e, e, e); break; }
                case Op.Log: { DoubleDouble r = 1.0 / a[0]; Compose(a, d, DoubleDouble.Log(a[0]), r, -r * r, 2.0 * r * r * r); break; }
                case Op.Log10:
                {
                    DoubleDouble k = 1.0 / DoubleDouble.Log(10.0), r = 1.0 / a[0];
                    Compose(a, d, DoubleDouble.Log(a[0]) * k, r * k, -r * r * k, 2.0 * r * r * r * k);
                    break;
                }
                case Op.Sqrt:
                {
                    DoubleDouble a0 = a[0], q = DoubleDouble.Sqrt(a0), h = 0.5 / q, r = 1.0 / a0;
                    Compose(a, d, q, h, -0.5 * h * r, 0.75 * h * r * r);
                    break;
                }
                case Op.Sinh:
                case Op.Cosh:
                {
                    DoubleDouble e = DoubleDouble.Exp(a[0]), ei = 1.0 / e, sh = 0.5 * (e - ei), ch = 0.5 * (e + ei);
                    if (I.Op == Op.Sinh) Compose(a, d, sh, ch, sh, ch);
                    else Compose(a, d, ch, sh, ch, sh);
                    break;
                }
                case Op.Tanh:
                {
                    // tanh = sign (1 - 2/(e^{2|x|} + 1)) and sech^2 = 4/(e^x + e^-x)^2: no cancellation where tanh saturates.
                    DoubleDouble x = a[0];
                    double sign = x.Hi < 0 ? -1 : 1;
                    DoubleDouble e2 = DoubleDouble.Exp(2.0 * (sign * x)), t = sign * (1.0 - 2.0 / (e2 + 1.0));
                    DoubleDouble e = DoubleDouble.Exp(x), sum = e + 1.0 / e, w = 4.0 / (sum * sum);
                    Compose(a, d, t, w, -2.0 * t * w, 2.0 * w * (2.0 * t * t - w));
                    break;
                }
                default:
                    throw new InvalidOperationException($"no double-double kernel for {I.Op}");
            }
        }
    }

    /// <summary>Register <paramref name="register"/> of a finished run as a <see cref="Jet3"/> (rounded to double).</summary>
    public static Jet3 Read(ReadOnlySpan<DoubleDouble> s, int register)
    {
        var r = s.Slice(register << 2, 4);
        return new Jet3(r[0].ToDouble(), r[1].ToDouble(), 2 * r[2].ToDouble(), 6 * r[3].ToDouble());
    }
}
