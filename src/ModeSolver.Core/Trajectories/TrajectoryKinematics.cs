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
    private readonly int _n;
    private readonly double[] _phi, _p, _metric, _inverse, _gradient, _raised, _hessian, _christoffel, _riemann, _ricci, _normal;

    /// <summary>Work arrays for <paramref name="theory"/>.</summary>
    public TrajectoryKinematics(IFieldTheory theory)
    {
        ArgumentNullException.ThrowIfNull(theory);
        _theory = theory;
        int n = _n = theory.FieldCount;
        _phi = new double[n];
        _p = new double[n];
        _metric = new double[n * n];
        _inverse = new double[n * n];
        _gradient = new double[n];
        _raised = new double[n];
        _hessian = new double[n * n];
        _christoffel = new double[n * n * n];
        _riemann = new double[n * n * n * n];
        _ricci = new double[n * n];
        _normal = new double[n];
    }

    /// <summary>The kinematics of <paramref name="background"/> at N = <paramref name="n"/>.</summary>
    public TrajectoryPoint At(FieldBackgroundSolution background, double n)
    {
        ArgumentNullException.ThrowIfNull(background);
        var pt = background.At(n, _phi, _p);
        return At(_phi, _p, pt.H, pt.N);
    }

    /// <summary>The kinematics of the state (phi, phi') with Hubble rate <paramref name="h"/> (any n; no allocation).</summary>
    public TrajectoryPoint At(ReadOnlySpan<double> phi, ReadOnlySpan<double> velocity, double h, double n = double.NaN)
    {
        int f = _n;
        _theory.Metric(phi, _metric);
        if (!_theory.InverseMetric(phi, _inverse))
            return new TrajectoryPoint(n, h, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);
        double e1 = 0.5 * Dot(_metric, velocity, velocity, f);
        double speed = Math.Sqrt(2 * e1);
        _theory.PotentialGradient(phi, _gradient);
        for (int i = 0; i < f; i++)
        {
            double s = 0;
            for (int j = 0; j < f; j++) s += _inverse[i * f + j] * _gradient[j];
            _raised[i] = s;
        }
        double ricciScalar = 0;
        if (!_theory.IsCanonical && f >= 2)
        {
            _theory.Riemann(phi, _riemann);
            FieldGeometry.Ricci(f, _riemann, _ricci);
            ricciScalar = FieldGeometry.RicciScalar(f, _inverse, _ricci);
        }
        if (!(speed > 0))
            return new TrajectoryPoint(n, h, e1, double.NaN, double.NaN, double.NaN, ricciScalar);

        // The force's part normal to e_sigma: w = G^IJ V_J - (G(w, e_sigma)) e_sigma.
        double along = 0;
        for (int i = 0; i < f; i++)
        {
            double s = 0;
            for (int j = 0; j < f; j++) s += _metric[i * f + j] * velocity[j];
            along += _raised[i] * s;
        }
        along /= speed;
        for (int i = 0; i < f; i++) _normal[i] = _raised[i] - along * velocity[i] / speed;
        double normalForce = Math.Sqrt(Math.Max(0, Dot(_metric, _normal, _normal, f)));
        double h2 = h * h;
        double turn = normalForce / (h2 * speed);
        if (f != 2)
            return new TrajectoryPoint(n, h, e1, turn, double.NaN, double.NaN, ricciScalar);

        // e_s: the unit normal (Gram-Schmidt of the coordinate direction least aligned with e_sigma).
        Span<double> es = stackalloc double[2];
        Normal(velocity, speed, es);
        _theory.PotentialHessian(phi, _hessian);
        if (!_theory.IsCanonical) _theory.Christoffel(phi, _christoffel);
        double vss = 0;
        for (int i = 0; i < 2; i++)
            for (int j = 0; j < 2; j++)
            {
                double cov = _hessian[i * 2 + j];
                if (!_theory.IsCanonical)
                    for (int k = 0; k < 2; k++) cov -= _christoffel[(k * 2 + i) * 2 + j] * _gradient[k];
                vss += es[i] * es[j] * cov;
            }
        double hessianMass = vss / h2;
        return new TrajectoryPoint(n, h, e1, turn, hessianMass - turn * turn + e1 * ricciScalar, hessianMass, ricciScalar);
    }

    private void Normal(ReadOnlySpan<double> velocity, double speed, Span<double> es)
    {
        // Two candidates, the coordinate directions; keep the one with the smaller |cos| to e_sigma.
        double best = double.PositiveInfinity;
        Span<double> c = stackalloc double[2];
        for (int k = 0; k < 2; k++)
        {
            c.Clear();
            c[k] = 1;
            double norm = Math.Sqrt(_metric[k * 2 + k]);
            double cos = Math.Abs(_metric[k * 2] * velocity[0] + _metric[k * 2 + 1] * velocity[1]) / (norm * speed);
            if (cos >= best) continue;
            best = cos;
            double proj = (_metric[k * 2] * velocity[0] + _metric[k * 2 + 1] * velocity[1]) / speed; // G(c, e_sigma)
            for (int i = 0; i < 2; i++) es[i] = c[i] - proj * velocity[i] / speed;
        }
        double len = Math.Sqrt(Dot(_metric, es, es, 2));
        es[0] /= len;
        es[1] /= len;
    }

    private static double Dot(ReadOnlySpan<double> g, ReadOnlySpan<double> a, ReadOnlySpan<double> b, int n)
    {
        double s = 0;
        for (int i = 0; i < n; i++)
        {
            double row = 0;
            for (int j = 0; j < n; j++) row += g[i * n + j] * b[j];
            s += a[i] * row;
        }
        return s;
    }
}
