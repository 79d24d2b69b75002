using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>
/// One register of a program in several variables as a kernel of <see cref="MultiKernels"/> sees it: its slots
/// (<see cref="MultiLayout"/>) read and written one at a time. The interpreter's registers are memory
/// (<see cref="MemoryRegister"/>), the code generator's are locals (<see cref="MultiProgramJit"/>).
/// </summary>
internal interface IMultiRegister<T> where T : struct, IFormulaNumber<T>
{
    /// <summary>Slot <paramref name="slot"/> as it is when read.</summary>
    T this[int slot] { get; }

    /// <summary>Writes slot <paramref name="slot"/>.</summary>
    void Set(int slot, T value);

    /// <summary>The first <paramref name="width"/> slots (for the switching functions, which look at every partial).</summary>
    ReadOnlySpan<T> Slots(int width);
}

/// <summary>A register of the interpreter: <see cref="MultiLayout.Width"/> doubles in caller-provided scratch memory.</summary>
internal readonly unsafe struct MemoryRegister(double* p) : IMultiRegister<Real>
{
    public Real this[int slot]
    {
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        get => new(p[slot]);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public void Set(int slot, Real value) => p[slot] = value.V;

    public ReadOnlySpan<Real> Slots(int width) => new(p, width);
}

/// <summary>
/// Every instruction of a program in several variables on truncated multivariate Taylor series (value, gradient,
/// second and third partials, <see cref="MultiLayout"/>), written once in a generic arithmetic T and a generic register
/// R: the interpreter (<see cref="MultiJetEvaluator"/>) runs it on <see cref="Real"/> and memory, the code generator
/// (<see cref="MultiProgramJit"/>) on <see cref="Expr"/> and locals, so their results agree bit for bit by construction.
/// Elementary functions take F', F'', F''' from <see cref="Kernels.Chain"/> (the declarations the one-variable paths use)
/// and combine them by the multivariate chain rule: y_i = F' a_i, y_ij = F' a_ij + F'' a_i a_j,
/// y_ijk = F' a_ijk + F'' (a_ij a_k + a_ik a_j + a_jk a_i) + F''' a_i a_j a_k.
/// </summary>
/// <remarks>
/// Slots are read when the statement that uses them runs (memory or a local alike); a value used after a write is first
/// named with <c>T.Let</c>. The destination never aliases an operand (the compiler gives each instruction a fresh register).
/// </remarks>
internal static class MultiKernels
{
    /// <summary>
    /// One instruction (not a jump): d = op(a, b) with constant <paramref name="c"/> and integer <paramref name="n"/>;
    /// <paramref name="l"/> and <paramref name="m"/> are the instruction's two scratch registers (used by Pow).
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static void Run<T, R>(MultiLayout L, Op op, R d, R a, R b, R l, R m, T c, int n)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        // Small enough to inline into the interpreter's loop; the longer rules are methods of their own.
        int w = L.Width;
        switch (op)
        {
            case Op.LoadConst: d.Set(0, c); for (int k = 1; k < w; k++) d.Set(k, 0.0); return;
            case Op.Copy: for (int k = 0; k < w; k++) d.Set(k, a[k]); return;
            case Op.Neg: for (int k = 0; k < w; k++) d.Set(k, -a[k]); return;
            case Op.Add: for (int k = 0; k < w; k++) d.Set(k, a[k] + b[k]); return;
            case Op.Sub: for (int k = 0; k < w; k++) d.Set(k, a[k] - b[k]); return;
            case Op.AddC: d.Set(0, a[0] + c); for (int k = 1; k < w; k++) d.Set(k, a[k]); return;
            case Op.SubCR: d.Set(0, c - a[0]); for (int k = 1; k < w; k++) d.Set(k, -a[k]); return;
            case Op.MulC: { T q = T.Let(c); for (int k = 0; k < w; k++) d.Set(k, a[k] * q); return; }
            case Op.DivC: { T q = T.Let(c); for (int k = 0; k < w; k++) d.Set(k, a[k] / q); return; }
            case Op.Mul: Mul<T, R>(L, a, b, d); return;
            case Op.Div: Div<T, R>(L, a, b, d); return;
            case Op.Pow: Pow<T, R>(L, a, b, l, m, d); return;
            case Op.Abs: Abs<T, R>(L, a, d); return;
            case Op.Step: d.Set(0, T.Step(a[0])); for (int k = 1; k < w; k++) d.Set(k, 0.0); return;
            case Op.Min: case Op.Max: Select<T, R>(L, a, b, d, op == Op.Min); return;
            default: Function<T, R>(L, op, a, d, c, n); return;
        }
    }

    /// <summary>d = a^b = exp(b log a), with the value pow(a0, b0); <paramref name="l"/> and <paramref name="m"/> are scratch.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Pow<T, R>(MultiLayout L, R a, R b, R l, R m, R d)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        T a0 = T.Let(a[0]);
        Kernels.Chain(Op.Log, a0, 0.0, 0, out T l0, out T l1, out T l2, out T l3);
        Compose(L, a, l, l0, l1, l2, l3);
        Mul<T, R>(L, b, l, m);
        T p = T.Let(T.Pow(a0, b[0]));
        Compose(L, m, d, p, p, p, p);
    }

    /// <summary>d = |a|; at a zero, the branch of the sign of the first non-zero coefficient (value, then derivatives in slot order).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Abs<T, R>(MultiLayout L, R a, R d)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        int w = L.Width;
        T sign = T.Let(T.FirstSign(a.Slots(w)));
        d.Set(0, T.Abs(a[0]));
        for (int k = 1; k < w; k++) d.Set(k, sign * a[k]);
    }

    /// <summary>min or max: NaN in either value gives NaN everywhere, else the lexicographically smaller (larger) series.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Select<T, R>(MultiLayout L, R a, R b, R d, bool min)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        int w = L.Width;
        T choice = T.Let(T.ChooseSeries(a.Slots(w), b.Slots(w), min));
        for (int k = 0; k < w; k++) d.Set(k, T.Pick(choice, a[k], b[k]));
    }

    /// <summary>d = F(a) for a one-argument function (Kernels.IsChained): F, F', F'', F''' from Kernels.Chain.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Function<T, R>(MultiLayout L, Op op, R a, R d, T c, int n)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        Kernels.Chain(op, a[0], c, n, out T f0, out T f1, out T f2, out T f3);
        Compose(L, a, d, f0, f1, f2, f3);
    }

    /// <summary>d = F(a) by the multivariate chain rule, given F and its first three derivatives at a0.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Compose<T, R>(MultiLayout L, R a, R d, T f0, T f1, T f2, T f3)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        int n = L.N;
        f0 = T.Let(f0); f1 = T.Let(f1); f2 = T.Let(f2); f3 = T.Let(f3);
        // Third partials first: they read a's first and second partials.
        foreach (var t in L.Triples)
            d.Set(t.At, f1 * a[t.At] + f2 * (a[t.IJ] * a[t.K] + a[t.IK] * a[t.J] + a[t.JK] * a[t.I]) + f3 * a[t.I] * a[t.J] * a[t.K]);
        var pairs = L.Pairs;
        for (int p = 0; p < pairs.Length; p++)
        {
            int at = 1 + n + p;
            d.Set(at, f1 * a[at] + f2 * a[1 + pairs[p].I] * a[1 + pairs[p].J]);
        }
        for (int i = 1; i <= n; i++) d.Set(i, f1 * a[i]);
        d.Set(0, f0);
    }

    /// <summary>d = a b (the Leibniz rule for each partial).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Mul<T, R>(MultiLayout L, R a, R b, R d)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        int n = L.N;
        T a0 = T.Let(a[0]), b0 = T.Let(b[0]);
        foreach (var t in L.Triples)
            d.Set(t.At, a0 * b[t.At] + a[t.At] * b0
                + a[t.I] * b[t.JK] + a[t.J] * b[t.IK] + a[t.K] * b[t.IJ]
                + a[t.IJ] * b[t.K] + a[t.IK] * b[t.J] + a[t.JK] * b[t.I]);
        var pairs = L.Pairs;
        for (int p = 0; p < pairs.Length; p++)
        {
            int at = 1 + n + p, i = 1 + pairs[p].I, j = 1 + pairs[p].J;
            d.Set(at, a0 * b[at] + a[i] * b[j] + a[j] * b[i] + a[at] * b0);
        }
        for (int i = 1; i <= n; i++) d.Set(i, a0 * b[i] + a[i] * b0);
        d.Set(0, a0 * b0);
    }

    /// <summary>d = a / b, from a = d b order by order (b0 non-zero).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void Div<T, R>(MultiLayout L, R a, R b, R d)
        where T : struct, IFormulaNumber<T> where R : struct, IMultiRegister<T>
    {
        int n = L.N;
        T b0 = T.Let(b[0]);
        T q0 = T.Let(a[0] / b0);
        d.Set(0, q0);
        for (int i = 1; i <= n; i++) d.Set(i, (a[i] - q0 * b[i]) / b0);
        var pairs = L.Pairs;
        for (int p = 0; p < pairs.Length; p++)
        {
            int at = 1 + n + p, i = 1 + pairs[p].I, j = 1 + pairs[p].J;
            d.Set(at, (a[at] - q0 * b[at] - d[i] * b[j] - d[j] * b[i]) / b0);
        }
        foreach (var t in L.Triples)
            d.Set(t.At, (a[t.At] - q0 * b[t.At]
                - d[t.I] * b[t.JK] - d[t.J] * b[t.IK] - d[t.K] * b[t.IJ]
                - d[t.IJ] * b[t.K] - d[t.IK] * b[t.J] - d[t.JK] * b[t.I]) / b0);
    }
}
