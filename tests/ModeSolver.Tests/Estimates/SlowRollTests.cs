using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Tests.Background;
using ModeSolver.Estimates;

namespace ModeSolver.Tests.Estimates;

public class SlowRollTests
{
    [Theory]
    [InlineData(1.0, 7.3)]
    [InlineData(0.1, 3.2)]
    public void PlateauAttractorsApproachTheLargeNLimit(double alpha, double phi0)
    {
        // Kallosh, Linde & Roest 2013 (physics.md 4d): n_s -> 1 - 2/N, r -> 12 alpha/N^2 as N grows. The corrections are
        // O(ln N / N^2) in n_s (the ln N comes from the O(eta) correction to the attractor velocity, integrated over N) and
        // O(1/N) relative in r. Measured here: N^2 (n_s - 1 + 2/N) = 0.46, 0.06 (alpha = 1) and -0.14, -0.60 (alpha = 0.1)
        // at N = 50, 100, so for alpha = 0.1 the deviation only starts to fall beyond N = 100; we check |dn| < 1/N^2 and
        // |dr/r| < 2/N at N = 50, 100, 140 and that both deviations are smaller at N = 140 than at N = 50.
        var bg = BackgroundSolverTests.Solve(new TModel(alpha), phi0, after: 0);
        Assert.True(bg.NTotal > 145, $"N_total = {bg.NTotal}");
        double dn50 = 0, dr50 = 0;
        foreach (double nStar in new[] { 50.0, 100.0, 140.0 })
        {
            var sr = SlowRoll.AtN(bg, bg.NEnd - nStar).SecondOrder;
            double dn = Math.Abs(sr.Ns - (1 - 2 / nStar));
            double dr = Math.Abs(sr.R / (12 * alpha / (nStar * nStar)) - 1);
            Assert.True(dn < 1 / (nStar * nStar), $"alpha {alpha} N {nStar}: n_s = {sr.Ns}, deviation {dn}");
            Assert.True(dr < 2 / nStar, $"alpha {alpha} N {nStar}: r = {sr.R}, relative deviation {dr}");
            if (nStar == 50) { dn50 = dn; dr50 = dr; }
            if (nStar == 140) { Assert.True(dn < dn50, $"{dn} vs {dn50}"); Assert.True(dr < dr50, $"{dr} vs {dr50}"); }
        }
    }

    [Fact]
    public void PowerLawSlowRollSeries()
    {
        // Power law (physics.md 4a): exact n_s - 1 = n_t = 3 - 2 nu = -2 e1/(1 - e1) and r = 16 e1. With e2 = 0 the second-order
        // Hubble-flow n_s - 1 = -2 e1 - 2 e1^2 agrees to O(e1^3); the potential form gives eps_V = lambda^2/2 = e1.
        const double lambda = 0.2;
        var bg = BackgroundSolverTests.Solve(new Exponential(lambda), 0, phiEnd: 8);
        var set = SlowRoll.AtN(bg, 20);
        double e1 = lambda * lambda / 2;
        double exact = -2 * e1 / (1 - e1);
        Assert.Equal(exact, set.SecondOrder.Ns - 1, 3 * e1 * e1 * e1);
        Assert.Equal(exact, set.SecondOrder.Nt, 3 * e1 * e1 * e1);
        Assert.Equal(16 * e1, set.SecondOrder.R, 1e-8);
        Assert.Equal(e1, set.Parameters.EpsilonV, 1e-14);
        Assert.Equal(lambda * lambda, set.Parameters.EtaV, 1e-14);
        Assert.Equal(1 - 6 * e1 + 2 * lambda * lambda, set.Potential.Ns, 1e-14);
        Assert.Equal(-set.Potential.R / 8, set.Potential.Nt, 1e-15);
    }

    [Fact]
    public void PotentialFormIsInvariantUnderFieldRedefinition()
    {
        // physics.md section 1: derivatives in the canonical field. The pole kinetic term with V = phi^2/(6 alpha) is the T-model
        // in chi (Kallosh, Linde & Roest 2013), so eps_V, eta_V, xi2_V agree at mapped field values.
        const double alpha = 0.5;
        double c = Math.Sqrt(6 * alpha);
        foreach (double chi in new[] { 0.7, 2.0, 4.5 })
        {
            var a = SlowRoll.PotentialParameters(new TModel(alpha), chi);
            var b = SlowRoll.PotentialParameters(new PoleTModel(alpha), c * Math.Tanh(chi / c));
            Assert.Equal(a.EpsilonV, b.EpsilonV, 1e-12 * Math.Max(1, a.EpsilonV));
            Assert.Equal(a.EtaV, b.EtaV, 1e-11);
            Assert.Equal(a.Xi2V, b.Xi2V, 1e-10);
        }
    }
}
