using System.Runtime.CompilerServices;

namespace ModeSolver.Background;

/// <summary>The e-fold range check shared by the background solutions' lookups.</summary>
internal static class EfoldRange
{
    /// <summary>
    /// <paramref name="n"/> itself inside [<paramref name="nStart"/>, <paramref name="nStop"/>]; the nearer end when it lies
    /// outside by at most 1e-10 max(1, |N_stop|) (round-off of a caller's N); otherwise an ArgumentOutOfRangeException.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static double Clamp(double n, double nStart, double nStop) =>
        n >= nStart && n <= nStop ? n : Outside(n, nStart, nStop);

    [MethodImpl(MethodImplOptions.NoInlining)]
    private static double Outside(double n, double nStart, double nStop)
    {
        double slack = 1e-10 * Math.Max(1.0, Math.Abs(nStop));
        if (n < nStart && n >= nStart - slack) return nStart;
        if (n > nStop && n <= nStop + slack) return nStop;
        throw new ArgumentOutOfRangeException(nameof(n), n, $"N must lie in [{nStart}, {nStop}].");
    }
}
