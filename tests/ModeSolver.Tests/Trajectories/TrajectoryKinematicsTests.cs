using System.Collections.Immutable;
using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Models;
using ModeSolver.Tests.Background;
using ModeSolver.Trajectories;

namespace ModeSolver.Tests.Trajectories;

public class TrajectoryKinematicsTests
{
    /// <summary>
    /// The hyperbolic disk of physics.md section 7, ds^2 = d phi^2 + (3 alpha/2) sinh^2(c phi) d theta^2, c = sqrt(2/(3 alpha)),
    /// R_fs = -4/(3 alpha), with a radial potential V(phi) = m^2 phi^2 / 2 (closed-form derivatives).
    /// </summary>
    private static MetricFieldTheory RadialDisk(double alpha)
    {
        double a = 1.5 * alpha, c = Math.Sqrt(2.0 / (3.0 * alpha));
        return new MetricFieldTheory(new[] { "phi", "theta" }, p => 0.5 * p[0] * p[0],
            metric: (p, g) => { double s = Math.Sinh(c * p[0]); g[0] = 1; g[1] = 0; g[2] = 0; g[3] = a * s * s; },
            gradient: (p, g) => { g[0] = p[0]; g[1] = 0; },
            hessian: (p, h) => { h[0] = 1; h[1] = 0; h[2] = 0; h[3] = 0; },
            metricDerivative: (p, d) => { d.Clear(); d[3] = a * c * Math.Sinh(2 * c * p[0]); },
            metricSecondDerivative: (p, d) => { d.Clear(); d[3] = 2 * a * c * c * Math.Cosh(2 * c * p[0]); },
            description: "quadratic on the hyperbolic disk");
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(0.05)]
    public void HyperbolicDisk_EntropicMassGainsEpsilonTimesTheCurvature(double alpha)
    {
        // physics.md section 7 (Renaux-Petel & Turzynski 2016, PRL 117, 141301): the entropic mass carries + epsilon_1 R_fs,
        // R_fs = -4/(3 alpha) on the disk. A radial trajectory does not turn, e_s = (0, 1/sqrt(G_thth)), and by hand
        // V_;ss = -Gamma^phi_thth V_phi / G_thth = (d_phi G_thth / (2 G_thth)) V_phi = c coth(c phi) V_phi.
        var theory = RadialDisk(alpha);
        var bg = FieldBackgroundSolver.Solve(theory, new BackgroundSettings { Fields0 = new[] { 15.0, 1.0 }, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        var kin = new TrajectoryKinematics(theory);
        double c = Math.Sqrt(2.0 / (3.0 * alpha)), ricci = -4.0 / (3.0 * alpha);
        var phi = new double[2];
        var dphi = new double[2];
        for (double n = 1; n < bg.NEnd - 1; n += (bg.NEnd - 2) / 7)
        {
            var pt = bg.At(n, phi, dphi);
            var k = kin.At(bg, n);
            Assert.True(k.TurnRate < 1e-12, $"radial trajectory turns: eta_perp = {k.TurnRate:E2}");
            Assert.Equal(ricci, k.RicciScalar, 1e-9 * Math.Abs(ricci));
            double vss = c / Math.Tanh(c * phi[0]) * phi[0] / (pt.H * pt.H);
            Assert.Equal(vss, k.HessianMass, 1e-10 * vss);
            Assert.Equal(vss + pt.Epsilon1 * ricci, k.EntropicMass, 1e-9 * Math.Max(1, Math.Abs(vss)));
        }
    }

    [Fact]
    public void StraightTrajectory_HasNoTurnToRoundOff()
    {
        // Equal masses started radially stay on a ray (physics.md section 7 oracle): eta_perp = 0, and on the flat plane the
        // entropic mass is the bare m^2/H^2 (V_ss = m^2, no curvature, no turn).
        var theory = FieldBackgroundTests.DoubleQuadratic(1, 1);
        var bg = FieldBackgroundSolver.Solve(theory, new BackgroundSettings { Fields0 = new[] { 12.0, 9.0 }, Tolerance = 1e-12, EFoldsAfterEnd = 1 });
        var s = TrajectorySamples.Sample(bg, 0, bg.NStop, 101);
        for (int i = 0; i < s.N.Length; i++)
        {
            Assert.True(s.TurnRate[i] < 1e-13, $"eta_perp = {s.TurnRate[i]:E2} at N = {s.N[i]:F2}");
            double h2 = bg.At(s.N[i], new double[2], new double[2]).H;
            Assert.Equal(1 / (h2 * h2), s.EntropicMass[i], 1e-12 / (h2 * h2));
            Assert.Equal(0.0, s.RicciScalar[i]);
        }
        Assert.Empty(TrajectoryFlags.Evaluate(s, 0, bg.NEnd));
    }

    [Fact]
    public void FlatPlane_CartesianAndPolarFieldsGiveTheSameKinematics()
    {
        // Coordinate invariance (physics.md section 7): eta_perp and m_s^2/H^2 are scalars, so the double quadratic in
        // Cartesian and in polar fields gives the same values along the same trajectory (to the integration and the
        // numerical-Hessian accuracy of the polar form).
        const double m1 = 1, m2 = 2.5;
        double x0 = 10, y0 = 6;
        var cart = FieldBackgroundTests.DoubleQuadratic(m1, m2);
        var polar = FieldBackgroundTests.PolarDoubleQuadratic(m1, m2, closedForm: true);
        var bc = FieldBackgroundSolver.Solve(cart, new BackgroundSettings { Fields0 = new[] { x0, y0 }, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        var bp = FieldBackgroundSolver.Solve(polar, new BackgroundSettings { Fields0 = new[] { Math.Sqrt(x0 * x0 + y0 * y0), Math.Atan2(y0, x0) }, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        var kc = new TrajectoryKinematics(cart);
        var kp = new TrajectoryKinematics(polar);
        double worstTurn = 0;
        for (double n = 0.5; n < bc.NEnd - 0.2; n += (bc.NEnd - 0.7) / 23)
        {
            var a = kc.At(bc, n);
            var b = kp.At(bp, n);
            Assert.Equal(a.TurnRate, b.TurnRate, 1e-7 * Math.Max(1, a.TurnRate));
            Assert.Equal(a.EntropicMass, b.EntropicMass, 1e-7 * Math.Max(1, Math.Abs(a.EntropicMass)));
            Assert.True(Math.Abs(b.RicciScalar) < 1e-6, $"flat plane in polar fields: R_fs = {b.RicciScalar:E2}");
            worstTurn = Math.Max(worstTurn, a.TurnRate);
        }
        Assert.True(worstTurn > 0.05, $"the trajectory should turn (largest eta_perp {worstTurn:F3})");
    }

    private static TrajectorySamples Synthetic(double[] n, double[] turn, double[] mass, double[] e1, double[] ricci)
        => new(ImmutableArray.Create("a", "b"), n.ToImmutableArray(), new double[2 * n.Length].ToImmutableArray(),
            new double[2 * n.Length].ToImmutableArray(), e1.ToImmutableArray(), turn.ToImmutableArray(), mass.ToImmutableArray(),
            ricci.ToImmutableArray(), n[^1]);

    [Fact]
    public void Flags_MarkALightTurningEntropicDirectionAndANegativeMass()
    {
        var n = Enumerable.Range(0, 61).Select(i => (double)i).ToArray();
        // Turning (0.05) from N = 10 to 30; light (m_s^2/H^2 = 0.5) from N = 20 to 40; negative from N = 45 to 50 by curvature.
        var turn = n.Select(x => x >= 10 && x <= 30 ? 0.05 : 0.001).ToArray();
        var mass = n.Select(x => x >= 45 && x <= 50 ? -0.4 : x >= 20 && x <= 40 ? 0.5 : 5.0).ToArray();
        var e1 = n.Select(_ => 0.01).ToArray();
        var ricci = n.Select(x => x >= 45 && x <= 50 ? -100.0 : 0.0).ToArray();
        var flags = TrajectoryFlags.Evaluate(Synthetic(n, turn, mass, e1, ricci), 0, 60);
        var light = Assert.Single(flags, f => f.Kind == FlagKinds.LightEntropicTurn);
        Assert.InRange(light.Lower, 19, 20);
        Assert.InRange(light.Upper, 30, 31);
        var unstable = Assert.Single(flags, f => f.Kind == FlagKinds.EntropicInstability);
        Assert.InRange(unstable.Lower, 44, 45);
        Assert.InRange(unstable.Upper, 50, 51);
        Assert.Contains("geometrical destabilisation", unstable.Message);
        Assert.Equal(-0.4, unstable.Exact);
        // A window that ends before the light range sees nothing.
        Assert.Empty(TrajectoryFlags.Evaluate(Synthetic(n, turn, mass, e1, ricci), 0, 15));
        foreach (var f in flags) Assert.DoesNotContain('\n', f.Message);
    }

    [Fact]
    public void StronglyCurvedDisk_IsFlaggedAsGeometricallyDestabilised()
    {
        // Renaux-Petel & Turzynski 2016 (PRL 117, 141301): on a negatively curved field space the term epsilon_1 R_fs can make
        // the entropic mass negative although the potential's V_;ss is positive. On the disk with alpha = 0.002 (R_fs = -667)
        // and V = phi^2/2 the ratio epsilon_1 |R_fs| / (V_;ss/H^2) grows like 1/phi along the run (by hand, with the values of
        // the disk test above), so m_s^2 turns negative before the end.
        var theory = RadialDisk(0.002);
        var bg = FieldBackgroundSolver.Solve(theory, new BackgroundSettings { Fields0 = new[] { 15.0, 1.0 }, Tolerance = 1e-10, EFoldsAfterEnd = 0 });
        var s = TrajectorySamples.Sample(bg, 0, bg.NEnd, 200);
        Assert.True(s.EntropicMass[0] > 0, $"m_s^2/H^2 = {s.EntropicMass[0]:F3} at the start");
        var flag = Assert.Single(TrajectoryFlags.Evaluate(s, 0, bg.NEnd));
        Assert.Equal(FlagKinds.EntropicInstability, flag.Kind);
        Assert.Contains("geometrical destabilisation", flag.Message);
        Assert.True(flag.Lower > 1 && flag.Upper <= bg.NEnd, flag.Where);
    }

    [Fact]
    public void EntropicMass_IsTheModeEquationsMassProjectedOnTheNormal()
    {
        // physics.md section 7: e_s M e_s / H^2 of the mode equation is V_;ss/H^2 - e_sI R^I_KLJ phi'^K phi'^L e_s^J (the
        // bracket terms vanish on e_s); the kinematics' m_s^2/H^2 + eta_perp^2 must equal it, with the theory's own Riemann
        // tensor in the IFieldTheory convention. A turning trajectory on the disk (angular potential), numerical derivatives.
        const double alpha = 0.5;
        double a = 1.5 * alpha, c = Math.Sqrt(2.0 / (3.0 * alpha));
        var theory = new MetricFieldTheory(new[] { "phi", "theta" },
            p => { double t = Math.Tanh(p[0] / Math.Sqrt(6 * alpha)); return t * t * (1 + 0.3 * Math.Cos(p[1])); },
            metric: (p, g) => { double sh = Math.Sinh(c * p[0]); g[0] = 1; g[1] = 0; g[2] = 0; g[3] = a * sh * sh; });
        var bg = FieldBackgroundSolver.Solve(theory, new BackgroundSettings { Fields0 = new[] { 5.0, 1.2 }, Tolerance = 1e-10, EFoldsAfterEnd = 0 });
        var kin = new TrajectoryKinematics(theory);
        double worstTurn = 0;
        for (double n = 1; n < bg.NEnd - 1; n += (bg.NEnd - 2) / 6)
        {
            var k = kin.At(bg, n);
            var p = kin.Point;
            double speed = Math.Sqrt(2 * p.Epsilon1);
            // e_s = G^-1-rotated velocity: e_s^I = eps^IJ phi'_J / sqrt(det G), normalised (2-D).
            double l0 = p.Metric[0] * p.DPhi[0] + p.Metric[1] * p.DPhi[1], l1 = p.Metric[2] * p.DPhi[0] + p.Metric[3] * p.DPhi[1];
            double[] es = { l1, -l0 };
            double norm = Math.Sqrt(p.Dot(es, es));
            es[0] /= norm; es[1] /= norm;
            double vss = 0, riem = 0;
            for (int i = 0; i < 2; i++)
                for (int j = 0; j < 2; j++)
                {
                    vss += es[i] * es[j] * p.Hessian[i * 2 + j];
                    double lowered = p.Metric[i * 2] * es[0] + p.Metric[i * 2 + 1] * es[1]; // e_sI
                    for (int kk = 0; kk < 2; kk++)
                        for (int l = 0; l < 2; l++)
                            riem += lowered * p.Riemann[((i * 2 + kk) * 2 + l) * 2 + j] * p.DPhi[kk] * p.DPhi[l] * es[j];
                }
            double projected = vss / (p.H * p.H) - riem;
            Assert.Equal(projected, k.EntropicMass + k.TurnRate * k.TurnRate, 1e-6 * Math.Max(1, Math.Abs(projected)));
            Assert.Equal(0.0, p.Dot(es, p.DPhi) / speed, 1e-12);
            worstTurn = Math.Max(worstTurn, k.TurnRate);
        }
        Assert.True(worstTurn > 1e-3, $"the trajectory should turn (largest eta_perp {worstTurn:E2})");
    }

    [Fact]
    public void DeltaNDisagreement_IsFlaggedBeyondTheErrorsAndTheAllowanceOnly()
    {
        // delta N's P_zeta for the double quadratic at N = 2 set against a "modes" value 10% off (beyond the allowance of a
        // few percent) and against delta N's own value: one flag, then none.
        var settings = new BackgroundSettings { Fields0 = new[] { 13.0, 8.0 }, Tolerance = 1e-12, EFoldsAfterEnd = 1 };
        var bg = FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(1, 2), settings);
        var raw = ModeSolver.Estimates.DeltaN.Compute(bg, settings, 2.0);
        var off = TrajectoryFlags.DeltaNAgreement(raw, 1.1 * raw.Pzeta, 0, 1.0, 0.05, 0.05);
        Assert.NotNull(off);
        Assert.Equal(FlagKinds.DeltaNDisagreement, off!.Kind);
        Assert.Equal(raw.Pzeta, off.SlowRoll);
        Assert.DoesNotContain('\n', off.Message);
        Assert.Null(TrajectoryFlags.DeltaNAgreement(raw, 1.04 * raw.Pzeta, 0, 1.0, 0.05, 0.05));
        Assert.Null(TrajectoryFlags.DeltaNAgreement(raw, raw.Pzeta, 0, 1.0, 0.0, 0.05));
    }
}
