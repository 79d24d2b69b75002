using System.Runtime.CompilerServices;

namespace ModeSolver.Formulas;

/// <summary>
/// An unevaluated sum Hi + Lo of two doubles with |Lo| &lt;= ulp(Hi)/2: about 106 bits (32 digits) of precision.
/// Error-free transformations after Dekker 1971 (Numer. Math. 18, 224) and Knuth (TAOCP vol. 2, 4.2.2); the add, multiply,
/// divide, square-root, exp and log algorithms follow Hida, Li &amp; Bailey 2001 ("Algorithms for quad-double precision
/// floating point arithmetic", ARITH-15), double-double section. Used where a formula's derivative is a difference of
/// nearly equal terms (a plateau flatter than double precision resolves).
/// </summary>
internal readonly struct DoubleDouble
{
    public readonly double Hi, Lo;

    // Inlined where the caller's inlining budget allows, else compiled optimised at first call: a large caller (the
    // evaluator's switch) leaves some operators as calls, and their unoptimised first versions would run for the whole
    // of a short command-line run before tiered compilation replaces them.
    private const MethodImplOptions Hot = MethodImplOptions.AggressiveInlining | MethodImplOptions.AggressiveOptimization;

    [MethodImpl(Hot)]
    public DoubleDouble(double hi, double lo = 0) { Hi = hi; Lo = lo; }

    /// <summary>ln 2 to double-double precision (0.69314718055994530941723212145817656807...).</summary>
    private static readonly DoubleDouble Ln2 = new(0.6931471805599453, 2.3190468138462996e-17);

    [MethodImpl(Hot)]
    public static implicit operator DoubleDouble(double x) => new(x);

    [MethodImpl(Hot)]
    private static DoubleDouble QuickTwoSum(double a, double b)
    {
        double s = a + b;
        return new DoubleDouble(s, b - (s - a));
    }

    [MethodImpl(Hot)]
    private static (double S, double E) TwoSum(double a, double b)
    {
        double s = a + b, bb = s - a;
        return (s, (a - (s - bb)) + (b - bb));
    }

    [MethodImpl(Hot)]
    public static DoubleDouble operator +(DoubleDouble x, DoubleDouble y)
    {
        var (s, e) = TwoSum(x.Hi, y.Hi);
        var (t, f) = TwoSum(x.Lo, y.Lo);
        e += t;
        var r = QuickTwoSum(s, e);
        return QuickTwoSum(r.Hi, r.Lo + f);
    }

    [MethodImpl(Hot)]
    public static DoubleDouble operator -(DoubleDouble x) => new(-x.Hi, -x.Lo);

    [MethodImpl(Hot)]
    public static DoubleDouble operator -(DoubleDouble x, DoubleDouble y) => x + -y;

    [MethodImpl(Hot)]
    public static DoubleDouble operator *(DoubleDouble x, DoubleDouble y)
    {
        double p = x.Hi * y.Hi;
        double e = Math.FusedMultiplyAdd(x.Hi, y.Hi, -p);
        e += x.Hi * y.Lo + x.Lo * y.Hi;
        return QuickTwoSum(p, e);
    }

    [MethodImpl(Hot)]
    public static DoubleDouble operator /(DoubleDouble x, DoubleDouble y)
    {
        double q1 = x.Hi / y.Hi;
        var r = x - q1 * y;
        double q2 = r.Hi / y.Hi;
        r -= q2 * y;
        double q3 = r.Hi / y.Hi;
        return QuickTwoSum(q1, q2) + q3;
    }

    /// <summary>x * 2^n, exact.</summary>
    public static DoubleDouble ScaleB(DoubleDouble x, int n) => new(Math.ScaleB(x.Hi, n), Math.ScaleB(x.Lo, n));

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static DoubleDouble Sqrt(DoubleDouble a)
    {
        if (!(a.Hi > 0)) return new DoubleDouble(Math.Sqrt(a.Hi));
        double y = Math.Sqrt(a.Hi);
        var yy = new DoubleDouble(y) * y;
        return y + (a - yy) / (2.0 * y); // one Newton step doubles the precision
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static DoubleDouble Exp(DoubleDouble a)
    {
        if (a.Hi > 709.7) return new DoubleDouble(double.PositiveInfinity);
        if (a.Hi < -745.2) return new DoubleDouble(0);
        if (!double.IsFinite(a.Hi)) return new DoubleDouble(Math.Exp(a.Hi));
        // a = k ln 2 + r, r / 512 summed by Taylor (|r/512| < 7e-4: 11 terms reach 1e-35), then squared nine times.
        double k = Math.Round(a.Hi / Ln2.Hi);
        var r = ScaleB(a - k * Ln2, -9);
        DoubleDouble sum = 0, term = 1;
        for (int n = 1; n <= 11; n++)
        {
            term = term * r / n;
            sum += term;
        }
        // exp(r) - 1 is carried through the squarings as s -> 2s + s^2 to keep its small size exact.
        for (int i = 0; i < 9; i++) sum = ScaleB(sum, 1) + sum * sum;
        return ScaleB(sum + 1.0, (int)k);
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static DoubleDouble Log(DoubleDouble a)
    {
        if (!(a.Hi > 0) || !double.IsFinite(a.Hi)) return new DoubleDouble(Math.Log(a.Hi));
        double y = Math.Log(a.Hi);
        return y + a * Exp(-y) - 1.0; // one Newton step on exp(y) = a
    }

    [MethodImpl(Hot)]
    public double ToDouble() => Hi + Lo;
}
