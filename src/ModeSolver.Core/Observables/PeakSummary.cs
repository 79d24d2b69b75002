namespace ModeSolver.Observables;

/// <summary>
/// A small-scale peak of P_s: the largest maximum of the spectrum at k above the pivot whose height is at least
/// <see cref="ObservablesSettings.PeakMinRatio"/> times A_s and which lies inside the computed range (the slope changes
/// sign there). Quantities that cannot be found in the range are NaN.
/// </summary>
/// <param name="Found">True when such a peak exists.</param>
/// <param name="Reason">Why no peak was found (empty when found).</param>
/// <param name="KPeak">k of the maximum, 1/Mpc (root of the interpolated slope).</param>
/// <param name="PPeak">P_s at the maximum.</param>
/// <param name="RatioToAs">P_peak / A_s.</param>
/// <param name="WidthLnK">Full width at half maximum in ln k; NaN when P_s does not fall to half on both sides in the range.</param>
/// <param name="KHalfLow">k below the peak where P_s = P_peak / 2 (NaN if not reached).</param>
/// <param name="KHalfHigh">k above the peak where P_s = P_peak / 2 (NaN if not reached).</param>
/// <param name="SteepestGrowth">Largest d ln P_s / d ln k between the pivot and the peak (n_s - 1 there).</param>
/// <param name="KSteepest">k of the steepest growth, 1/Mpc.</param>
/// <param name="NExit">N (since the start) at which k_peak left the horizon.</param>
/// <param name="EfoldsBeforeEnd">N_end - N_exit of k_peak.</param>
/// <param name="RelError">Relative error estimate of P_peak (largest of the two neighbouring samples).</param>
public sealed record PeakSummary(
    bool Found, string Reason, double KPeak, double PPeak, double RatioToAs, double WidthLnK, double KHalfLow, double KHalfHigh,
    double SteepestGrowth, double KSteepest, double NExit, double EfoldsBeforeEnd, double RelError)
{
    /// <summary>No peak, with the reason.</summary>
    public static PeakSummary None(string reason) =>
        new(false, reason, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN,
            double.NaN, double.NaN, double.NaN);
}

/// <summary>Finds and measures the small-scale peak of a spectrum (see <see cref="PeakSummary"/>).</summary>
public static class PeakFinder
{
    /// <summary>The peak summary of <paramref name="source"/>.</summary>
    public static PeakSummary Find(ObservablesSource source, double minRatio)
    {
        ArgumentNullException.ThrowIfNull(source);
        var k = source.K;
        var p = source.Ps;
        int n = k.Length;
        double kPivot = source.Pivot.KPivot, aS = source.Pivot.As;
        if (!(aS > 0)) aS = source.PsAt(Math.Clamp(kPivot, source.KMin, source.KMax));
        int first = 0;
        while (first < n && k[first] <= kPivot) first++;
        if (first >= n - 1) return PeakSummary.None("the spectrum has no wavenumbers above the pivot");
        int best = -1;
        for (int i = Math.Max(first, 1); i < n - 1; i++)
            if (p[i] >= p[i - 1] && p[i] >= p[i + 1] && (best < 0 || p[i] > p[best])) best = i;
        int maxAll = first;
        for (int i = first; i < n; i++) if (p[i] > p[maxAll]) maxAll = i;
        if (best < 0 || p[maxAll] > p[best])
        {
            if (maxAll == n - 1 && p[maxAll] >= minRatio * aS)
                return PeakSummary.None(FormattableString.Invariant(
                    $"P_s is still rising at k_max = {k[n - 1]:G4} /Mpc (P_s = {p[n - 1]:G3}); extend the k range to see the peak"));
            if (best < 0) return PeakSummary.None("P_s has no maximum inside the k range above the pivot");
        }
        if (p[best] < minRatio * aS)
            return PeakSummary.None(FormattableString.Invariant(
                $"the largest maximum above the pivot, P_s = {p[best]:G3} at k = {k[best]:G4} /Mpc, is below {minRatio:G3} A_s"));

        // Refine: root of the interpolated slope next to the largest sample.
        double kPeak = k[best];
        double lo = k[best - 1], hi = k[best + 1];
        if (source.SlopeAt(kPeak) > 0) lo = kPeak; else hi = kPeak;
        if (source.SlopeAt(lo) > 0 && source.SlopeAt(hi) < 0)
        {
            var rising = new Rising(source);
            (lo, hi) = Numerics.Roots.BisectGeometric(ref rising, lo, hi, 1e-13);
            double c = Math.Sqrt(lo * hi);
            if (source.PsAt(c) > p[best]) kPeak = c;
        }
        double pPeak = source.PsAt(kPeak);

        double half = 0.5 * pPeak;
        double kLow = double.NaN, kHigh = double.NaN;
        for (int i = best; i > 0; i--)
            if (p[i - 1] <= half) { kLow = Crossing(source, k[i - 1], Math.Min(k[i], kPeak), half); break; }
        for (int i = best; i < n - 1; i++)
            if (p[i + 1] <= half) { kHigh = Crossing(source, Math.Max(k[i], kPeak), k[i + 1], half); break; }
        double width = double.IsFinite(kLow) && double.IsFinite(kHigh) ? Math.Log(kHigh / kLow) : double.NaN;

        double steepest = double.NegativeInfinity, kSteep = double.NaN;
        for (int i = first; i <= best; i++)
            if (source.Ns[i] - 1 > steepest) { steepest = source.Ns[i] - 1; kSteep = k[i]; }

        double nExit = source.NAtExit(kPeak);
        double before = source.NEnd - nExit;
        double relErr = Math.Max(source.RelError[best], Math.Max(source.RelError[best - 1], source.RelError[best + 1]));
        return new PeakSummary(true, "", kPeak, pPeak, pPeak / aS, width, kLow, kHigh, steepest, kSteep, nExit, before, relErr);
    }

    // P_s - level changes sign between a and b (ln P_s is monotone there to the accuracy that matters): bisection in ln k.
    private static double Crossing(ObservablesSource s, double a, double b, double level)
    {
        var side = new SameSideAs(s, level, Math.Sign(s.PsAt(a) - level));
        (a, b) = Numerics.Roots.BisectGeometric(ref side, a, b, 1e-12);
        return Math.Sqrt(a * b);
    }

    private readonly struct Rising(ObservablesSource s) : Numerics.IBoundaryTest
    {
        public bool IsInside(double k) => s.SlopeAt(k) > 0;
    }

    private readonly struct SameSideAs(ObservablesSource s, double level, int sign) : Numerics.IBoundaryTest
    {
        public bool IsInside(double k) => Math.Sign(s.PsAt(k) - level) == sign;
    }
}
