using ModeSolver.Models;

namespace ModeSolver.Background;

/// <summary>
/// The n-field background at one instant with every field-space quantity the perturbations need, written by
/// <see cref="FieldBackgroundSolution.Evaluate"/>: fields, velocities phi'^I = d phi^I/dN, the covariant acceleration
/// D_N phi'^I, V and its gradient, the covariant Hessian nabla_I nabla_J V = d_I d_J V - Gamma^K_IJ V_K, the metric, its
/// inverse, the Christoffel symbols and (on request) the Riemann tensor, with H and the Hubble-flow parameters
/// epsilon_1..3 of the trajectory. Layouts are those of <see cref="IFieldTheory"/> (row-major, first index first). A
/// reusable workspace (one per thread); the arrays are allocated once for the field count.
/// </summary>
public sealed class FieldPoint
{
    /// <summary>A workspace for <paramref name="fieldCount"/> fields.</summary>
    public FieldPoint(int fieldCount)
    {
        if (fieldCount < 1) throw new ArgumentOutOfRangeException(nameof(fieldCount), fieldCount, "at least one field");
        int n = fieldCount;
        FieldCount = n;
        State = new double[2 * n + 1];
        Phi = new double[n];
        DPhi = new double[n];
        Acceleration = new double[n];
        Gradient = new double[n];
        Metric = new double[n * n];
        Inverse = new double[n * n];
        Hessian = new double[n * n];
        Christoffel = new double[n * n * n];
        Riemann = new double[n * n * n * n];
    }

    /// <summary>The number of fields n.</summary>
    public int FieldCount { get; }

    /// <summary>E-folds since the start of the n-field integration.</summary>
    public double N { get; internal set; }

    /// <summary>H, reduced Planck units, unscaled potential.</summary>
    public double H { get; internal set; }

    /// <summary>V(phi), unscaled.</summary>
    public double V { get; internal set; }

    /// <summary>epsilon_1 = G_IJ phi'^I phi'^J / 2.</summary>
    public double Epsilon1 { get; internal set; }

    /// <summary>epsilon_2 = d ln epsilon_1 / dN (analytic, from the equations of motion).</summary>
    public double Epsilon2 { get; internal set; }

    /// <summary>epsilon_3 = d ln |epsilon_2| / dN (analytic; 0 where epsilon_2 = 0).</summary>
    public double Epsilon3 { get; internal set; }

    /// <summary>True when the Riemann tensor was evaluated at this point.</summary>
    public bool HasRiemann { get; internal set; }

    /// <summary>The background state (fields, velocities and, after the end, ln H).</summary>
    internal double[] State { get; }

    /// <summary>phi^I.</summary>
    public double[] Phi { get; }

    /// <summary>phi'^I = d phi^I / dN.</summary>
    public double[] DPhi { get; }

    /// <summary>D_N phi'^I = -(3 - epsilon_1) phi'^I - G^IJ V_J / H^2.</summary>
    public double[] Acceleration { get; }

    /// <summary>V_I.</summary>
    public double[] Gradient { get; }

    /// <summary>G_IJ.</summary>
    public double[] Metric { get; }

    /// <summary>G^IJ.</summary>
    public double[] Inverse { get; }

    /// <summary>The covariant Hessian nabla_I nabla_J V.</summary>
    public double[] Hessian { get; }

    /// <summary>Gamma^I_JK at [(I n + J) n + K].</summary>
    public double[] Christoffel { get; }

    /// <summary>R^I_JKL at [((I n + J) n + K) n + L] (valid when <see cref="HasRiemann"/>).</summary>
    public double[] Riemann { get; }

    /// <summary>G_IJ a^I b^J.</summary>
    public double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        int n = FieldCount;
        double s = 0;
        for (int i = 0; i < n; i++)
        {
            double row = 0;
            for (int j = 0; j < n; j++) row += Metric[i * n + j] * b[j];
            s += a[i] * row;
        }
        return s;
    }

    /// <summary>
    /// Fills the derived quantities from <see cref="State"/> (fields and velocities already in place): the theory's
    /// geometry and potential at the fields, H (from ln H in <paramref name="lnH"/> when not NaN, else from the
    /// Friedmann constraint) and the Hubble-flow parameters. epsilon_1' = phi'_I D_N phi'^I and epsilon_1'' =
    /// |D_N phi'|^2 + phi'_I D_N D_N phi'^I with D_N (G^IJ V_J) = G^IJ nabla_K nabla_J V phi'^K and (1/H^2)' = 2 e1/H^2.
    /// </summary>
    internal void Complete(IFieldTheory theory, double n, double lnH, bool riemann)
    {
        int f = FieldCount;
        N = n;
        var phi = Phi.AsSpan();
        double v = theory.PotentialGradient(phi, Gradient);
        V = v;
        theory.Metric(phi, Metric);
        if (!theory.InverseMetric(phi, Inverse))
            throw new Physics.PhysicsException($"The field-space metric G_IJ is not positive definite at N = {n:G8} ({BackgroundRun.DescribeFields(theory, phi)}); the perturbations cannot be computed there.");
        theory.PotentialHessian(phi, Hessian);
        if (theory.IsCanonical) Array.Clear(Christoffel);
        else
        {
            theory.Christoffel(phi, Christoffel);
            for (int i = 0; i < f; i++)
                for (int j = 0; j < f; j++)
                {
                    double s = 0;
                    for (int k = 0; k < f; k++) s += Christoffel[(k * f + i) * f + j] * Gradient[k];
                    Hessian[i * f + j] -= s;
                }
        }
        HasRiemann = riemann;
        if (riemann)
        {
            if (theory.IsCanonical) Array.Clear(Riemann);
            else theory.Riemann(phi, Riemann);
        }
        var p = DPhi.AsSpan();
        double e1 = 0.5 * Dot(p, p);
        double hsq = double.IsNaN(lnH) ? v / (3.0 - e1) : Math.Exp(2.0 * lnH);
        H = Math.Sqrt(hsq);
        Epsilon1 = e1;
        double dv = 0, hpp = 0;
        for (int i = 0; i < f; i++)
        {
            double gi = 0;
            for (int j = 0; j < f; j++) gi += Inverse[i * f + j] * Gradient[j];
            Acceleration[i] = -(3.0 - e1) * p[i] - gi / hsq;
            dv += p[i] * Gradient[i];
            for (int j = 0; j < f; j++) hpp += Hessian[i * f + j] * p[i] * p[j];
        }
        var acc = Acceleration.AsSpan();
        double e1d = Dot(p, acc);
        double e1dd = Dot(acc, acc) + e1d * 2.0 * e1 - (3.0 - e1) * e1d - hpp / hsq - 2.0 * e1 * dv / hsq;
        double e2 = e1 != 0 ? e1d / e1 : 0.0;
        double e2d = e1 != 0 ? e1dd / e1 - e2 * e2 : 0.0;
        Epsilon2 = e2;
        Epsilon3 = e2 != 0 ? e2d / e2 : 0.0;
    }
}
