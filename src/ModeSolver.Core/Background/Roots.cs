namespace ModeSolver.Background;

/// <summary>Small root finders on bracketed intervals.</summary>
internal static class Roots
{
    /// <summary>Brent-style (bisection plus secant/inverse quadratic) root of f on [a, b] with f(a), f(b) of opposite signs.</summary>
    public static double Bracketed(Func<double, double> f, double a, double b, double fa, double fb, double xtol)
    {
        if (fa == 0) return a;
        if (fb == 0) return b;
        double c = a, fc = fa, d = b - a, e = d;
        for (int iter = 0; iter < 200; iter++)
        {
            if (fb * fc > 0) { c = a; fc = fa; d = b - a; e = d; }
            if (Math.Abs(fc) < Math.Abs(fb))
            {
                a = b; b = c; c = a;
                fa = fb; fb = fc; fc = fa;
            }
            double tol = 2 * 1e-16 * Math.Abs(b) + 0.5 * xtol;
            double m = 0.5 * (c - b);
            if (Math.Abs(m) <= tol || fb == 0) return b;
            if (Math.Abs(e) >= tol && Math.Abs(fa) > Math.Abs(fb))
            {
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
            fb = f(b);
        }
        return b;
    }

    /// <summary>
    /// Root of ln(aH)(N) = target on [a, b] (f(a) &lt; 0 &lt;= f(b)) by Newton steps with the exact derivative 1 - e1,
    /// safeguarded by bisection. Allocation-free.
    /// </summary>
    public static double SafeNewton(BackgroundSolution bg, double target, double a, double b, double fa, double fb)
    {
        double x = fb - fa != 0 ? a - fa * (b - a) / (fb - fa) : 0.5 * (a + b);
        if (!(x > a && x < b)) x = 0.5 * (a + b);
        for (int iter = 0; iter < 100; iter++)
        {
            var p = bg.At(x);
            double f = x + Math.Log(p.H) - target;
            if (f == 0) return x;
            if (f < 0) a = x; else b = x;
            double df = 1.0 - p.Epsilon1;
            double xn = x - f / df;
            if (!(xn > a && xn < b) || double.IsNaN(xn)) xn = 0.5 * (a + b);
            if (Math.Abs(xn - x) <= 1e-14 * Math.Max(1.0, Math.Abs(x)) || b - a <= 1e-14 * Math.Max(1.0, Math.Abs(x)))
                return xn;
            x = xn;
        }
        return x;
    }
}
