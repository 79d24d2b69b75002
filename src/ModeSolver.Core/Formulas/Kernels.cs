using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>Four normalised Taylor coefficients c_k = f^(k)/k!, k = 0..3, of one register (the order-3 jet).</summary>
internal readonly struct Series3<T> where T : struct, IFormulaNumber<T>
{
    public readonly T C0, C1, C2, C3;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Series3(T c0, T c1, T c2, T c3)
    {
        C0 = c0; C1 = c1; C2 = c2; C3 = c3;
    }
}

/// <summary>
/// Every formula operation, written once, in a generic arithmetic T (<see cref="IFormulaNumber{T}"/>):
/// <see cref="Value"/> is an operation's value, <see cref="Chain"/> declares an elementary function's first three
/// derivatives at a point, and <see cref="Jet"/> is the operation on order-3 Taylor series (the chain rule of
/// <see cref="Compose"/> for functions, the series rules for + - * /). The value interpreter, the order-3 interpreter,
/// the extended-precision interpreter, the code generator (<see cref="ProgramJit"/>) and the multi-variable evaluator
/// (<see cref="MultiJetEvaluator"/>, which uses <see cref="Chain"/>) all run these, so their results agree bit for bit
/// by construction. Only the arbitrary-order recurrences (<see cref="CompiledProgram.RunSeries"/>) are separate.
/// </summary>
[SkipLocalsInit]
internal static class Kernels
{
    /// <summary>The value of one instruction from its operands' values; <paramref name="c"/> is the instruction constant.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static T Value<T>(Op op, T a, T b, T c, int n) where T : struct, IFormulaNumber<T> => op switch
    {
        Op.LoadConst => c,
        Op.Copy => a,
        Op.Neg => -a,
        Op.Add => a + b,
        Op.Sub => a - b,
        Op.Mul => a * b,
        Op.Div => a / b,
        Op.AddC => a + c,
        Op.MulC => a * c,
        Op.SubCR => c - a,
        Op.DivC => a / c,
        Op.DivCR => c / a,
        Op.PowInt => PowInt(a, n),
        Op.PowC => T.Pow(a, c),
        Op.CPow => T.Pow(c, a),
        Op.Pow => T.Pow(a, b),
        Op.Exp => T.Exp(a),
        Op.Log => T.Log(a),
        Op.Log10 => T.Log10(a),
        Op.Sqrt => T.Sqrt(a),
        Op.Sin => T.Sin(a),
        Op.Cos => T.Cos(a),
        Op.Tan => T.Tan(a),
        Op.Sinh => T.Sinh(a),
        Op.Cosh => T.Cosh(a),
        Op.Tanh => T.Tanh(a),
        Op.Asin => T.Asin(a),
        Op.Acos => T.Acos(a),
        Op.Atan => T.Atan(a),
        Op.Asinh => T.Asinh(a),
        Op.Acosh => T.Acosh(a),
        Op.Atanh => T.Atanh(a),
        Op.Abs => T.Abs(a),
        Op.Step => T.Step(a),
        Op.Min => T.Min(a, b),
        Op.Max => T.Max(a, b),
        _ => throw new ArgumentOutOfRangeException(nameof(op), op, "not an arithmetic instruction"),
    };

    /// <summary>x^m by repeated squaring (m = 2 is x*x; negative m takes the reciprocal at the end).</summary>
    public static T PowInt<T>(T x, int m) where T : struct, IFormulaNumber<T>
    {
        if (m == 2) return T.Let(x * x);
        long e = Math.Abs((long)m);
        if (e == 0) return 1.0;
        T b = x, r = 0.0;
        bool first = true;
        while (true)
        {
            if ((e & 1) != 0)
            {
                if (first) { r = b; first = false; }
                else r = T.Let(r * b);
            }
            e >>= 1;
            if (e == 0) break;
            b = T.Let(b * b);
        }
        return m < 0 ? T.Let(1.0 / r) : r;
    }

    /// <summary>True for the operations whose series rule is the chain rule of <see cref="Chain"/> on one argument.</summary>
    public static bool IsChained(Op op) => op is Op.DivCR or Op.PowInt or Op.PowC or Op.CPow or Op.Exp or Op.Log or Op.Log10
        or Op.Sqrt or Op.Sin or Op.Cos or Op.Tan or Op.Sinh or Op.Cosh or Op.Tanh
        or Op.Asin or Op.Acos or Op.Atan or Op.Asinh or Op.Acosh or Op.Atanh;

    /// <summary>
    /// F, F', F'', F''' at <paramref name="x"/> for a one-argument operation y = F(x) (<see cref="IsChained"/>);
    /// <paramref name="c"/> and <paramref name="n"/> are the instruction's constant and integer exponent.
    /// F agrees with <see cref="Value"/> bit for bit.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Chain<T>(Op op, T x, T c, int n, out T f0, out T f1, out T f2, out T f3) where T : struct, IFormulaNumber<T>
    {
        switch (op)
        {
            case Op.DivCR:
            {
                T r = T.Let(1.0 / x), q = T.Let(c / x);
                f0 = q; f1 = -q * r; f2 = 2 * q * r * r; f3 = -6 * q * r * r * r;
                return;
            }
            case Op.PowInt:
            {
                int m = n;
                double mm = m;
                if (m == 0) { f0 = 1.0; f1 = 0.0; f2 = 0.0; f3 = 0.0; return; }
                T p = T.Let(x);
                f0 = PowInt(p, m);
                f1 = mm * PowInt(p, m - 1);
                f2 = mm * (mm - 1) * PowInt(p, m - 2);
                f3 = m == 1 || m == 2 ? 0.0 : mm * (mm - 1) * (mm - 2) * PowInt(p, m - 3);
                return;
            }
            case Op.PowC:
            {
                T k = T.Let(c), p = T.Let(T.Pow(x, k)), r = T.Let(1.0 / x);
                f0 = p; f1 = k * p * r; f2 = k * (k - 1.0) * p * r * r; f3 = k * (k - 1.0) * (k - 2.0) * p * r * r * r;
                return;
            }
            case Op.CPow:
            {
                T k = T.Let(c), p = T.Let(T.Pow(k, x)), l = T.Let(T.Log(k));
                f0 = p; f1 = l * p; f2 = l * l * p; f3 = l * l * l * p;
                return;
            }
            case Op.Exp:
            {
                T e = T.Let(T.Exp(x));
                f0 = e; f1 = e; f2 = e; f3 = e;
                return;
            }
            case Op.Log:
            {
                T r = T.Let(1.0 / x);
                f0 = T.Log(x); f1 = r; f2 = -r * r; f3 = 2 * r * r * r;
                return;
            }
            case Op.Log10:
            {
                T r = T.Let(1.0 / x);
                T k = 1 / Math.Log(10);
                f0 = T.Log10(x); f1 = r * k; f2 = -r * r * k; f3 = 2 * r * r * r * k;
                return;
            }
            case Op.Sqrt:
            {
                T q = T.Let(T.Sqrt(x)), h = T.Let(0.5 / q), r = T.Let(1.0 / x);
                f0 = q; f1 = h; f2 = -0.5 * h * r; f3 = 0.75 * h * r * r;
                return;
            }
            case Op.Sin:
            case Op.Cos:
            {
                T sn = T.Let(T.Sin(x)), cs = T.Let(T.Cos(x));
                if (op == Op.Sin) { f0 = sn; f1 = cs; f2 = -sn; f3 = -cs; }
                else { f0 = cs; f1 = -sn; f2 = -cs; f3 = sn; }
                return;
            }
            case Op.Tan:
            {
                T t = T.Let(T.Tan(x)), w = T.Let(1.0 + t * t);
                f0 = t; f1 = w; f2 = 2 * t * w; f3 = 2 * w * (1.0 + 3 * t * t);
                return;
            }
            case Op.Sinh:
            case Op.Cosh:
            {
                T sh = T.Let(T.Sinh(x)), ch = T.Let(T.Cosh(x));
                if (op == Op.Sinh) { f0 = sh; f1 = ch; f2 = sh; f3 = ch; }
                else { f0 = ch; f1 = sh; f2 = ch; f3 = sh; }
                return;
            }
            case Op.Tanh:
            {
                // sech^2 from cosh, accurate where tanh saturates.
                T t = T.Let(T.Tanh(x)), ch = T.Let(T.Cosh(x)), w = T.Let(1.0 / (ch * ch));
                f0 = t; f1 = w; f2 = -2 * t * w; f3 = 2 * w * (2 * t * t - w);
                return;
            }
            case Op.Asin:
            case Op.Acos:
            {
                double sg = op == Op.Acos ? -1 : 1;
                T v = T.Let(x), g = T.Let(1.0 / T.Sqrt((1.0 - v) * (1.0 + v))), g3 = T.Let(g * g * g);
                f0 = op == Op.Acos ? T.Acos(v) : T.Asin(v);
                f1 = sg * g; f2 = sg * v * g3; f3 = sg * (1.0 + 2 * v * v) * g3 * g * g;
                return;
            }
            case Op.Atan:
            {
                T v = T.Let(x), q = T.Let(1.0 / (1.0 + v * v));
                f0 = T.Atan(v); f1 = q; f2 = -2 * v * q * q; f3 = (6 * v * v - 2.0) * q * q * q;
                return;
            }
            case Op.Asinh:
            {
                T v = T.Let(x), g = T.Let(1.0 / T.Sqrt(1.0 + v * v)), g3 = T.Let(g * g * g);
                f0 = T.Asinh(v); f1 = g; f2 = -v * g3; f3 = (2 * v * v - 1.0) * g3 * g * g;
                return;
            }
            case Op.Acosh:
            {
                T v = T.Let(x), g = T.Let(1.0 / T.Sqrt((v - 1.0) * (v + 1.0))), g3 = T.Let(g * g * g);
                f0 = T.Acosh(v); f1 = g; f2 = -v * g3; f3 = (2 * v * v + 1.0) * g3 * g * g;
                return;
            }
            case Op.Atanh:
            {
                T v = T.Let(x), q = T.Let(1.0 / ((1.0 - v) * (1.0 + v)));
                f0 = T.Atanh(v); f1 = q; f2 = 2 * v * q * q; f3 = (2.0 + 6 * v * v) * q * q * q;
                return;
            }
            default:
                throw new ArgumentOutOfRangeException(nameof(op), op, "not a one-argument function");
        }
    }

    /// <summary>
    /// y = F(a) on normalised coefficients (third-order Faa di Bruno): y0 = F, y1 = F' a1, y2 = F' a2 + F'' a1^2/2,
    /// y3 = F' a3 + F'' a1 a2 + F''' a1^3/6.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Series3<T> Compose<T>(in Series3<T> a, T f0, T f1, T f2, T f3) where T : struct, IFormulaNumber<T>
    {
        f0 = T.Let(f0); f1 = T.Let(f1); f2 = T.Let(f2); f3 = T.Let(f3);
        T a1 = T.Let(a.C1), a2 = T.Let(a.C2), a3 = T.Let(a.C3);
        return new Series3<T>(f0, f1 * a1, f1 * a2 + 0.5 * f2 * a1 * a1, f1 * a3 + f2 * a1 * a2 + f3 * a1 * a1 * a1 / 6);
    }

    /// <summary>Cauchy product of two order-3 series.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Series3<T> Mul<T>(in Series3<T> a, in Series3<T> b) where T : struct, IFormulaNumber<T>
        => new(a.C0 * b.C0, a.C0 * b.C1 + a.C1 * b.C0, a.C0 * b.C2 + a.C1 * b.C1 + a.C2 * b.C0,
            a.C0 * b.C3 + a.C1 * b.C2 + a.C2 * b.C1 + a.C3 * b.C0);

    /// <summary>
    /// One instruction on order-3 series: <paramref name="a"/> and <paramref name="b"/> are the operands, <paramref name="c"/>
    /// the instruction constant, <paramref name="n"/> its integer exponent, <paramref name="d"/> the destination (every
    /// coefficient is computed before <paramref name="d"/> is written). Not for jumps.
    /// </summary>
    /// <remarks>
    /// The result is written in place rather than returned: a 32-byte struct comes back through a stack buffer that the
    /// caller then copies with 16-byte loads across the callee's 8-byte stores, and such a load cannot be forwarded from
    /// the store buffer; that stall cost the interpreter about 8 ns per instruction (measured with perf in the native build,
    /// docs/speed.md). A small dispatcher, inlined into the interpreter's loop; the longer rules are methods of their own,
    /// compiled optimised at their first call: a command-line run is over before tiered compilation would replace the
    /// unoptimised first version (whose un-inlined double-double operators made the extended path about ten times slower).
    /// </remarks>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Jet<T>(Op op, in Series3<T> a, in Series3<T> b, T c, int n, out Series3<T> d) where T : struct, IFormulaNumber<T>
    {
        switch (op)
        {
            case Op.LoadConst: d = new(c, 0.0, 0.0, 0.0); return;
            case Op.Copy: d = a; return;
            case Op.Neg: d = new(-a.C0, -a.C1, -a.C2, -a.C3); return;
            case Op.Add: d = new(a.C0 + b.C0, a.C1 + b.C1, a.C2 + b.C2, a.C3 + b.C3); return;
            case Op.Sub: d = new(a.C0 - b.C0, a.C1 - b.C1, a.C2 - b.C2, a.C3 - b.C3); return;
            case Op.Mul: d = Mul(a, b); return;
            case Op.Div: JetDiv(a, b, out d); return;
            case Op.AddC: d = new(a.C0 + c, a.C1, a.C2, a.C3); return;
            case Op.MulC: { T k = T.Let(c); d = new(a.C0 * k, a.C1 * k, a.C2 * k, a.C3 * k); return; }
            case Op.SubCR: d = new(c - a.C0, -a.C1, -a.C2, -a.C3); return;
            case Op.DivC: { T k = T.Let(c); d = new(a.C0 / k, a.C1 / k, a.C2 / k, a.C3 / k); return; }
            case Op.PowInt when n == 2:
                d = new(a.C0 * a.C0, 2 * a.C0 * a.C1, 2 * a.C0 * a.C2 + a.C1 * a.C1, 2 * (a.C0 * a.C3 + a.C1 * a.C2));
                return;
            case Op.PowInt when n == 0:
                d = new(1.0, 0.0, 0.0, 0.0);
                return;
            case Op.Pow: JetPow(a, b, c, out d); return;
            case Op.Abs: JetAbs(a, out d); return;
            case Op.Step: d = new(T.Step(a.C0), 0.0, 0.0, 0.0); return;
            case Op.Min: case Op.Max: JetSelect(a, b, op == Op.Min, out d); return;
            default: JetFunction(op, a, c, n, out d); return;
        }
    }

    /// <summary>The quotient a / b of order-3 series, coefficient by coefficient.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void JetDiv<T>(in Series3<T> a, in Series3<T> b, out Series3<T> d) where T : struct, IFormulaNumber<T>
    {
        T q0 = T.Let(a.C0 / b.C0);
        T q1 = T.Let((a.C1 - b.C1 * q0) / b.C0);
        T q2 = T.Let((a.C2 - b.C1 * q1 - b.C2 * q0) / b.C0);
        d = new(q0, q1, q2, (a.C3 - b.C1 * q2 - b.C2 * q1 - b.C3 * q0) / b.C0);
    }

    /// <summary>a^b = exp(b log a): the log series of a, times b, then exp composed on it with the value pow(a0, b0).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void JetPow<T>(in Series3<T> a, in Series3<T> b, T c, out Series3<T> d) where T : struct, IFormulaNumber<T>
    {
        T x = T.Let(a.C0);
        Chain(Op.Log, x, c, 0, out T l0, out T l1, out T l2, out T l3);
        var l = Compose(a, l0, l1, l2, l3);
        var y = new Series3<T>(T.Let(b.C0), T.Let(b.C1), T.Let(b.C2), T.Let(b.C3));
        var m = Mul(y, l);
        m = new Series3<T>(T.Let(m.C0), T.Let(m.C1), T.Let(m.C2), T.Let(m.C3));
        T p = T.Let(T.Pow(x, y.C0));
        d = Compose(m, p, p, p, p);
    }

    /// <summary>|a|, with the right-hand sign at a zero of the value.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void JetAbs<T>(in Series3<T> a, out Series3<T> d) where T : struct, IFormulaNumber<T>
    {
        T sign = T.Let(T.AbsSign(a.C0, a.C1, a.C2, a.C3));
        d = new(T.Abs(a.C0), sign * a.C1, sign * a.C2, sign * a.C3);
    }

    /// <summary>min or max of two series (the lexicographic choice of <see cref="Scalar.Choose"/>).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void JetSelect<T>(in Series3<T> a, in Series3<T> b, bool min, out Series3<T> d) where T : struct, IFormulaNumber<T>
    {
        T k = T.Let(T.Choose(a.C0, a.C1, a.C2, a.C3, b.C0, b.C1, b.C2, b.C3, min));
        d = new(T.Pick(k, a.C0, b.C0), T.Pick(k, a.C1, b.C1), T.Pick(k, a.C2, b.C2), T.Pick(k, a.C3, b.C3));
    }

    /// <summary>A one-argument function (<see cref="IsChained"/>): F, F', F'', F''' from <see cref="Chain"/>, composed on a.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void JetFunction<T>(Op op, in Series3<T> a, T c, int n, out Series3<T> d) where T : struct, IFormulaNumber<T>
    {
        Chain(op, a.C0, c, n, out T f0, out T f1, out T f2, out T f3);
        d = Compose(a, f0, f1, f2, f3);
    }
}
