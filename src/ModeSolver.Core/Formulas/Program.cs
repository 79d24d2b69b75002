using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>Instructions of the flat register program.</summary>
internal enum Op : byte
{
    LoadConst, Copy, Neg, Add, Sub, Mul, Div,
    AddC, MulC, SubCR, DivC, DivCR,
    PowInt, PowC, CPow, Pow,
    Exp, Log, Log10, Sqrt, Sin, Cos, Tan, Sinh, Cosh, Tanh,
    Asin, Acos, Atan, Asinh, Acosh, Atanh,
    Abs, Step, Min, Max,
    JumpIfNot, Jump,
}

/// <summary>
/// One instruction: Dst = Op(A, B, C). N is the integer exponent (PowInt) or the jump target;
/// Aux is the first scratch register (series only) or, for JumpIfNot, the relation.
/// </summary>
internal struct Instr
{
    public Op Op;
    public int Dst, A, B, Aux, N;
    public double C;
}

/// <summary>
/// A compiled formula: a flat array of register instructions (constants folded, parameters baked in).
/// Register 0 holds the variable. Immutable, so any number of threads may run it at once; each run
/// uses scratch memory supplied by the caller.
/// </summary>
internal sealed unsafe class CompiledProgram
{
    public CompiledProgram(Instr[] code, int registerCount, int result)
    {
        Code = code;
        RegisterCount = registerCount;
        Result = result;
    }

    public Instr[] Code { get; }
    public int RegisterCount { get; }
    public int Result { get; }

    /// <summary>True when the relation holds for the values a and b.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static bool Holds(int relation, double a, double b) => (Relation)relation switch
    {
        Relation.Less => a < b,
        Relation.LessEqual => a <= b,
        Relation.Greater => a > b,
        _ => a >= b,
    };

    /// <summary>Scalar value of an operation (the compiler folds constants with it): the kernel of <see cref="Kernels.Value"/>.</summary>
    public static double Apply(Op op, double a, double b, double c, int n) => Kernels.Value<Real>(op, a, b, c, n).V;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double StepScalar(double a) => Scalar.Step(a);

    /// <summary>Value only. <paramref name="r"/> has room for <see cref="RegisterCount"/> doubles.</summary>
    public double RunValue(double phi, double* r)
    {
        r[0] = phi;
        return Execute(r);
    }

    /// <summary>
    /// Value only, with the variables' registers (0 .. point.Length-1) loaded from <paramref name="point"/>.
    /// <paramref name="r"/> has room for <see cref="RegisterCount"/> doubles.
    /// </summary>
    public double RunValue(ReadOnlySpan<double> point, double* r)
    {
        for (int i = 0; i < point.Length; i++) r[i] = point[i];
        return Execute(r);
    }

    [SkipLocalsInit]
    private double Execute(double* r)
    {
        var code = Code;
        var v = (Real*)r;
        for (int pc = 0; pc < code.Length; pc++)
        {
            ref readonly Instr I = ref code[pc];
            switch (I.Op)
            {
                case Op.JumpIfNot:
                    if (!Holds(I.Aux, r[I.A], r[I.B])) pc = I.N - 1;
                    break;
                case Op.Jump: pc = I.N - 1; break;
                default: v[I.Dst] = Kernels.Value(I.Op, v[I.A], v[I.B], I.C, I.N); break;
            }
        }
        return r[Result];
    }

    /// <summary>
    /// Taylor coefficients to order <paramref name="n"/> of the result; register k occupies
    /// s[k*(n+1) .. k*(n+1)+n]. Returns a pointer to the result's coefficients inside <paramref name="s"/>.
    /// </summary>
    [SkipLocalsInit]
    public double* RunSeries(double phi, int n, double* s)
    {
        int st = n + 1;
        s[0] = phi;
        if (n >= 1) s[1] = 1;
        for (int k = 2; k <= n; k++) s[k] = 0;
        var code = Code;
        for (int pc = 0; pc < code.Length; pc++)
        {
            ref readonly Instr I = ref code[pc];
            double* d = s + I.Dst * st;
            double* a = s + I.A * st;
            double* b = s + I.B * st;
            switch (I.Op)
            {
                case Op.LoadConst: Taylor.Constant(d, I.C, n); break;
                case Op.Copy: Taylor.Copy(a, d, n); break;
                case Op.Neg: for (int k = 0; k <= n; k++) d[k] = -a[k]; break;
                case Op.Add: for (int k = 0; k <= n; k++) d[k] = a[k] + b[k]; break;
                case Op.Sub: for (int k = 0; k <= n; k++) d[k] = a[k] - b[k]; break;
                case Op.Mul: Taylor.Mul(a, b, d, n); break;
                case Op.Div: Taylor.Div(a, b, d, n); break;
                case Op.AddC:
                    d[0] = a[0] + I.C;
                    for (int k = 1; k <= n; k++) d[k] = a[k];
                    break;
                case Op.MulC: { double c = I.C; for (int k = 0; k <= n; k++) d[k] = a[k] * c; break; }
                case Op.SubCR:
                    d[0] = I.C - a[0];
                    for (int k = 1; k <= n; k++) d[k] = -a[k];
                    break;
                case Op.DivC: { double c = I.C; for (int k = 0; k <= n; k++) d[k] = a[k] / c; break; }
                case Op.DivCR: Taylor.ConstDiv(I.C, a, d, n); break;
                case Op.PowInt:
                    Taylor.PowInt(a, I.N, d, s + I.Aux * st, s + (I.Aux + 1) * st, n);
                    break;
                case Op.PowC:
                    d[0] = Math.Pow(a[0], I.C);
                    Taylor.PowTail(a, I.C, d, n);
                    break;
                case Op.CPow:
                {
                    d[0] = Math.Pow(I.C, a[0]);
                    double lc = Math.Log(I.C);
                    for (int k = 1; k <= n; k++)
                    {
                        double sum = 0;
                        for (int j = 1; j <= k; j++) sum += j * a[j] * d[k - j];
                        d[k] = lc * sum / k;
                    }
                    break;
                }
                case Op.Pow:
                {
                    // a^b = exp(b log a): l = log a, m = b l, then the exp recurrence driven by m.
                    double* l = s + I.Aux * st;
                    double* m = s + (I.Aux + 1) * st;
                    l[0] = Math.Log(a[0]);
                    Taylor.LogTail(a, l, n);
                    Taylor.Mul(b, l, m, n);
                    d[0] = Math.Pow(a[0], b[0]);
                    Taylor.ExpTail(m, d, n);
                    break;
                }
                case Op.Exp:
                    d[0] = Math.Exp(a[0]);
                    Taylor.ExpTail(a, d, n);
                    break;
                case Op.Log:
                    d[0] = Math.Log(a[0]);
                    Taylor.LogTail(a, d, n);
                    break;
                case Op.Log10:
                {
                    d[0] = Math.Log10(a[0]);
                    Taylor.LogTail(a, d, n);
                    for (int k = 1; k <= n; k++) d[k] /= Math.Log(10);
                    break;
                }
                case Op.Sqrt:
                    d[0] = Math.Sqrt(a[0]);
                    Taylor.SqrtTail(a, d, n);
                    break;
                case Op.Sin:
                {
                    double* c = s + I.Aux * st;
                    d[0] = Math.Sin(a[0]);
                    c[0] = Math.Cos(a[0]);
                    Taylor.SinCosTail(a, d, c, n, hyperbolic: false);
                    break;
                }
                case Op.Cos:
                {
                    double* sn = s + I.Aux * st;
                    sn[0] = Math.Sin(a[0]);
                    d[0] = Math.Cos(a[0]);
                    Taylor.SinCosTail(a, sn, d, n, hyperbolic: false);
                    break;
                }
                case Op.Sinh:
                {
                    double* c = s + I.Aux * st;
                    d[0] = Math.Sinh(a[0]);
                    c[0] = Math.Cosh(a[0]);
                    Taylor.SinCosTail(a, d, c, n, hyperbolic: true);
                    break;
                }
                case Op.Cosh:
                {
                    double* sn = s + I.Aux * st;
                    sn[0] = Math.Sinh(a[0]);
                    d[0] = Math.Cosh(a[0]);
                    Taylor.SinCosTail(a, sn, d, n, hyperbolic: true);
                    break;
                }
                case Op.Tan:
                {
                    double* w = s + I.Aux * st;
                    double t0 = Math.Tan(a[0]);
                    d[0] = t0;
                    w[0] = 1 + t0 * t0;
                    Taylor.TanTail(a, d, w, n, 1);
                    break;
                }
                case Op.Tanh:
                {
                    double* w = s + I.Aux * st;
                    d[0] = Math.Tanh(a[0]);
                    double ch = Math.Cosh(a[0]);
                    w[0] = 1 / (ch * ch); // sech^2, accurate where tanh saturates
                    Taylor.TanTail(a, d, w, n, -1);
                    break;
                }
                case Op.Asin:
                case Op.Acos:
                case Op.Asinh:
                case Op.Acosh:
                {
                    // y' = a' g with g = u^(-1/2), u = 1 - a^2 (asin, acos), 1 + a^2 (asinh), a^2 - 1 (acosh).
                    double* u = s + I.Aux * st;
                    double* g = s + (I.Aux + 1) * st;
                    double a0 = a[0];
                    double u0, s2;
                    switch (I.Op)
                    {
                        case Op.Asin: case Op.Acos: u0 = (1 - a0) * (1 + a0); s2 = -1; break;
                        case Op.Asinh: u0 = 1 + a0 * a0; s2 = 1; break;
                        default: u0 = (a0 - 1) * (a0 + 1); s2 = 1; break;
                    }
                    u[0] = u0;
                    Taylor.QuadraticTail(a, u, s2, n);
                    g[0] = 1 / Math.Sqrt(u0);
                    Taylor.PowTail(u, -0.5, g, n - 1);
                    d[0] = I.Op switch
                    {
                        Op.Asin => Math.Asin(a0),
                        Op.Acos => Math.Acos(a0),
                        Op.Asinh => Math.Asinh(a0),
                        _ => Math.Acosh(a0),
                    };
                    Taylor.IntegrateTail(a, g, d, n, I.Op == Op.Acos ? -1 : 1);
                    break;
                }
                case Op.Atan:
                case Op.Atanh:
                {
                    // y' = a' / u with u = 1 + a^2 (atan) or 1 - a^2 (atanh).
                    double* u = s + I.Aux * st;
                    double* g = s + (I.Aux + 1) * st;
                    double a0 = a[0];
                    bool hyp = I.Op == Op.Atanh;
                    u[0] = hyp ? (1 - a0) * (1 + a0) : 1 + a0 * a0;
                    Taylor.QuadraticTail(a, u, hyp ? -1 : 1, n);
                    Taylor.ConstDiv(1, u, g, n - 1);
                    d[0] = hyp ? Math.Atanh(a0) : Math.Atan(a0);
                    Taylor.IntegrateTail(a, g, d, n, 1);
                    break;
                }
                case Op.Abs:
                {
                    // Right-hand derivatives at a zero of the argument: the sign of its first non-zero coefficient.
                    double sign = 1;
                    for (int k = 0; k <= n; k++)
                        if (a[k] != 0) { sign = a[k] < 0 ? -1 : 1; break; }
                    d[0] = Math.Abs(a[0]);
                    for (int k = 1; k <= n; k++) d[k] = sign * a[k];
                    break;
                }
                case Op.Step:
                    Taylor.Constant(d, StepScalar(a[0]), n);
                    break;
                case Op.Min:
                case Op.Max:
                {
                    if (double.IsNaN(a[0]) || double.IsNaN(b[0]))
                    {
                        for (int k = 0; k <= n; k++) d[k] = double.NaN;
                        break;
                    }
                    // Choose by value; on a tie, by the first differing coefficient (right-hand branch).
                    int cmp = 0;
                    for (int k = 0; k <= n && cmp == 0; k++) cmp = a[k].CompareTo(b[k]);
                    bool takeA = I.Op == Op.Min ? cmp <= 0 : cmp >= 0;
                    double* src = takeA ? a : b;
                    for (int k = 0; k <= n; k++) d[k] = src[k];
                    break;
                }
                case Op.JumpIfNot:
                    if (!Holds(I.Aux, a[0], b[0])) pc = I.N - 1;
                    break;
                case Op.Jump: pc = I.N - 1; break;
            }
        }
        return s + Result * st;
    }
}
