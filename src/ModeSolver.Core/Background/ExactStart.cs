using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>
/// A background that starts a given number of e-folds before the end of inflation: from the slow-roll first guess of
/// phi0, Newton steps on N_total(phi0) with the attractor slope dN/dphi0 = -1/phi'(N = 0) until the exact background
/// inflates the target number of e-folds to <see cref="Tolerance"/>.
/// </summary>
public static class ExactStart
{
    /// <summary>|N_total - target| reached by the solve, e-folds.</summary>
    public const double Tolerance = 1e-7;

    private const int MaxIterations = 30;

    /// <summary>Solves the background whose N_total equals <paramref name="efolds"/>; <paramref name="settings"/>.Phi0 is the first guess.</summary>
    /// <exception cref="PhysicsException">no field value gives the target (one line, with the last attempt).</exception>
    public static BackgroundSolution Solve(IInflatonTheory theory, BackgroundSettings settings, double efolds)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(settings);
        double phi0 = settings.Fields0 is { Count: 1 } f ? f[0] : settings.Phi0;
        BackgroundSolution? bg = null;
        for (int i = 0; i < MaxIterations; i++)
        {
            bg = BackgroundSolver.Solve(theory, settings with { Phi0 = phi0, DPhi0 = null, Fields0 = null, Velocity0 = null });
            double miss = efolds - bg.NTotal;
            if (Math.Abs(miss) <= Tolerance) return bg;
            double velocity = bg.At(bg.NStart).DPhi;
            if (!(velocity != 0) || !double.IsFinite(velocity)) break;
            // Starting |miss| e-folds earlier moves phi0 back up the attractor by miss * |phi'|; at most a field unit at a time.
            double step = -miss * velocity;
            double limit = Math.Max(1.0, Math.Abs(phi0));
            phi0 += Math.Clamp(step, -limit, limit);
        }
        throw new PhysicsException(FormattableString.Invariant(
            $"Cannot start {efolds:G6} e-folds before the end of inflation: the exact background from phi0 = {phi0:G8} inflates {bg?.NTotal:G8} e-folds after {MaxIterations} corrections; give phi0 instead"));
    }
}
