namespace ModeSolver.Spectra;

/// <summary>
/// Cubic Hermite interpolation in ln k between samples that carry their exact slopes: the one interpolation of the
/// spectra, used by <see cref="PrimordialSpectrum"/> and by the observables stage. With <c>log</c> the interpolated
/// quantity is ln f with slopes d ln f / d ln k = slope - offset (e.g. n_s - 1 for P_s); otherwise f itself with
/// slopes df / d ln k = slope - offset. Callers check the range; inside it nothing is allocated.
/// </summary>
public static class LogHermite
{
    /// <summary>Interval index i with k[i] &lt;= x &lt;= k[i+1] (clamped to the ends), its fraction t in [0, 1] and width h in ln k.</summary>
    public static int Interval(ReadOnlySpan<double> k, double x, out double t, out double h)
    {
        int lo = k.BinarySearch(x);
        if (lo < 0) lo = ~lo - 1;
        lo = Math.Clamp(lo, 0, k.Length - 2);
        h = Math.Log(k[lo + 1] / k[lo]);
        t = Math.Clamp(Math.Log(x / k[lo]) / h, 0.0, 1.0);
        return lo;
    }

    /// <summary>The interpolant at <paramref name="x"/> (ln f when <paramref name="log"/>); needs at least two samples.</summary>
    public static double Value(ReadOnlySpan<double> k, ReadOnlySpan<double> f, ReadOnlySpan<double> slope, double offset, bool log, double x)
    {
        int i = Interval(k, x, out double t, out double h);
        Ends(f, slope, offset, log, i, h, out double f0, out double f1, out double d0, out double d1);
        double t2 = t * t, t3 = t2 * t;
        return (2 * t3 - 3 * t2 + 1) * f0 + (t3 - 2 * t2 + t) * d0 + (-2 * t3 + 3 * t2) * f1 + (t3 - t2) * d1;
    }

    /// <summary>d/d ln k of the interpolant at <paramref name="x"/> (of ln f when <paramref name="log"/>).</summary>
    public static double Derivative(ReadOnlySpan<double> k, ReadOnlySpan<double> f, ReadOnlySpan<double> slope, double offset, bool log, double x)
    {
        int i = Interval(k, x, out double t, out double h);
        Ends(f, slope, offset, log, i, h, out double f0, out double f1, out double d0, out double d1);
        double t2 = t * t;
        return ((6 * t2 - 6 * t) * f0 + (3 * t2 - 4 * t + 1) * d0 + (-6 * t2 + 6 * t) * f1 + (3 * t2 - 2 * t) * d1) / h;
    }

    private static void Ends(ReadOnlySpan<double> f, ReadOnlySpan<double> slope, double offset, bool log, int i, double h,
        out double f0, out double f1, out double d0, out double d1)
    {
        f0 = log ? Math.Log(f[i]) : f[i];
        f1 = log ? Math.Log(f[i + 1]) : f[i + 1];
        d0 = (slope[i] - offset) * h;
        d1 = (slope[i + 1] - offset) * h;
    }
}
