using System.Globalization;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>
/// Integrates the exact homogeneous background of an <see cref="IInflatonTheory"/> in e-folds (physics.md section 2),
/// from N = 0 to the end of inflation and on through the first oscillations.
/// </summary>
/// <remarks>
/// During inflation the state is (phi, phi') and H^2 = V/(3 - e1) comes from the constraint; after the end the state
/// carries ln H as well, which keeps the equations regular where V passes through zero. Every epsilon_1 = 1 crossing
/// of the inflationary history is located; after an end, a dip of epsilon_1 below 1 counts as inflation resuming only
/// when it lasts <see cref="BackgroundSettings.ReentryEFolds"/>. The integration stops exactly where the field reaches a
/// non-smooth point of the theory and restarts there, so no step straddles a jump in V_phi.
/// This is the one-field case of the n-field loop (<see cref="FieldBackgroundSolver"/>): the theory runs as a
/// <see cref="SingleFieldTheory"/> on the single-field equations (the fast path), and the result is the single-field
/// <see cref="BackgroundSolution"/> the later stages read.
/// </remarks>
public static class BackgroundSolver
{
    /// <summary>The default method for the inflationary phase (explicit, high order).</summary>
    public static IOdeMethod DefaultMethod() => new DormandPrince853();

    /// <summary>The default method after the end (oscillations): switches between explicit and implicit steps as stiffness requires.</summary>
    public static IOdeMethod DefaultReheatingMethod() => new AutoSwitching();

    /// <summary>
    /// The end surface of <paramref name="settings"/>: <see cref="BackgroundSettings.EndSurface"/>, else the coordinate surface
    /// phi^0 = <see cref="BackgroundSettings.PhiEnd"/> (a non-finite value never ends inflation, as a constant event never fires), else null.
    /// </summary>
    internal static FieldSurface? EndSurface(BackgroundSettings settings)
        => settings.EndSurface ?? (settings.PhiEnd is double pe && double.IsFinite(pe) ? FieldSurface.Coordinate(0, pe, SurfaceCrossing.Either, "phi-end") : null);

    /// <summary>Integrates the background; throws <see cref="PhysicsException"/> when the physics cannot be computed.</summary>
    public static BackgroundSolution Solve(IInflatonTheory theory, BackgroundSettings settings)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(settings);
        var y0 = Start(theory, settings);
        var run = new BackgroundRun(new SingleFieldTheory(theory), settings, EndSurface(settings),
            settings.InflationMethod ?? DefaultMethod(), settings.ReheatingMethod ?? DefaultReheatingMethod());
        var o = run.Execute(y0);
        return BackgroundSolution.Create(theory, o.Segments, o.NEnd, o.Crossings, o.Rising, o.NonSmooth, o.EndedAtSurface, o.ContinuationNote, o.ContinuationStop);
    }

    /// <summary>The checked single-field start (phi0, phi'0), by default on the attractor phi' = -V_phi / (K V).</summary>
    internal static double[] Start(IInflatonTheory theory, BackgroundSettings settings)
    {
        double phi0 = settings.Fields0 is { Count: 1 } f ? f[0] : settings.Phi0;
        var (rangeMin, rangeMax) = theory.ValidRange;
        if (!double.IsFinite(phi0))
            throw new PhysicsException($"The initial field value phi0 = {phi0} is not finite; give a finite phi0.");
        if (!(phi0 > rangeMin && phi0 < rangeMax))
            throw new PhysicsException($"The initial field value phi0 = {phi0:G6} lies outside the theory's valid range ({rangeMin:G6}, {rangeMax:G6}); choose phi0 inside it.");
        Jet3 v0 = theory.Potential(phi0);
        Jet3 k0 = theory.Kinetic(phi0);
        if (!(v0.Value > 0) || !double.IsFinite(v0.Value))
            throw new PhysicsException($"V <= 0 (or not finite) at the start, N = 0, phi = {phi0:G6} (V = {v0.Value:G6}); start where the potential is positive.");
        if (!(k0.Value > 0))
            throw new PhysicsException($"The kinetic function K = {k0.Value:G6} is not positive at the start, phi = {phi0:G6}; start where K > 0.");
        double dphi0 = (settings.Velocity0 is { Count: 1 } u ? u[0] : settings.DPhi0) ?? -v0.D1 / (k0.Value * v0.Value);
        if (!double.IsFinite(dphi0))
            throw new PhysicsException($"The initial velocity dphi/dN = {dphi0} at phi = {phi0:G6} is not finite; give a finite dphi0.");
        double e1Start = 0.5 * k0.Value * dphi0 * dphi0;
        if (e1Start >= 3.0)
            throw new PhysicsException($"epsilon_1 = {e1Start:G6} >= 3 at the start (N = 0, phi = {phi0:G6}, dphi/dN = {dphi0:G6}): the kinetic start is too large (H^2 = V/(3 - epsilon_1) needs epsilon_1 < 3); {(settings.DPhi0 is null ? "the slow-roll attractor velocity -V_phi/(K V) is that large here: start where the potential is flatter, or give a smaller dphi0" : $"lower |dphi0| below {Math.Sqrt(6.0 / k0.Value):G6}")}.");
        if (!(settings.Tolerance > 0 && settings.Tolerance < 1))
            throw new ArgumentOutOfRangeException(nameof(settings), "Tolerance must lie in (0, 1).");
        return new[] { phi0, dphi0 };
    }
}

