using ModeSolver.Observables;

namespace ModeSolver.Tests.Observables;

public class QuadratureTests
{
    [Fact]
    public void KronrodRuleIsExactForPolynomialsToDegree22AndGaussToDegree13()
    {
        // QUADPACK QK15 (Piessens et al. 1983): the 15-point Kronrod rule integrates degree 3n+1 = 22 exactly, the
        // embedded 7-point Gauss rule degree 2n - 1 = 13.
        for (int p = 0; p <= 22; p++)
        {
            var (k, g) = AdaptiveQuadrature.Rule(x => Math.Pow(x, p), -1, 1);
            double exact = p % 2 == 0 ? 2.0 / (p + 1) : 0.0;
            Assert.True(Math.Abs(k - exact) < 1e-14, $"Kronrod x^{p}: {k} vs {exact}");
            if (p <= 13) Assert.True(Math.Abs(g - exact) < 1e-14, $"Gauss x^{p}: {g} vs {exact}");
        }
        var (k24, _) = AdaptiveQuadrature.Rule(x => Math.Pow(x, 24), -1, 1);
        Assert.True(Math.Abs(k24 - 2.0 / 25) > 1e-10, "degree 24 should not be exact");
    }

    [Fact]
    public void AdaptiveIntegralOfALogSingularityMeetsItsErrorEstimate()
    {
        // int_0^1 ln^2 x dx = 2 (elementary): an integrable singularity like the kernel's resonance.
        var r = AdaptiveQuadrature.Integrate(x => Math.Pow(Math.Log(x), 2), 0, 1, [], 1e-10);
        Assert.True(r.Converged);
        Assert.True(Math.Abs(r.Value - 2) <= r.Error && r.Error < 1e-9, $"{r.Value} +- {r.Error}");
    }

    [Fact]
    public void ExhaustedBudgetIsReportedAsNotConverged()
    {
        // int_0^1 x^(-1/2) dx = 2 (elementary) to a relative tolerance of 1e-14 needs far more than 5 intervals.
        var r = AdaptiveQuadrature.Integrate(x => 1 / Math.Sqrt(x), 0, 1, [], 1e-14, 0, maxIntervals: 5);
        Assert.False(r.Converged);
        Assert.True(r.Error > 1e-14 * Math.Abs(r.Value), $"error {r.Error}");
        Assert.True(Math.Abs(r.Value - 2) <= r.Error, $"{r.Value} +- {r.Error}");
    }
}
