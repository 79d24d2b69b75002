using ModeSolver.Background;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Estimates;

/// <summary>
/// Slow-roll predictions (physics.md section 4c): Hubble-flow first and second order from (H, e1, e2, e3) at k = aH
/// (Stewart &amp; Lyth 1993; Schwarz, Terrero-Escalante &amp; Garcia 2001), and the potential form from V and K.
/// </summary>
public static class SlowRoll
{
    private const double C = Constants.SlowRollC;

    /// <summary>First-order Hubble-flow estimate at a background point (taken at k = aH).</summary>
    public static SlowRollPrediction HubbleFirstOrder(in BackgroundPoint p)
    {
        double h2 = p.H * p.H, e1 = p.Epsilon1, e2 = p.Epsilon2;
        double ps = h2 / (8 * Math.PI * Math.PI * e1);
        double pt = 2 * h2 / (Math.PI * Math.PI);
        return new SlowRollPrediction("hubble-1", ps, pt, 1 - 2 * e1 - e2, 16 * e1, -2 * e1, -2 * e1 * e2 - E2E3(p));
    }

    /// <summary>e2 e3 = d e2/dN, taken as 0 where e2 = 0 exactly (there e3 is 0/0, e.g. on the power-law attractor).</summary>
    private static double E2E3(in BackgroundPoint p) => p.Epsilon2 == 0 ? 0 : p.Epsilon2 * p.Epsilon3;

    /// <summary>Second-order Hubble-flow estimate at a background point (taken at k = aH); C = gamma_E + ln 2 - 2.</summary>
    public static SlowRollPrediction HubbleSecondOrder(in BackgroundPoint p)
    {
        double h2 = p.H * p.H, e1 = p.Epsilon1, e2 = p.Epsilon2, e23 = E2E3(p);
        double ps = h2 / (8 * Math.PI * Math.PI * e1) * (1 - 2 * (C + 1) * e1 - C * e2);
        double pt = 2 * h2 / (Math.PI * Math.PI) * (1 - 2 * (C + 1) * e1);
        double ns = 1 - 2 * e1 - e2 - 2 * e1 * e1 - (2 * C + 3) * e1 * e2 - C * e23;
        double nt = -2 * e1 - 2 * e1 * e1 - 2 * (C + 1) * e1 * e2;
        double r = 16 * e1 * (1 + C * e2);
        double alpha = -2 * e1 * e2 - e23;
        return new SlowRollPrediction("hubble-2", ps, pt, ns, r, nt, alpha);
    }

    /// <summary>Potential slow-roll parameters at phi, with derivatives taken in the canonical field chi (d chi/d phi = sqrt K).</summary>
    public static PotentialSlowRollParameters PotentialParameters(IInflatonTheory theory, double phi)
    {
        Jet3 v = theory.Potential(phi);
        Jet3 k = theory.Kinetic(phi);
        double sk = Math.Sqrt(k.Value);
        double vc = v.D1 / sk;
        double u = v.D2 - v.D1 * k.D1 / (2 * k.Value);          // K V_chichi
        double vcc = u / k.Value;
        double du = v.D3 - (v.D2 * k.D1 + v.D1 * k.D2) / (2 * k.Value) + v.D1 * k.D1 * k.D1 / (2 * k.Value * k.Value);
        double vccc = (du / k.Value - u * k.D1 / (k.Value * k.Value)) / sk;
        double vv = v.Value;
        return new PotentialSlowRollParameters(phi, 0.5 * (vc / vv) * (vc / vv), vcc / vv, vc * vccc / (vv * vv));
    }

    /// <summary>Potential-form estimate at phi with the potential multiplied by <paramref name="vScale"/>.</summary>
    public static SlowRollPrediction PotentialForm(IInflatonTheory theory, double phi, double vScale)
        => PotentialForm(PotentialParameters(theory, phi), vScale * theory.Potential(phi).Value);

    /// <summary>Potential-form estimate from the parameters and the scaled V: P_s = V/(24 pi^2 eps_V), P_t = 2V/(3 pi^2).</summary>
    public static SlowRollPrediction PotentialForm(PotentialSlowRollParameters q, double vScaled)
    {
        double eps = q.EpsilonV, eta = q.EtaV, xi = q.Xi2V;
        double ps = vScaled / (24 * Math.PI * Math.PI * eps);
        double pt = 2 * vScaled / (3 * Math.PI * Math.PI);
        double r = 16 * eps;
        return new SlowRollPrediction("potential", ps, pt, 1 - 6 * eps + 2 * eta, r, -r / 8, 16 * eps * eta - 24 * eps * eps - 2 * xi);
    }

    /// <summary>All three estimates for the k (background units) that leaves the horizon at N.</summary>
    public static SlowRollSet AtN(BackgroundSolution background, double n)
    {
        var p = background.At(n);
        var q = PotentialParameters(background.Theory, p.Phi);
        double vScaled = background.VScale * background.Theory.Potential(p.Phi).Value;
        return new SlowRollSet(n, background.NEnd - n, Math.Exp(n) * p.H, q, PotentialForm(q, vScaled), HubbleFirstOrder(p), HubbleSecondOrder(p));
    }

    /// <summary>
    /// All three estimates for the k that leaves the horizon at N on the adiabatic view of an n-field background: the
    /// Hubble-flow forms on the trajectory (H, epsilon_1..3 of the n-field background), and the potential form with
    /// epsilon_V = G^IJ V_I V_J/(2 V^2) and eta_V = e_sigma^I e_sigma^J nabla_I nabla_J V / V along the trajectory (xi_V^2
    /// not formed: its alpha_s is NaN). These are the single-field estimates of the adiabatic direction; they know
    /// nothing of the isocurvature and its conversion after exit.
    /// </summary>
    public static SlowRollSet AtN(AdiabaticBackground background, double n)
    {
        ArgumentNullException.ThrowIfNull(background);
        var p = background.At(n);
        var w = new FieldPoint(background.Fields.FieldCount);
        background.Evaluate(n, w, false);
        int f = w.FieldCount;
        double gg = 0, hh = 0;
        for (int i = 0; i < f; i++)
            for (int j = 0; j < f; j++)
            {
                gg += w.Inverse[i * f + j] * w.Gradient[i] * w.Gradient[j];
                hh += w.Hessian[i * f + j] * w.DPhi[i] * w.DPhi[j];
            }
        double v = w.V;
        double speed2 = 2.0 * w.Epsilon1;
        var q = new PotentialSlowRollParameters(w.Phi[0], 0.5 * gg / (v * v), speed2 > 0 ? hh / (speed2 * v) : double.NaN, double.NaN);
        return new SlowRollSet(n, background.NEnd - n, Math.Exp(n) * p.H, q, PotentialForm(q, background.VScale * v), HubbleFirstOrder(p), HubbleSecondOrder(p));
    }

    /// <summary>All three estimates for k in background units, at its horizon exit k = aH.</summary>
    public static SlowRollSet AtK(BackgroundSolution background, double kBackground)
        => AtN(background, background.NAtHorizonExit(kBackground));
}
