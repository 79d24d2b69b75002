namespace ModeSolver.Formulas;

/// <summary>
/// Truncated Taylor arithmetic. A series holds normalised coefficients x_k = x^(k)(phi)/k!, k = 0..n.
/// Each routine writes all n+1 coefficients of its output; outputs never alias inputs.
/// The recurrences are the standard ones of automatic differentiation (e.g. Griewank &amp; Walther,
/// "Evaluating Derivatives", 2nd ed., SIAM 2008, chapter 13): each follows from an ODE the function
/// satisfies (exp' = exp, a log' = 1, ...), so every coefficient is exact up to rounding.
/// </summary>
internal static unsafe class Taylor
{
    public static void Constant(double* d, double c, int n)
    {
        d[0] = c;
        for (int k = 1; k <= n; k++) d[k] = 0;
    }

    public static void Copy(double* a, double* d, int n)
    {
        for (int k = 0; k <= n; k++) d[k] = a[k];
    }

    /// <summary>c = a * b (Cauchy product).</summary>
    public static void Mul(double* a, double* b, double* c, int n)
    {
        for (int k = 0; k <= n; k++)
        {
            double s = a[0] * b[k];
            for (int j = 1; j <= k; j++) s += a[j] * b[k - j];
            c[k] = s;
        }
    }

    /// <summary>c = a / b: c_k = (a_k - sum_{j=1..k} b_j c_{k-j}) / b_0.</summary>
    public static void Div(double* a, double* b, double* c, int n)
    {
        double b0 = b[0];
        c[0] = a[0] / b0;
        for (int k = 1; k <= n; k++)
        {
            double s = a[k];
            for (int j = 1; j <= k; j++) s -= b[j] * c[k - j];
            c[k] = s / b0;
        }
    }

    /// <summary>q = c / a for a constant c.</summary>
    public static void ConstDiv(double c, double* a, double* q, int n)
    {
        double a0 = a[0];
        q[0] = c / a0;
        for (int k = 1; k <= n; k++)
        {
            double s = 0;
            for (int j = 1; j <= k; j++) s -= a[j] * q[k - j];
            q[k] = s / a0;
        }
    }

    /// <summary>e = exp(a) given e_0: e_k = (1/k) sum_{j=1..k} j a_j e_{k-j}.</summary>
    public static void ExpTail(double* a, double* e, int n)
    {
        for (int k = 1; k <= n; k++)
        {
            double s = 0;
            for (int j = 1; j <= k; j++) s += j * a[j] * e[k - j];
            e[k] = s / k;
        }
    }

    /// <summary>l = log(a) given l_0: l_k = (a_k - (1/k) sum_{j=1..k-1} j l_j a_{k-j}) / a_0.</summary>
    public static void LogTail(double* a, double* l, int n)
    {
        double a0 = a[0];
        for (int k = 1; k <= n; k++)
        {
            double s = 0;
            for (int j = 1; j < k; j++) s += j * l[j] * a[k - j];
            l[k] = (a[k] - s / k) / a0;
        }
    }

    /// <summary>s = sqrt(a) given s_0: s_k = (a_k - sum_{j=1..k-1} s_j s_{k-j}) / (2 s_0).</summary>
    public static void SqrtTail(double* a, double* r, int n)
    {
        double twoS0 = 2 * r[0];
        for (int k = 1; k <= n; k++)
        {
            double s = a[k];
            for (int j = 1; j < k; j++) s -= r[j] * r[k - j];
            r[k] = s / twoS0;
        }
    }

    /// <summary>p = a^c (real c, a_0 != 0) given p_0: p_k = (1/(k a_0)) sum_{j=1..k} (c j - k + j) a_j p_{k-j}.</summary>
    public static void PowTail(double* a, double c, double* p, int n)
    {
        double a0 = a[0];
        for (int k = 1; k <= n; k++)
        {
            double s = 0;
            for (int j = 1; j <= k; j++) s += (c * j - k + j) * a[j] * p[k - j];
            p[k] = s / (k * a0);
        }
    }

    /// <summary>y with y' = a' g (y_0 given, g known to order n-1): y_k = (1/k) sum_{j=1..k} j a_j g_{k-j}.</summary>
    public static void IntegrateTail(double* a, double* g, double* y, int n, double sign)
    {
        for (int k = 1; k <= n; k++)
        {
            double s = 0;
            for (int j = 1; j <= k; j++) s += j * a[j] * g[k - j];
            y[k] = sign * s / k;
        }
    }

    /// <summary>s = sin(a), c = cos(a) together (hyperbolic = true for sinh, cosh), given s_0, c_0.</summary>
    public static void SinCosTail(double* a, double* s, double* c, int n, bool hyperbolic)
    {
        double sign = hyperbolic ? 1 : -1;
        for (int k = 1; k <= n; k++)
        {
            double ss = 0, cs = 0;
            for (int j = 1; j <= k; j++)
            {
                double ja = j * a[j];
                ss += ja * c[k - j];
                cs += ja * s[k - j];
            }
            s[k] = ss / k;
            c[k] = sign * cs / k;
        }
    }

    /// <summary>
    /// t = tan(a) (sign = +1, w = 1 + t^2) or tanh(a) (sign = -1, w = 1 - t^2), given t_0 and w_0:
    /// t_k = (1/k) sum_{j=1..k} j a_j w_{k-j}, w_k = sign sum_{i=0..k} t_i t_{k-i}.
    /// </summary>
    public static void TanTail(double* a, double* t, double* w, int n, double sign)
    {
        for (int k = 1; k <= n; k++)
        {
            double s = 0;
            for (int j = 1; j <= k; j++) s += j * a[j] * w[k - j];
            t[k] = s / k;
            if (k < n)
            {
                double q = 0;
                for (int i = 0; i <= k; i++) q += t[i] * t[k - i];
                w[k] = sign * q;
            }
        }
    }

    /// <summary>u = s0 + s2 a^2 to order n-1 (u_0 supplied separately for accuracy).</summary>
    public static void QuadraticTail(double* a, double* u, double s2, int n)
    {
        for (int k = 1; k < n; k++)
        {
            double q = 0;
            for (int i = 0; i <= k; i++) q += a[i] * a[k - i];
            u[k] = s2 * q;
        }
    }

    /// <summary>p = a^m for an integer m by repeated squaring (exact at a_0 = 0 and for negative a_0). Scratch t1, t2.</summary>
    public static void PowInt(double* a, int m, double* p, double* t1, double* t2, int n)
    {
        if (m == 2) { Mul(a, a, p, n); return; }
        long e = Math.Abs((long)m);
        if (e == 0) { Constant(p, 1, n); return; }
        Copy(a, t1, n);
        bool first = true;
        while (true)
        {
            if ((e & 1) != 0)
            {
                if (first) { Copy(t1, p, n); first = false; }
                else { Mul(p, t1, t2, n); Copy(t2, p, n); }
            }
            e >>= 1;
            if (e == 0) break;
            Mul(t1, t1, t2, n);
            Copy(t2, t1, n);
        }
        if (m < 0)
        {
            ConstDiv(1, p, t2, n);
            Copy(t2, p, n);
        }
    }

    /// <summary>x^m by repeated squaring; the same sequence of operations as <see cref="PowInt"/>'s zeroth coefficient.</summary>
    public static double PowIntScalar(double x, int m)
    {
        if (m == 2) return x * x;
        long e = Math.Abs((long)m);
        if (e == 0) return 1;
        double b = x, r = 0;
        bool first = true;
        while (true)
        {
            if ((e & 1) != 0)
            {
                if (first) { r = b; first = false; }
                else r *= b;
            }
            e >>= 1;
            if (e == 0) break;
            b *= b;
        }
        return m < 0 ? 1 / r : r;
    }
}
