using ModeSolver.Bispectrum;
using ModeSolver.Tests.Background;
using ModeSolver.Tests.Perturbations;
using Xunit.Abstractions;

namespace ModeSolver.Tests.Bispectrum;

public class BispectrumKinkTests(ITestOutputHelper log)
{
    [Fact]
    public void LinearKink_SuperHorizonModesDoNotSeeTheJumpOfEpsilon2()
    {
        // Linear potential with a change of slope (Starobinsky 1992, JETP Lett. 55, 489; the model of Arroja, Romano &
        // Sasaki 2011, PRD 84, 123503): at the kink e2 jumps by several (the field brakes into an ultra-slow-roll transient).
        // For a mode far outside the horizon there (k = k0/100), zeta is frozen, so f_NL must not depend on whether the
        // integral ends before or after the kink: ended after it, the field redefinition (e2/4) zeta^2 changes by
        // (5/12) Delta e2 ~ -2 in f_NL, and the e2' term (the jump as a delta function) must cancel it, up to the
        // super-horizon evolution of zeta, O((k/k0)^2) (common practice).
        var bg = SpectrumTests.Solve(new LinearKink(1, 2e-3, 2e-4, 0.0), 0.022, phiEnd: -0.0035);
        double nk = Assert.Single(bg.NonSmoothTimes);
        double k0 = Math.Exp(nk) * bg.At(nk).H;
        double jump = bg.At(nk + 1e-9).Epsilon2 - bg.At(nk - 1e-9).Epsilon2;
        Assert.True(jump < -1, $"e2 jumps by {jump:G3}");
        double k = 0.01 * k0;
        var after = new BispectrumSolver(bg, new BispectrumSettings { EndDepth = 0.008 }).Solve(Triangle.Equilateral(k));
        var before = new BispectrumSolver(bg, new BispectrumSettings { EndDepth = 0.02 }).Solve(Triangle.Equilateral(k));
        double e2End = bg.At(HorizonExitAt(bg, k / 0.008)).Epsilon2;
        foreach (var r in new[] { after, before })
            log.WriteLine($"f_NL {r.FNL:G6}: early {r.EarlyTimeError:G3} start {r.StartError:G3} end {r.EndError:G3} quadrature {r.QuadratureError:G3} tolerance {r.ToleranceError:G3}");
        log.WriteLine($"jump {jump:G4}, e2 at the later end {e2End:G4}; f_NL ended after the kink {after.FNL:G6} +- {after.Error:G2}, before {before.FNL:G6} +- {before.Error:G2}");
        Assert.True(Math.Abs(5.0 / 12.0 * e2End) > 0.3, "the redefinition term alone would move f_NL by order one");
        Assert.True(Math.Abs(after.FNL - before.FNL) < 1e-4 + after.Error + before.Error,
            $"f_NL ended after the kink {after.FNL:G6} +- {after.Error:G2}, before it {before.FNL:G6} +- {before.Error:G2}");
    }

    private static double HorizonExitAt(ModeSolver.Background.IBackground bg, double k) => ModeSolver.Background.HorizonExit.Find(bg, k);
}
