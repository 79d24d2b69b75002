using ModeSolver.Background;
using ModeSolver.Models;

namespace ModeSolver.Trajectories;

/// <summary>
/// The kinematics of an n-field trajectory at one instant (physics.md section 7).
/// </summary>
/// <param name="N">E-folds since the start of the background.</param>
/// <param name="H">Hubble rate (unscaled potential).</param>
/// <param name="Epsilon1">G_IJ phi'^I phi'^J / 2.</param>
/// <param name="TurnRate">eta_perp = |D_N e_sigma| per e-fold (0 for one field).</param>
/// <param name="EntropicMass">
/// m_s^2/H^2 = e_s^I e_s^J nabla_I nabla_J V / H^2 - eta_perp^2 + epsilon_1 R_fs, the super-horizon entropic mass of two
/// fields (NaN unless n = 2).
/// </param>
/// <param name="HessianMass">The bare part e_s^I e_s^J nabla_I nabla_J V / H^2 of the entropic mass (NaN unless n = 2).</param>
/// <param name="RicciScalar">The field-space Ricci scalar R_fs at the fields.</param>
public readonly record struct TrajectoryPoint(double N, double H, double Epsilon1, double TurnRate, double EntropicMass, double HessianMass, double RicciScalar);

/// <summary>
/// Turn rate, entropic mass and field-space curvature along an n-field background. In the kinematic basis e_sigma = phi'/|phi'|
/// (|phi'| = sqrt(2 epsilon_1)) the covariant equation D_N phi'^I = -(3 - epsilon_1) phi'^I - G^IJ V_J / H^2 (physics.md
/// section 7) gives the turn rate eta_perp = |D_N e_sigma| = |(G^IJ V_J)_perp| / (H^2 |phi'|), the part of the force normal to
/// the velocity. For n = 2, with e_s the unit normal, the entropic mass is
/// m_s^2/H^2 = V_;ss / H^2 - eta_perp^2 + epsilon_1 R_fs (Renaux-Petel &amp; Turzynski 2016, PRL 117, 141301): the projection of the mode equation's mass matrix onto e_s, whose Riemann term is
/// + epsilon_1 R_fs in two dimensions, with the centrifugal - eta_perp^2 of the super-horizon entropic equation. Negative on the
/// hyperbolic disk for a light field: geometrical destabilisation. One instance owns its work arrays (one thread at a time).
/// </summary>
public sealed class TrajectoryKinematics
{
    private readonly IFieldTheory _theory;
    private readonly FieldPoint _point;
    private readonly double[] _ricci, _normal;

    /// <summary>Work arrays for <paramref name="theory"/>.</summary>
    public TrajectoryKinematics(IFieldTheory theory)
    {
        ArgumentNullException.ThrowIfNull(theory);
        _theory = theory;
        int n = theory.FieldCount;
        _point = new FieldPoint(n);
        _ricci = new double[n * n];
        _normal = new double[n];
    }

    /// <summary>The background point of the last <see cref="At(FieldBackgroundSolution, double)"/> (fields, velocities, geometry).</summary>
    public FieldPoint Point => _point;

    /// <summary>The kinematics of <paramref name="background"/> at N = <paramref name="n"/> (no allocation).</summary>
    public TrajectoryPoint At(FieldBackgroundSolution background, double n)
    {
        ArgumentNullException.ThrowIfNull(background);
        background.Evaluate(n, _point, riemann: !_theory.IsCanonical && _theory.FieldCount >= 2);
        return Of(_point);
    }

    /// <summary>The kinematics of an evaluated background point (its Riemann tensor is used when it holds one).</summary>
    public TrajectoryPoint Of(FieldPoint point)
    {
        ArgumentNullException.ThrowIfNull(point);
        int f = point.FieldCount;
        double h = point.H, e1 = point.Epsilon1, n = point.N;
        ReadOnlySpan<double> velocity = point.DPhi;
        double ricciScalar = 0;
        if (point.HasRiemann && f >= 2)
        {
            FieldGeometry.Ricci(f, point.Riemann, _ricci);
            ricciScalar = FieldGeometry.RicciScalar(f, point.Inverse, _ricci);
        }
        double speed = Math.Sqrt(2 * e1);
        if (!(speed > 0))
            return new TrajectoryPoint(n, h, e1, double.NaN, double.NaN, double.NaN, ricciScalar);

        // The force G^IJ V_J and its part normal to e_sigma: w - G(w, e_sigma) e_sigma.
        for (int i = 0; i < f; i++)
        {
            double s = 0;
            for (int j = 0; j < f; j++) s += point.Inverse[i * f + j] * point.Gradient[j];
            _normal[i] = s;
        }
        double along = point.Dot(_normal, velocity) / speed;
        for (int i = 0; i < f; i++) _normal[i] -= along * velocity[i] / speed;
        double h2 = h * h;
        double turn = Math.Sqrt(Math.Max(0, point.Dot(_normal, _normal))) / (h2 * speed);
        if (f != 2)
            return new TrajectoryPoint(n, h, e1, turn, double.NaN, double.NaN, ricciScalar);

        Span<double> es = stackalloc double[2];
        Normal(point, speed, es);
        double vss = 0;
        for (int i = 0; i < 2; i++)
            for (int j = 0; j < 2; j++) vss += es[i] * es[j] * point.Hessian[i * 2 + j]; // covariant Hessian
        double hessianMass = vss / h2;
        return new TrajectoryPoint(n, h, e1, turn, hessianMass - turn * turn + e1 * ricciScalar, hessianMass, ricciScalar);
    }

    /// <summary>e_s: the unit normal to e_sigma, by Gram-Schmidt from the coordinate direction least aligned with it.</summary>
    private static void Normal(FieldPoint point, double speed, Span<double> es)
    {
        var g = point.Metric;
        var v = point.DPhi;
        double best = double.PositiveInfinity;
        for (int k = 0; k < 2; k++)
        {
            double proj = (g[k * 2] * v[0] + g[k * 2 + 1] * v[1]) / speed; // G(c_k, e_sigma)
            double cos = Math.Abs(proj) / Math.Sqrt(g[k * 2 + k]);
            if (cos >= best) continue;
            best = cos;
            for (int i = 0; i < 2; i++) es[i] = (i == k ? 1 : 0) - proj * v[i] / speed;
        }
        double len = Math.Sqrt(point.Dot(es, es));
        es[0] /= len;
        es[1] /= len;
    }
}
