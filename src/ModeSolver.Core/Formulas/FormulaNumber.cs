using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace ModeSolver.Formulas;

/// <summary>
/// The arithmetic a formula kernel is written in (<see cref="Kernels"/>): the four operations, the elementary functions
/// and the few helpers the switching functions need. Implemented by <see cref="Real"/> (plain double: the interpreter),
/// <see cref="Extended"/> (double-double: the extended-precision interpreter) and the code generator's expression type
/// (<see cref="ProgramJit"/>), so every kernel is written once and the interpreter and the generated code perform the
/// same floating-point operations in the same order (bit-identical by construction).
/// </summary>
/// <typeparam name="T">The number type itself.</typeparam>
internal interface IFormulaNumber<T> where T : struct, IFormulaNumber<T>
{
    /// <summary>A constant.</summary>
    static abstract implicit operator T(double c);

    static abstract T operator +(T a, T b);
    static abstract T operator -(T a, T b);
    static abstract T operator *(T a, T b);
    static abstract T operator /(T a, T b);
    static abstract T operator -(T a);

    /// <summary>
    /// Names an intermediate used more than once (the code generator stores it in a local; numbers return it unchanged).
    /// Never changes a value.
    /// </summary>
    static abstract T Let(T x);

    static abstract T Pow(T a, T b);
    static abstract T Exp(T x);
    static abstract T Log(T x);
    static abstract T Log10(T x);
    static abstract T Sqrt(T x);
    static abstract T Sin(T x);
    static abstract T Cos(T x);
    static abstract T Tan(T x);
    static abstract T Sinh(T x);
    static abstract T Cosh(T x);
    static abstract T Tanh(T x);
    static abstract T Asin(T x);
    static abstract T Acos(T x);
    static abstract T Atan(T x);
    static abstract T Asinh(T x);
    static abstract T Acosh(T x);
    static abstract T Atanh(T x);
    static abstract T Abs(T x);

    /// <summary>step(x): 0 for x &lt; 0, 1 for x &gt;= 0, NaN for NaN (<see cref="Scalar.Step"/>).</summary>
    static abstract T Step(T x);

    /// <summary>min(a, b) with NaN propagation (<see cref="Scalar.Min"/>).</summary>
    static abstract T Min(T a, T b);

    /// <summary>max(a, b) with NaN propagation (<see cref="Scalar.Max"/>).</summary>
    static abstract T Max(T a, T b);

    /// <summary>The right-hand sign of a series at a zero of its value (<see cref="Scalar.AbsSign"/>).</summary>
    static abstract T AbsSign(T a0, T a1, T a2, T a3);

    /// <summary>0 to take the first series, 1 the second, 2 for NaN (<see cref="Scalar.Choose"/>).</summary>
    static abstract T Choose(T a0, T a1, T a2, T a3, T b0, T b1, T b2, T b3, bool min);

    /// <summary><paramref name="x"/> where <paramref name="choice"/> is 0, <paramref name="y"/> where 1, NaN otherwise.</summary>
    static abstract T Pick(T choice, T x, T y);

    /// <summary>
    /// The sign of the first coefficient that is not zero (NaN counts as not zero and gives 1), 1 if all are zero:
    /// abs's branch at a zero of its argument in several variables (<see cref="Scalar.FirstSign"/>).
    /// </summary>
    static abstract T FirstSign(ReadOnlySpan<T> a);

    /// <summary>
    /// Lexicographic choice between two series of any length (<see cref="Scalar.ChooseSeries"/>): 0 first, 1 second, 2 NaN.
    /// </summary>
    static abstract T ChooseSeries(ReadOnlySpan<T> a, ReadOnlySpan<T> b, bool min);
}

/// <summary>The double-valued helpers of the switching functions, shared by every number type.</summary>
internal static class Scalar
{
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double Step(double a) => double.IsNaN(a) ? double.NaN : a >= 0 ? 1 : 0;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double Min(double a, double b) => double.IsNaN(a) || double.IsNaN(b) ? double.NaN : b < a ? b : a;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double Max(double a, double b) => double.IsNaN(a) || double.IsNaN(b) ? double.NaN : b > a ? b : a;

    /// <summary>The sign of the first non-zero coefficient (1 if all are zero): abs's right-hand branch at a zero.</summary>
    public static double AbsSign(double a0, double a1, double a2, double a3)
        => a0 > 0 ? 1 : a0 < 0 ? -1 : a1 < 0 ? -1 : a1 > 0 ? 1 : a2 < 0 ? -1 : a2 > 0 ? 1 : a3 < 0 ? -1 : 1;

    /// <summary>Lexicographic choice between two series (by value, a tie by the first differing coefficient): 0 first, 1 second, 2 NaN.</summary>
    public static double Choose(double a0, double a1, double a2, double a3, double b0, double b1, double b2, double b3, bool min)
    {
        if (double.IsNaN(a0) || double.IsNaN(b0)) return 2;
        int cmp = a0.CompareTo(b0);
        if (cmp == 0) cmp = a1.CompareTo(b1);
        if (cmp == 0) cmp = a2.CompareTo(b2);
        if (cmp == 0) cmp = a3.CompareTo(b3);
        return (min ? cmp <= 0 : cmp >= 0) ? 0 : 1;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double Pick(double choice, double x, double y) => choice == 0 ? x : choice == 1 ? y : double.NaN;

    /// <summary>The sign of the first coefficient that is not zero (NaN counts as not zero and gives 1), 1 if all are zero.</summary>
    public static double FirstSign(ReadOnlySpan<double> a)
    {
        for (int k = 0; k < a.Length; k++)
            if (a[k] != 0) return a[k] < 0 ? -1 : 1;
        return 1;
    }

    /// <summary>
    /// Lexicographic choice between two series of the same length (by value, a tie by the first differing coefficient
    /// in <see cref="double.CompareTo(double)"/>'s order): 0 first, 1 second, 2 when either value is NaN.
    /// </summary>
    public static double ChooseSeries(ReadOnlySpan<double> a, ReadOnlySpan<double> b, bool min)
    {
        if (double.IsNaN(a[0]) || double.IsNaN(b[0])) return 2;
        int cmp = 0;
        for (int k = 0; k < a.Length && cmp == 0; k++) cmp = a[k].CompareTo(b[k]);
        return (min ? cmp <= 0 : cmp >= 0) ? 0 : 1;
    }
}

/// <summary>A double as an <see cref="IFormulaNumber{T}"/>: the interpreter's arithmetic (every member is the plain double operation).</summary>
internal readonly struct Real : IFormulaNumber<Real>
{
    /// <summary>The value.</summary>
    public readonly double V;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public Real(double v) => V = v;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static implicit operator Real(double c) => new(c);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real operator +(Real a, Real b) => new(a.V + b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real operator -(Real a, Real b) => new(a.V - b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real operator *(Real a, Real b) => new(a.V * b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real operator /(Real a, Real b) => new(a.V / b.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real operator -(Real a) => new(-a.V);
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Let(Real x) => x;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Pow(Real a, Real b) => new(Math.Pow(a.V, b.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Exp(Real x) => new(Math.Exp(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Log(Real x) => new(Math.Log(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Log10(Real x) => new(Math.Log10(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Sqrt(Real x) => new(Math.Sqrt(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Sin(Real x) => new(Math.Sin(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Cos(Real x) => new(Math.Cos(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Tan(Real x) => new(Math.Tan(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Sinh(Real x) => new(Math.Sinh(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Cosh(Real x) => new(Math.Cosh(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Tanh(Real x) => new(Math.Tanh(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Asin(Real x) => new(Math.Asin(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Acos(Real x) => new(Math.Acos(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Atan(Real x) => new(Math.Atan(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Asinh(Real x) => new(Math.Asinh(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Acosh(Real x) => new(Math.Acosh(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Atanh(Real x) => new(Math.Atanh(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Abs(Real x) => new(Math.Abs(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Step(Real x) => new(Scalar.Step(x.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Min(Real a, Real b) => new(Scalar.Min(a.V, b.V));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Max(Real a, Real b) => new(Scalar.Max(a.V, b.V));
    public static Real AbsSign(Real a0, Real a1, Real a2, Real a3) => new(Scalar.AbsSign(a0.V, a1.V, a2.V, a3.V));
    public static Real Choose(Real a0, Real a1, Real a2, Real a3, Real b0, Real b1, Real b2, Real b3, bool min)
        => new(Scalar.Choose(a0.V, a1.V, a2.V, a3.V, b0.V, b1.V, b2.V, b3.V, min));
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Real Pick(Real choice, Real x, Real y) => new(Scalar.Pick(choice.V, x.V, y.V));
    public static Real FirstSign(ReadOnlySpan<Real> a) => new(Scalar.FirstSign(MemoryMarshal.Cast<Real, double>(a)));
    public static Real ChooseSeries(ReadOnlySpan<Real> a, ReadOnlySpan<Real> b, bool min)
        => new(Scalar.ChooseSeries(MemoryMarshal.Cast<Real, double>(a), MemoryMarshal.Cast<Real, double>(b), min));
}
