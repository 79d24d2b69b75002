namespace ModeSolver.Models;

/// <summary>
/// Derivatives of C#-written field functions where no closed form is supplied (<see cref="MetricFieldTheory"/>):
/// central differences with one Richardson extrapolation, D = (4 D(h/2) - D(h)) / 3, which cancels the h^2 error term
/// and leaves O(h^4) (Richardson extrapolation of the central difference; e.g. Press et al., Numerical Recipes, 3rd ed.,
/// section 5.7). Steps: h = 1e-3 max(1, |phi^I|) for first derivatives (truncation ~1e-12 f^(5), round-off ~1e-13 |f| / h),
/// h = 1e-2 max(1, |phi^I|) for second derivatives (round-off ~1e-11 |f| / h^2 after extrapolation). Expect about 1e-10
/// relative accuracy for first and 1e-8 for second derivatives of smooth functions of order-one curvature scale;
/// supply closed forms where more is needed. Allocation-free for n up to 16 (stack scratch), pooled beyond.
/// </summary>
public static class NumericalDerivatives
{
    /// <summary>Relative step of first derivatives.</summary>
    public const double FirstStep = 1e-3;

    /// <summary>Relative step of second derivatives.</summary>
    public const double SecondStep = 1e-2;

    private static double Step(double relative, double x) => relative * Math.Max(1.0, Math.Abs(x));

    /// <summary>The gradient of <paramref name="f"/> at <paramref name="phi"/> into <paramref name="gradient"/>.</summary>
    public static void Gradient(FieldScalar f, ReadOnlySpan<double> phi, Span<double> gradient)
    {
        int n = phi.Length;
        Span<double> x = n <= 64 ? stackalloc double[n] : new double[n];
        phi.CopyTo(x);
        for (int i = 0; i < n; i++)
        {
            double h = Step(FirstStep, phi[i]);
            double c1 = Central(f, x, i, h), c2 = Central(f, x, i, 0.5 * h);
            gradient[i] = (4.0 * c2 - c1) / 3.0;
        }
    }

    private static double Central(FieldScalar f, Span<double> x, int i, double h)
    {
        double x0 = x[i];
        x[i] = x0 + h; double fp = f(x);
        x[i] = x0 - h; double fm = f(x);
        x[i] = x0;
        return (fp - fm) / (2.0 * h);
    }

    /// <summary>
    /// The Jacobian of the m-component <paramref name="f"/>: d_K f_A at [A * n + K], or at [K * m + A] when
    /// <paramref name="transposed"/>.
    /// </summary>
    public static void Jacobian(FieldArray f, int m, ReadOnlySpan<double> phi, Span<double> jacobian, bool transposed = false)
    {
        int n = phi.Length;
        double[] work = System.Buffers.ArrayPool<double>.Shared.Rent(n + 4 * m);
        try
        {
            var x = work.AsSpan(0, n);
            var plus = work.AsSpan(n, m);
            var minus = work.AsSpan(n + m, m);
            var c1 = work.AsSpan(n + 2 * m, m);
            var c2 = work.AsSpan(n + 3 * m, m);
            phi.CopyTo(x);
            for (int k = 0; k < n; k++)
            {
                double h = Step(FirstStep, phi[k]);
                CentralArray(f, x, k, h, plus, minus, c1);
                CentralArray(f, x, k, 0.5 * h, plus, minus, c2);
                for (int a = 0; a < m; a++)
                {
                    double d = (4.0 * c2[a] - c1[a]) / 3.0;
                    if (transposed) jacobian[k * m + a] = d; else jacobian[a * n + k] = d;
                }
            }
        }
        finally
        {
            System.Buffers.ArrayPool<double>.Shared.Return(work);
        }
    }

    private static void CentralArray(FieldArray f, Span<double> x, int k, double h, Span<double> plus, Span<double> minus, Span<double> result)
    {
        double x0 = x[k];
        x[k] = x0 + h; f(x, plus);
        x[k] = x0 - h; f(x, minus);
        x[k] = x0;
        for (int a = 0; a < result.Length; a++) result[a] = (plus[a] - minus[a]) / (2.0 * h);
    }

    /// <summary>The Hessian d_I d_J f at [I * n + J].</summary>
    public static void Hessian(FieldScalar f, ReadOnlySpan<double> phi, Span<double> hessian)
    {
        int n = phi.Length;
        Span<double> x = n <= 64 ? stackalloc double[n] : new double[n];
        phi.CopyTo(x);
        for (int i = 0; i < n; i++)
            for (int j = i; j < n; j++)
            {
                double hi = Step(SecondStep, phi[i]), hj = Step(SecondStep, phi[j]);
                double s1 = Second(f, x, i, j, hi, hj), s2 = Second(f, x, i, j, 0.5 * hi, 0.5 * hj);
                double d = (4.0 * s2 - s1) / 3.0;
                hessian[i * n + j] = d;
                hessian[j * n + i] = d;
            }
    }

    private static double Second(FieldScalar f, Span<double> x, int i, int j, double hi, double hj)
    {
        double xi = x[i], xj = x[j];
        double r;
        if (i == j)
        {
            double f0 = f(x);
            x[i] = xi + hi; double fp = f(x);
            x[i] = xi - hi; double fm = f(x);
            r = (fp - 2.0 * f0 + fm) / (hi * hi);
        }
        else
        {
            x[i] = xi + hi; x[j] = xj + hj; double fpp = f(x);
            x[j] = xj - hj; double fpm = f(x);
            x[i] = xi - hi; double fmm = f(x);
            x[j] = xj + hj; double fmp = f(x);
            r = (fpp - fpm - fmp + fmm) / (4.0 * hi * hj);
        }
        x[i] = xi; x[j] = xj;
        return r;
    }

    /// <summary>Second derivatives d_M d_K f_A of the m-component <paramref name="f"/> at [(M * n + K) * m + A].</summary>
    public static void SecondDerivatives(FieldArray f, int m, ReadOnlySpan<double> phi, Span<double> result)
    {
        int n = phi.Length;
        double[] work = System.Buffers.ArrayPool<double>.Shared.Rent(n + 7 * m);
        try
        {
            var x = work.AsSpan(0, n);
            var f0 = work.AsSpan(n, m);
            var a1 = work.AsSpan(n + m, m);
            var a2 = work.AsSpan(n + 2 * m, m);
            var a3 = work.AsSpan(n + 3 * m, m);
            var a4 = work.AsSpan(n + 4 * m, m);
            var s1 = work.AsSpan(n + 5 * m, m);
            var s2 = work.AsSpan(n + 6 * m, m);
            phi.CopyTo(x);
            f(x, f0);
            for (int i = 0; i < n; i++)
                for (int j = i; j < n; j++)
                {
                    double hi = Step(SecondStep, phi[i]), hj = Step(SecondStep, phi[j]);
                    SecondArray(f, x, i, j, hi, hj, f0, a1, a2, a3, a4, s1);
                    SecondArray(f, x, i, j, 0.5 * hi, 0.5 * hj, f0, a1, a2, a3, a4, s2);
                    for (int a = 0; a < m; a++)
                    {
                        double d = (4.0 * s2[a] - s1[a]) / 3.0;
                        result[(i * n + j) * m + a] = d;
                        result[(j * n + i) * m + a] = d;
                    }
                }
        }
        finally
        {
            System.Buffers.ArrayPool<double>.Shared.Return(work);
        }
    }

    private static void SecondArray(FieldArray f, Span<double> x, int i, int j, double hi, double hj, ReadOnlySpan<double> f0,
        Span<double> a1, Span<double> a2, Span<double> a3, Span<double> a4, Span<double> result)
    {
        double xi = x[i], xj = x[j];
        if (i == j)
        {
            x[i] = xi + hi; f(x, a1);
            x[i] = xi - hi; f(x, a2);
            for (int a = 0; a < result.Length; a++) result[a] = (a1[a] - 2.0 * f0[a] + a2[a]) / (hi * hi);
        }
        else
        {
            x[i] = xi + hi; x[j] = xj + hj; f(x, a1);
            x[j] = xj - hj; f(x, a2);
            x[i] = xi - hi; f(x, a3);
            x[j] = xj + hj; f(x, a4);
            for (int a = 0; a < result.Length; a++) result[a] = (a1[a] - a2[a] - a4[a] + a3[a]) / (4.0 * hi * hj);
        }
        x[i] = xi; x[j] = xj;
    }
}
