using System.Runtime.CompilerServices;
using ModeSolver.Formulas;

namespace ModeSolver.Models;

/// <summary>Five inline doubles: the storage of a <see cref="TaylorJet"/>.</summary>
[InlineArray(TaylorJet.Length)]
internal struct TaylorCoefficients
{
    private double _element0;
}

/// <summary>
/// Truncated Taylor polynomial of order 4 about a point: c[k] = f^(k)(phi) / k!. Arithmetic on jets is exact
/// (to rounding) for the derivatives up to the truncation order, so derivatives of composite expressions
/// (V_J / Omega^4, K_J / Omega^2 + ...) come out exactly. Allocation-free value type; the product, quotient and power
/// are Formulas' series recurrences (<see cref="Taylor"/>), not a second copy.
/// </summary>
internal struct TaylorJet
{
    /// <summary>Number of coefficients kept (orders 0..4).</summary>
    public const int Length = 5;

    private static ReadOnlySpan<double> Factorials => [1.0, 1.0, 2.0, 6.0, 24.0];

    private TaylorCoefficients _c;

    /// <summary>Coefficient of order k (f^(k)/k!).</summary>
    public double this[int k]
    {
        readonly get => _c[k];
        set => _c[k] = value;
    }

    /// <summary>The constant c.</summary>
    public static TaylorJet Constant(double c)
    {
        var j = default(TaylorJet);
        j[0] = c;
        return j;
    }

    /// <summary>The jet of the independent variable at phi: phi + h.</summary>
    public static TaylorJet Variable(double phi)
    {
        var j = default(TaylorJet);
        j[0] = phi;
        j[1] = 1.0;
        return j;
    }

    /// <summary>From derivatives d[0]=f, d[1]=f', ... ; orders beyond d.Length are zero.</summary>
    public static TaylorJet FromDerivatives(ReadOnlySpan<double> d)
    {
        var j = default(TaylorJet);
        int n = Math.Min(d.Length, Length);
        for (int k = 0; k < n; k++) j[k] = d[k] / Factorials[k];
        return j;
    }

    /// <summary>The jet of f' from the derivatives of f (shifts by one order; the top order is lost).</summary>
    public static TaylorJet DerivativeFromDerivatives(ReadOnlySpan<double> d)
    {
        var j = default(TaylorJet);
        int n = Math.Min(d.Length - 1, Length);
        for (int k = 0; k < n; k++) j[k] = d[k + 1] / Factorials[k];
        return j;
    }

    /// <summary>The derivative of order k, f^(k) = k! c[k].</summary>
    public readonly double Derivative(int k) => _c[k] * Factorials[k];

    /// <summary>Value and first three derivatives.</summary>
    public readonly Jet3 ToJet3() => new(_c[0], _c[1], 2.0 * _c[2], 6.0 * _c[3]);

    public static TaylorJet operator +(TaylorJet a, TaylorJet b)
    {
        for (int k = 0; k < Length; k++) a[k] += b[k];
        return a;
    }

    public static TaylorJet operator -(TaylorJet a, TaylorJet b)
    {
        for (int k = 0; k < Length; k++) a[k] -= b[k];
        return a;
    }

    public static TaylorJet operator +(TaylorJet a, double b)
    {
        a[0] += b;
        return a;
    }

    public static TaylorJet operator *(double s, TaylorJet a)
    {
        for (int k = 0; k < Length; k++) a[k] *= s;
        return a;
    }

    /// <summary>Cauchy product, truncated (<see cref="Taylor.Mul"/>).</summary>
    public static unsafe TaylorJet operator *(TaylorJet a, TaylorJet b)
    {
        var r = default(TaylorJet);
        Taylor.Mul((double*)&a._c, (double*)&b._c, (double*)&r._c, Length - 1);
        return r;
    }

    /// <summary>a / b by the division recurrence (<see cref="Taylor.Div"/>); b[0] must be non-zero.</summary>
    public static unsafe TaylorJet operator /(TaylorJet a, TaylorJet b)
    {
        var r = default(TaylorJet);
        Taylor.Div((double*)&a._c, (double*)&b._c, (double*)&r._c, Length - 1);
        return r;
    }

    /// <summary>1 / a.</summary>
    public static TaylorJet Reciprocal(TaylorJet a) => Constant(1.0) / a;

    /// <summary>a * a.</summary>
    public static TaylorJet Square(TaylorJet a) => a * a;

    /// <summary>a^p for real p (<see cref="Taylor.PowTail"/>); a[0] must be positive unless p is a non-negative integer handled by products.</summary>
    public static unsafe TaylorJet Pow(TaylorJet a, double p)
    {
        var r = default(TaylorJet);
        r[0] = Math.Pow(a[0], p);
        Taylor.PowTail((double*)&a._c, p, (double*)&r._c, Length - 1);
        return r;
    }

    /// <summary>sqrt(a), a[0] &gt; 0.</summary>
    public static TaylorJet Sqrt(TaylorJet a) => Pow(a, 0.5);
}
