using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>Finds the N at which k = aH (final horizon exit before the end of inflation) on any <see cref="IBackground"/>.</summary>
public static class HorizonExit
{
    /// <summary>
    /// The last N in [NStart, NEnd] with k = aH (a = e^N, H in M_pl; k in background units). Uses the fast lookup of an
    /// <see cref="IHorizonExitLookup"/> (a <see cref="BackgroundSolution"/>); for other backgrounds scans back from NEnd in quarter e-folds and refines.
    /// Throws <see cref="PhysicsException"/> when k never leaves the horizon in that range.
    /// </summary>
    public static double Find(IBackground background, double kBackground)
    {
        if (background is IHorizonExitLookup fast) return fast.NAtHorizonExit(kBackground);
        double lnk = Math.Log(kBackground);
        double F(double n) => n + Math.Log(background.At(n).H) - lnk;
        double b = background.NEnd, fb = F(b);
        if (fb < 0)
            throw new PhysicsException($"k = {kBackground:G6} (background units) is still inside the horizon at the end of inflation (N = {b:G8}); choose a smaller k.");
        const double step = 0.25;
        while (b > background.NStart)
        {
            double a = Math.Max(background.NStart, b - step);
            double fa = F(a);
            if (fa < 0) return Numerics.Roots.Brent(F, a, b, fa, fb, 1e-13);
            if (fa == 0) return a;
            b = a; fb = fa;
        }
        throw new PhysicsException($"k = {kBackground:G6} (background units) is already outside the horizon at the start (N = {background.NStart:G8}); start the field further up the potential or choose a larger k.");
    }
}
