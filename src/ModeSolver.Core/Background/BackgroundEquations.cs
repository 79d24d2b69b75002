using ModeSolver.Models;

namespace ModeSolver.Background;

/// <summary>
/// The background equations in e-folds (physics.md section 2), in two forms:
/// the inflationary form with state (phi, phi') and H^2 = V / (3 - e1) from the constraint, and the regular form
/// with state (phi, phi', ln H) used after the end, where V may pass through zero while the field oscillates.
/// Both use phi'' = -(3 - e1) phi' - (K_phi / 2K) phi'^2 - V_phi / (K H^2), which equals the section-2 form when the
/// constraint holds. Everything here uses the unscaled potential.
/// </summary>
internal static class BackgroundEquations
{
    /// <summary>Right-hand side with state (phi, phi').</summary>
    /// <param name="theory">The theory.</param>
    /// <param name="phiEval">Field value at which V and K are evaluated (y[0], or the side of a kink the field moves to).</param>
    /// <param name="y">State.</param>
    /// <param name="dydt">Derivative.</param>
    public static void Constrained(IInflatonTheory theory, double phiEval, ReadOnlySpan<double> y, Span<double> dydt)
    {
        double phi = phiEval, p = y[1];
        var (v, k) = theory.Jets(phi);
        double e1 = 0.5 * k.Value * p * p;
        double threeMinus = 3.0 - e1;
        dydt[0] = p;
        dydt[1] = -threeMinus * p - k.D1 / (2.0 * k.Value) * p * p - threeMinus * v.D1 / (k.Value * v.Value);
    }

    /// <summary>Right-hand side with state (phi, phi', ln H).</summary>
    public static void Regular(IInflatonTheory theory, double phiEval, ReadOnlySpan<double> y, Span<double> dydt)
    {
        double phi = phiEval, p = y[1];
        var (v, k) = theory.Jets(phi);
        double e1 = 0.5 * k.Value * p * p;
        double hsq = Math.Exp(2.0 * y[2]);
        dydt[0] = p;
        dydt[1] = -(3.0 - e1) * p - k.D1 / (2.0 * k.Value) * p * p - v.D1 / (k.Value * hsq);
        dydt[2] = -e1;
    }

    /// <summary>H^2 (unscaled) from the constraint H^2 = V / (3 - e1).</summary>
    public static double ConstraintHubbleSquared(IInflatonTheory theory, double phi, double p)
    {
        double e1 = 0.5 * theory.Kinetic(phi).Value * p * p;
        return theory.Potential(phi).Value / (3.0 - e1);
    }

    /// <summary>
    /// The full background point from (phi, phi', H^2): e1, e2 and e3 from the analytic phi'' and phi'''
    /// (differentiating the equation of motion along the flow, with (H^2)' = -2 e1 H^2), never by differencing.
    /// </summary>
    public static BackgroundPoint Point(IInflatonTheory theory, double n, double phi, double p, double hsq, double vScale)
    {
        var (v, k) = theory.Jets(phi);
        return Point(v, k, n, phi, p, hsq, vScale);
    }

    /// <summary>As <see cref="Point(IInflatonTheory, double, double, double, double, double)"/> with V and K already evaluated at phi.</summary>
    public static BackgroundPoint Point(Jet3 v, Jet3 kj, double n, double phi, double p, double hsq, double vScale)
    {
        double k = kj.Value, k1 = kj.D1, k2 = kj.D2;
        double v1 = v.D1, v2 = v.D2;
        double k1k = k1 / k;
        double e1 = 0.5 * k * p * p;
        double kh = k * hsq;
        double pp = -(3.0 - e1) * p - 0.5 * k1k * p * p - v1 / kh;
        double e1d = 0.5 * k1 * p * p * p + k * p * pp; // e1' = e1 e2
        double ppp = e1d * p - (3.0 - e1) * pp
                     - (0.5 * k2 / k - 0.5 * k1k * k1k) * p * p * p - k1k * p * pp
                     - v2 * p / kh + v1 * k1 * p / (k * kh) - 2.0 * e1 * v1 / kh;
        double r = pp / p;
        double e2 = 2.0 * r + k1k * p;
        double e2d = 2.0 * ppp / p - 2.0 * r * r + (k2 / k - k1k * k1k) * p * p + k1k * pp;
        // e3 = d ln|e2|/dN is 0/0 where e2 vanishes identically (power law on its attractor): only e2 e3 = e2' enters
        // the equations, so e3 = 0 where e2 = 0 exactly keeps every product finite instead of NaN.
        double e3 = e2 != 0 ? e2d / e2 : 0.0;
        return new BackgroundPoint(n, phi, p, Math.Sqrt(hsq * vScale), e1, e2, e3);
    }
}
