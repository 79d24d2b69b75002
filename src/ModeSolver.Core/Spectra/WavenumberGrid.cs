using System.Globalization;

namespace ModeSolver.Spectra;

/// <summary>Log-spaced wavenumber grids shared by the primordial table and the observables' tables.</summary>
public static class WavenumberGrid
{
    /// <summary>Default density: 50 points per decade in k.</summary>
    public const int DefaultPointsPerDecade = 50;

    /// <summary>
    /// Log-spaced k from <paramref name="kMin"/> to <paramref name="kMax"/> (both included exactly), at least
    /// <paramref name="pointsPerDecade"/> points per decade; a single point when the two are equal.
    /// </summary>
    /// <exception cref="ArgumentException">The range is not 0 &lt; k_min &lt;= k_max finite, or the density is below 1.</exception>
    public static double[] LogSpaced(double kMin, double kMax, int pointsPerDecade = DefaultPointsPerDecade)
    {
        if (kMin > 0 && kMin == kMax && double.IsFinite(kMax)) return [kMin]; // one wavenumber asked for: one row
        if (!(kMin > 0) || !(kMax > kMin) || !double.IsFinite(kMax))
            throw new ArgumentException(
                $"table k range must satisfy 0 < k_min < k_max, got [{kMin.ToString("R", CultureInfo.InvariantCulture)}, {kMax.ToString("R", CultureInfo.InvariantCulture)}]");
        if (pointsPerDecade < 1)
            throw new ArgumentException($"table density must be at least 1 point per decade, got {pointsPerDecade}");
        double decades = Math.Log10(kMax / kMin);
        int n = Math.Max(2, (int)Math.Ceiling(decades * pointsPerDecade) + 1);
        var k = new double[n];
        double l0 = Math.Log(kMin), dl = (Math.Log(kMax) - l0) / (n - 1);
        for (int i = 0; i < n; i++) k[i] = Math.Exp(l0 + i * dl);
        k[0] = kMin;
        k[n - 1] = kMax;
        return k;
    }
}
