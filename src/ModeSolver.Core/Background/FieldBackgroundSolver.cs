using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>
/// Integrates the exact homogeneous background of an n-field theory (<see cref="IFieldTheory"/>) in e-folds with the
/// covariant equations of physics.md section 7: state (phi^I, phi'^I), 2n entries, from N = 0 to the end of inflation
/// (the chosen epsilon_1 = 1 crossing, or the end surface) and on through the first oscillations. One loop serves every n;
/// a <see cref="SingleFieldTheory"/> runs the single-field equations of <see cref="BackgroundSolver"/> (the same numbers).
/// </summary>
public static class FieldBackgroundSolver
{
    /// <summary>Integrates the background; throws <see cref="PhysicsException"/> when the physics cannot be computed.</summary>
    /// <remarks>
    /// The start is <see cref="BackgroundSettings.Fields0"/> (or <see cref="BackgroundSettings.Phi0"/> for one field) with
    /// velocity <see cref="BackgroundSettings.Velocity0"/>, by default the slow-roll attractor direction -G^IJ V_J / V. The end
    /// surface is <see cref="BackgroundSettings.EndSurface"/> (or phi^0 = <see cref="BackgroundSettings.PhiEnd"/>). The metric
    /// must be positive definite at the start and wherever the integration goes; where it is not, the error names the field values.
    /// </remarks>
    public static FieldBackgroundSolution Solve(IFieldTheory theory, BackgroundSettings settings)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(settings);
        if (theory is SingleFieldTheory single)
        {
            // One field: the single-field start and checks (the same numbers as BackgroundSolver).
            var start = BackgroundSolver.Start(single.Inner, settings);
            return FieldBackgroundSolution.Create(theory, new BackgroundRun(theory, settings, BackgroundSolver.EndSurface(settings),
                settings.InflationMethod ?? BackgroundSolver.DefaultMethod(), settings.ReheatingMethod ?? BackgroundSolver.DefaultReheatingMethod()).Execute(start));
        }
        int n = theory.FieldCount;
        if (n < 1) throw new ArgumentException("a field theory needs at least one field", nameof(theory));
        string names = string.Join(", ", theory.FieldNames);
        double[] phi0;
        if (settings.Fields0 is { } f)
        {
            if (f.Count != n)
                throw new PhysicsException($"The start gives {f.Count} field value(s) but the theory has {n} field(s) ({names}); give one value per field.");
            phi0 = f.ToArray();
        }
        else if (n == 1) phi0 = new[] { settings.Phi0 };
        else throw new PhysicsException($"The start of a {n}-field run needs the field values ({names}); give Fields0.");
        for (int i = 0; i < n; i++)
            if (!double.IsFinite(phi0[i]))
                throw new PhysicsException($"The initial value of field {theory.FieldNames[i]} = {phi0[i]} is not finite; give finite start values.");
        string at = BackgroundRun.DescribeFields(theory, phi0);
        foreach (var b in theory.Boundaries)
            if (!b.IsInside(phi0))
                throw new PhysicsException($"The start {at} lies outside the theory's valid region (boundary {b.Name}); choose a start inside it.");
        var metric = new double[n * n];
        var lower = new double[n * n];
        theory.Metric(phi0, metric);
        if (!FieldGeometry.Cholesky(metric, n, lower))
            throw new PhysicsException($"The field-space metric G_IJ is not positive definite at the start, {at}; start where it is.");
        var gradient = new double[n];
        double v0 = theory.PotentialGradient(phi0, gradient);
        if (!(v0 > 0) || !double.IsFinite(v0))
            throw new PhysicsException($"V <= 0 (or not finite) at the start, N = 0, {at} (V = {v0:G6}); start where the potential is positive.");

        bool attractor;
        double[] p0;
        if (settings.Velocity0 is { } u)
        {
            if (u.Count != n)
                throw new PhysicsException($"The start velocity gives {u.Count} value(s) but the theory has {n} field(s) ({names}); give one d phi/dN per field.");
            p0 = u.ToArray();
            attractor = false;
        }
        else if (n == 1 && settings.DPhi0 is double d)
        {
            p0 = new[] { d };
            attractor = false;
        }
        else
        {
            p0 = new double[n];
            FieldGeometry.CholeskySolve(lower, n, gradient, p0);
            for (int i = 0; i < n; i++) p0[i] = -p0[i] / v0;
            attractor = true;
        }
        for (int i = 0; i < n; i++)
            if (!double.IsFinite(p0[i]))
                throw new PhysicsException($"The initial velocity d{theory.FieldNames[i]}/dN = {p0[i]} at {at} is not finite; give a finite start velocity.");
        double e1Start = CovariantBackgroundEquations.Epsilon1(metric, p0, n);
        if (e1Start >= 3.0)
            throw new PhysicsException($"epsilon_1 = {e1Start:G6} >= 3 at the start (N = 0, {at}): the kinetic start is too large (H^2 = V/(3 - epsilon_1) needs epsilon_1 < 3); {(attractor ? "the slow-roll attractor velocity -G^IJ V_J / V is that large here: start where the potential is flatter, or give a smaller start velocity" : "give a smaller start velocity")}.");
        if (!(settings.Tolerance > 0 && settings.Tolerance < 1))
            throw new ArgumentOutOfRangeException(nameof(settings), "Tolerance must lie in (0, 1).");

        var y0 = new double[2 * n];
        phi0.CopyTo(y0, 0);
        p0.CopyTo(y0, n);
        var run = new BackgroundRun(theory, settings, BackgroundSolver.EndSurface(settings),
            settings.InflationMethod ?? BackgroundSolver.DefaultMethod(), settings.ReheatingMethod ?? BackgroundSolver.DefaultReheatingMethod());
        var o = run.Execute(y0);
        return FieldBackgroundSolution.Create(theory, o);
    }
}
