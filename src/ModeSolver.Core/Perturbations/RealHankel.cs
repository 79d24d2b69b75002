namespace ModeSolver.Perturbations;

/// <summary>
/// Bessel functions J_nu, Y_nu and their derivatives for real order nu &gt;= 0 and real argument x &gt;= 2, without
/// allocation: Steed's method (Barnett, Feng, Steed and Goldfarb 1974, Comput. Phys. Commun. 8, 377): the continued
/// fraction CF1 for J'/J at order nu, downward recurrence to the order mu in [-1/2, 1/2], the complex continued
/// fraction CF2 for (J' + iY')/(J + iY) at mu, the Wronskian J Y' - J' Y = 2/(pi x), and upward recurrence of Y.
/// Checked against MathNet's AMOS Hankel functions (tests/ModeSolver.Tests/Speed).
/// </summary>
internal static class RealHankel
{
    /// <summary>Smallest argument served (CF2 converges quickly above it).</summary>
    public const double MinArgument = 2.0;

    private const double Eps = 1e-16;
    private const double FpMin = 1e-300;
    private const int MaxIterations = 100000;

    /// <summary>J_nu(x), Y_nu(x), J'_nu(x), Y'_nu(x); false when (nu, x) is outside the served range or a fraction does not converge.</summary>
    public static bool TryBesselJY(double nu, double x, out double j, out double y, out double jp, out double yp)
    {
        j = y = jp = yp = double.NaN;
        if (!(nu >= 0) || !(x >= MinArgument) || !double.IsFinite(x) || !double.IsFinite(nu)) return false;
        int nl = Math.Max(0, (int)(nu - x + 1.5));
        double xmu = nu - nl, xmu2 = xmu * xmu;
        double xi = 1.0 / x, xi2 = 2.0 * xi, w = xi2 / Math.PI;

        // CF1: f = J'_nu / J_nu (modified Lentz), tracking the sign of J_nu.
        int isign = 1;
        double h = nu * xi;
        if (h < FpMin) h = FpMin;
        double b = xi2 * nu, d = 0.0, c = h;
        int i;
        for (i = 0; i < MaxIterations; i++)
        {
            b += xi2;
            d = b - d;
            if (Math.Abs(d) < FpMin) d = FpMin;
            c = b - 1.0 / c;
            if (Math.Abs(c) < FpMin) c = FpMin;
            d = 1.0 / d;
            double del = c * d;
            h = del * h;
            if (d < 0.0) isign = -isign;
            if (Math.Abs(del - 1.0) <= Eps) break;
        }
        if (i >= MaxIterations) return false;

        // Downward recurrence from nu to mu (unnormalised).
        double rjl = isign * FpMin, rjpl = h * rjl, rjl1 = rjl, rjp1 = rjpl, fact = nu * xi;
        for (int l = nl; l >= 1; l--)
        {
            double t = fact * rjl + rjpl;
            fact -= xi;
            rjpl = fact * t - rjl;
            rjl = t;
        }
        if (rjl == 0.0) rjl = Eps;
        double f = rjpl / rjl;

        // CF2: p + i q = (J' + i Y') / (J + i Y) at order mu (Steed).
        double a = 0.25 - xmu2, p = -0.5 * xi, q = 1.0;
        double br = 2.0 * x, bi = 2.0;
        fact = a * xi / (p * p + q * q);
        double cr = br + q * fact, ci = bi + p * fact;
        double den = br * br + bi * bi;
        double dr = br / den, di = -bi / den;
        double dlr = cr * dr - ci * di, dli = cr * di + ci * dr;
        double temp = p * dlr - q * dli;
        q = p * dli + q * dlr;
        p = temp;
        for (i = 1; i < MaxIterations; i++)
        {
            a += 2 * i;
            bi += 2.0;
            dr = a * dr + br;
            di = a * di + bi;
            if (Math.Abs(dr) + Math.Abs(di) < FpMin) dr = FpMin;
            fact = a / (cr * cr + ci * ci);
            cr = br + cr * fact;
            ci = bi - ci * fact;
            if (Math.Abs(cr) + Math.Abs(ci) < FpMin) cr = FpMin;
            den = dr * dr + di * di;
            dr /= den;
            di = -di / den;
            dlr = cr * dr - ci * di;
            dli = cr * di + ci * dr;
            temp = p * dlr - q * dli;
            q = p * dli + q * dlr;
            p = temp;
            if (Math.Abs(dlr - 1.0) + Math.Abs(dli) <= Eps) break;
        }
        if (i >= MaxIterations) return false;

        double gam = (p - f) / q;
        double rjmu = Math.Sqrt(w / ((p - f) * gam + q));
        rjmu = rjl < 0 ? -rjmu : rjmu;
        double rymu = rjmu * gam;
        double rymup = rymu * (p + q / gam);
        double ry1 = xmu * xi * rymu - rymup;

        fact = rjmu / rjl;
        j = rjl1 * fact;
        jp = rjp1 * fact;
        for (int k = 1; k <= nl; k++)
        {
            double t = (xmu + k) * xi2 * ry1 - rymu;
            rymu = ry1;
            ry1 = t;
        }
        y = rymu;
        yp = nu * xi * rymu - ry1;
        return double.IsFinite(j) && double.IsFinite(y) && double.IsFinite(jp) && double.IsFinite(yp);
    }
}
