using ModeSolver.Models;

namespace ModeSolver.Background;

/// <summary>
/// The covariant background equations of n fields in e-folds (physics.md section 7), state (phi^I, phi'^I) with
/// H^2 = V / (3 - e1) from the constraint, or (phi^I, phi'^I, ln H) after the end of inflation:
/// phi''^I = -Gamma^I_JK phi'^J phi'^K - (3 - e1) phi'^I - (3 - e1) G^IJ V_J / V   (constrained), and
/// phi''^I = -Gamma^I_JK phi'^J phi'^K - (3 - e1) phi'^I - G^IJ V_J / H^2, (ln H)' = -e1   (regular),
/// e1 = G_IJ phi'^I phi'^J / 2. G^IJ V_J comes from the Cholesky factor of G; where G is not positive definite the
/// derivative is NaN (the integrator rejects the step and the solver reports where). Allocation-free: the work arrays
/// belong to one instance, used by one integration at a time.
/// </summary>
internal sealed class CovariantBackgroundEquations
{
    private readonly IFieldTheory _theory;
    private readonly int _n;
    private readonly double[] _gradient, _metric, _lower, _raised, _christoffel, _metricE1;

    public CovariantBackgroundEquations(IFieldTheory theory)
    {
        _theory = theory;
        _n = theory.FieldCount;
        int n = _n;
        _gradient = new double[n];
        _metric = new double[n * n];
        _lower = new double[n * n];
        _raised = new double[n];
        _christoffel = new double[n * n * n];
        _metricE1 = new double[n * n];
    }

    public int FieldCount => _n;

    /// <summary>Right-hand side with state (phi, phi'); V and G evaluated at <paramref name="phiEval"/>.</summary>
    public void Constrained(ReadOnlySpan<double> phiEval, ReadOnlySpan<double> y, Span<double> dydt) => Evaluate(phiEval, y, dydt, regular: false);

    /// <summary>Right-hand side with state (phi, phi', ln H).</summary>
    public void Regular(ReadOnlySpan<double> phiEval, ReadOnlySpan<double> y, Span<double> dydt) => Evaluate(phiEval, y, dydt, regular: true);

    private void Evaluate(ReadOnlySpan<double> phiEval, ReadOnlySpan<double> y, Span<double> dydt, bool regular)
    {
        int n = _n;
        var p = y.Slice(n, n);
        double v = _theory.PotentialGradient(phiEval, _gradient);
        _theory.Metric(phiEval, _metric);
        if (!FieldGeometry.Cholesky(_metric, n, _lower))
        {
            dydt[..(regular ? 2 * n + 1 : 2 * n)].Fill(double.NaN);
            return;
        }
        FieldGeometry.CholeskySolve(_lower, n, _gradient, _raised);
        double e1 = Epsilon1(_metric, p, n);
        double threeMinus = 3.0 - e1;
        bool flat = _theory.IsCanonical;
        if (!flat) _theory.Christoffel(phiEval, _christoffel);
        double forceScale = regular ? 1.0 / Math.Exp(2.0 * y[2 * n]) : threeMinus / v;
        for (int i = 0; i < n; i++)
        {
            dydt[i] = p[i];
            double geodesic = 0;
            if (!flat)
                for (int j = 0; j < n; j++)
                {
                    double pj = p[j];
                    if (pj == 0) continue;
                    int row = (i * n + j) * n;
                    for (int k = 0; k < n; k++) geodesic += _christoffel[row + k] * pj * p[k];
                }
            dydt[n + i] = -threeMinus * p[i] - geodesic - forceScale * _raised[i];
        }
        if (regular) dydt[2 * n] = -e1;
    }

    /// <summary>e1 = G_IJ p^I p^J / 2 from an evaluated metric.</summary>
    public static double Epsilon1(ReadOnlySpan<double> metric, ReadOnlySpan<double> p, int n)
    {
        double s = 0;
        for (int i = 0; i < n; i++)
        {
            double row = 0;
            for (int j = 0; j < n; j++) row += metric[i * n + j] * p[j];
            s += p[i] * row;
        }
        return 0.5 * s;
    }

    /// <summary>e1 at the state's fields and velocities (first 2n entries of <paramref name="y"/>).</summary>
    public double Epsilon1(ReadOnlySpan<double> y)
    {
        _theory.Metric(y, _metricE1);
        return Epsilon1(_metricE1, y.Slice(_n, _n), _n);
    }

    /// <summary>The slow-roll attractor velocity -G^IJ V_J / V into <paramref name="velocity"/>; false where G is not positive definite.</summary>
    public bool AttractorVelocity(ReadOnlySpan<double> phi, Span<double> velocity)
    {
        int n = _n;
        double v = _theory.PotentialGradient(phi, _gradient);
        _theory.Metric(phi, _metric);
        if (!FieldGeometry.Cholesky(_metric, n, _lower)) return false;
        FieldGeometry.CholeskySolve(_lower, n, _gradient, velocity);
        for (int i = 0; i < n; i++) velocity[i] = -velocity[i] / v;
        return true;
    }
}
