namespace ModeSolver.Numerics;

/// <summary>A scalar function whose root is sought; a struct implementing it lets the JIT inline the call (no delegate, no allocation).</summary>
public interface IRootFunction
{
    /// <summary>f(x).</summary>
    double Evaluate(double x);
}

/// <summary>A scalar function with its first derivative, for safeguarded Newton steps.</summary>
public interface IRootFunctionWithDerivative
{
    /// <summary>f(x) and f'(x).</summary>
    (double Value, double Derivative) Evaluate(double x);
}

/// <summary>A yes/no test on x whose answer changes once across a bracket (the side of a boundary x lies on).</summary>
public interface IBoundaryTest
{
    /// <summary>True when x lies on the side of the boundary where the bracket's "inside" end is.</summary>
    bool IsInside(double x);
}

/// <summary>
/// The bracketing root finders of the code, in one place: Brent's method for a sign change, bisection (arithmetic
/// or geometric) for the boundary of a yes/no test, and Newton steps safeguarded by the bracket when the exact
/// derivative is at hand. All are allocation-free with a struct argument; each takes its tolerance from the caller.
/// </summary>
/// <remarks>
/// Brent's method: R. P. Brent, Algorithms for Minimization without Derivatives (Prentice-Hall 1973), ch. 4,
/// procedure zero; the same algorithm as Press et al., Numerical Recipes (3rd ed. 2007), section 9.3, "zbrent".
/// Safeguarded Newton ("rtsafe"): Numerical Recipes (3rd ed.), section 9.4. Bisection: Numerical Recipes section 9.1.
/// </remarks>
public static class Roots
{
    /// <summary>Iterations of Brent's method before it returns its best estimate (it converges in far fewer).</summary>
    public const int BrentIterations = 200;

    /// <summary>
    /// Brent's method for f(x) = 0 on the bracket [a, b] with f(a) = <paramref name="fa"/> and f(b) = <paramref name="fb"/>
    /// of opposite signs (or one of them zero). Stops when the bracket is below tol = <paramref name="relTol"/> |x| +
    /// <paramref name="absTol"/> (x the current best estimate) or f(x) = 0, and returns x.
    /// </summary>
    public static double Brent<TF>(ref TF f, double a, double fa, double b, double fb, double relTol, double absTol)
        where TF : struct, IRootFunction
    {
        if (fa == 0) return a;
        if (fb == 0) return b;
        double c = a, fc = fa, d = b - a, e = d;
        for (int iter = 0; iter < BrentIterations; iter++)
        {
            if (SameSign(fb, fc)) { c = a; fc = fa; d = b - a; e = d; }
            if (Math.Abs(fc) < Math.Abs(fb))
            {
                a = b; b = c; c = a;
                fa = fb; fb = fc; fc = fa;
            }
            double tol = relTol * Math.Abs(b) + absTol;
            double m = 0.5 * (c - b);
            if (Math.Abs(m) <= tol || fb == 0) return b;
            if (Math.Abs(e) >= tol && Math.Abs(fa) > Math.Abs(fb))
            {
                // Inverse quadratic interpolation (secant when only two points are distinct).
                double s = fb / fa, p, q;
                if (a == c) { p = 2 * m * s; q = 1 - s; }
                else
                {
                    double qq = fa / fc, r = fb / fc;
                    p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
                    q = (qq - 1) * (r - 1) * (s - 1);
                }
                if (p > 0) q = -q; else p = -p;
                if (2 * p < Math.Min(3 * m * q - Math.Abs(tol * q), Math.Abs(e * q))) { e = d; d = p / q; }
                else { d = m; e = d; }
            }
            else { d = m; e = d; }
            a = b; fa = fb;
            b += Math.Abs(d) > tol ? d : (m > 0 ? tol : -tol);
            fb = f.Evaluate(b);
        }
        return b;
    }

    /// <summary>
    /// Brent's method for f(x) = 0 on [a, b] (f(a), f(b) of opposite signs) to an absolute width
    /// <paramref name="xtol"/> in x (plus 2e-16 |x| for round-off). For setup code; hot paths pass a struct to
    /// <see cref="Brent{TF}"/>.
    /// </summary>
    public static double Brent(Func<double, double> f, double a, double b, double fa, double fb, double xtol)
    {
        ArgumentNullException.ThrowIfNull(f);
        var fn = new DelegateFunction(f);
        return Brent(ref fn, a, fa, b, fb, 2 * 1e-16, 0.5 * xtol);
    }

    /// <summary>
    /// Bisection for the boundary of a yes/no test: <paramref name="inside"/> passes the test, <paramref name="outside"/>
    /// fails it; halves the bracket while it is wider than <paramref name="relTol"/> max(<paramref name="scaleFloor"/>,
    /// |inside|), at most <paramref name="maxIterations"/> times, and returns the final bracket: the last point that
    /// passed (never one that failed) first. The default floor 1 makes the tolerance absolute near zero; a tiny floor
    /// keeps it relative.
    /// </summary>
    public static (double Inside, double Outside) Bisect<TP>(ref TP test, double inside, double outside, double relTol, int maxIterations = 100, double scaleFloor = 1.0)
        where TP : struct, IBoundaryTest
    {
        for (int i = 0; i < maxIterations && Math.Abs(outside - inside) > relTol * Math.Max(scaleFloor, Math.Abs(inside)); i++)
        {
            double m = 0.5 * (inside + outside);
            if (test.IsInside(m)) inside = m; else outside = m;
        }
        return (inside, outside);
    }

    /// <summary>
    /// Bisection in ln x for the boundary of a yes/no test on a positive bracket (midpoint sqrt(inside outside)):
    /// halves the bracket in ln x while max/min - 1 exceeds <paramref name="relTol"/>, at most
    /// <paramref name="maxIterations"/> times. Returns the final bracket (inside end first).
    /// </summary>
    public static (double Inside, double Outside) BisectGeometric<TP>(ref TP test, double inside, double outside, double relTol, int maxIterations = 100)
        where TP : struct, IBoundaryTest
    {
        for (int it = 0; it < maxIterations && Math.Max(inside, outside) / Math.Min(inside, outside) - 1 > relTol; it++)
        {
            double m = Math.Sqrt(inside * outside);
            if (test.IsInside(m)) inside = m; else outside = m;
        }
        return (inside, outside);
    }

    /// <summary>
    /// Newton steps with the exact derivative, safeguarded by the bracket [a, b] with f(a) &lt; 0 &lt;= f(b) (a bisection
    /// step whenever Newton would leave it); the first point is <paramref name="start"/> when given, else the secant
    /// point of the bracket. Stops when a step or the bracket is below <paramref name="relTol"/> max(1, |x|), at most
    /// 100 steps.
    /// </summary>
    public static double SafeNewton<TF>(ref TF f, double a, double b, double fa, double fb, double relTol, double start = double.NaN)
        where TF : struct, IRootFunctionWithDerivative
    {
        double x = start;
        if (double.IsNaN(x))
        {
            x = fb - fa != 0 ? a - fa * (b - a) / (fb - fa) : 0.5 * (a + b);
            if (!(x > a && x < b)) x = 0.5 * (a + b);
        }
        for (int iter = 0; iter < 100; iter++)
        {
            var (fx, df) = f.Evaluate(x);
            if (fx == 0) return x;
            if (fx < 0) a = x; else b = x;
            double xn = x - fx / df;
            if (!(xn > a && xn < b) || double.IsNaN(xn)) xn = 0.5 * (a + b);
            if (Math.Abs(xn - x) <= relTol * Math.Max(1.0, Math.Abs(x)) || b - a <= relTol * Math.Max(1.0, Math.Abs(x)))
                return xn;
            x = xn;
        }
        return x;
    }

    /// <summary>True when both are strictly positive or both strictly negative (false for a zero or a NaN; no product that could underflow).</summary>
    private static bool SameSign(double x, double y) => x > 0 ? y > 0 : x < 0 && y < 0;

    private readonly struct DelegateFunction(Func<double, double> f) : IRootFunction
    {
        public double Evaluate(double x) => f(x);
    }
}
