using ModeSolver.Background;
using ModeSolver.Bispectrum;
using ModeSolver.Perturbations;
using ModeSolver.Tests.Background;
using ModeSolver.Tests.Perturbations;

namespace ModeSolver.Tests.Bispectrum;

public class BispectrumTests
{
    private static Lazy<BackgroundSolution> QuadraticBackground => SpectrumTests.QuadraticBackground;

    private static double PivotK(IBackground bg, double efoldsBeforeEnd) => SpectrumTests.PivotK(bg, efoldsBeforeEnd);

    [Fact]
    public void Quadratic_EquilateralAgreesWithLeadingOrderSlowRoll()
    {
        // Maldacena 2003, JHEP 05, 013, section 4 (physics.md 8): equilateral f_NL = (55/36) e1 + (5/12) e2 at horizon exit.
        // The next-order terms are O(e_n) relative (Chen, Huang, Kachru & Shiu 2007, JCAP 01, 002, from memory): with
        // e1 = 0.009, e2 = 0.018 at N_* = 55 a few per cent; the difference found here is 2.2%. Tolerance 5%.
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 55);
        var exit = SlowRollBispectrum.AtExit(bg, k);
        double sr = SlowRollBispectrum.Equilateral(exit.Epsilon1, exit.Epsilon2);
        var r = new BispectrumSolver(bg).Solve(Triangle.Equilateral(k));
        Assert.True(Math.Abs(r.FNL / sr - 1) < 0.05, $"f_NL exact {r.FNL:G6} vs slow roll {sr:G6}");
        Assert.True(r.Error < 0.02 * Math.Abs(r.FNL), $"error estimate {r.Error:G3} of f_NL {r.FNL:G6} (early times {r.EarlyTimeError:G3}, quadrature {r.QuadratureError:G3}, start {r.StartError:G3}, end {r.EndError:G3}, tolerance {r.ToleranceError:G3})");
    }

    [Fact]
    public void Quadratic_SqueezedObeysTheConsistencyRelationWithTheExactNs()
    {
        // Maldacena's consistency relation (Maldacena 2003, section 4; Creminelli & Zaldarriaga 2004, JCAP 10, 006):
        // f_NL -> (5/12)(1 - n_s) as k3/k1 -> 0, n_s exact at the short modes. At k3/k1 = 0.01 the corrections are
        // O((k3/k1)^2) relative (common practice: the linear term cancels in the isosceles triangle) and the P1 P2
        // term of the denominator is (k3/k1)^3 small; the reported error is about 1e-4 of f_NL.
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 55);
        var mode = new ModeIntegrator().Solve(bg, k, new ModeSettings { Tolerance = 1e-9, Kinds = ModeKinds.Scalar });
        double consistency = SlowRollBispectrum.Consistency(mode.Ns);
        var r = new BispectrumSolver(bg).Solve(Triangle.Squeezed(k, 0.01));
        Assert.True(Math.Abs(r.FNL - consistency) < 2e-3 * consistency + r.Error, $"squeezed f_NL {r.FNL:G8} +- {r.Error:G2} vs (5/12)(1 - n_s) = {consistency:G8}");
        // The leading-order slow-roll form (5/12)(2 e1 + e2) at exit differs from it at second order only.
        var exit = SlowRollBispectrum.AtExit(bg, k);
        Assert.True(Math.Abs(SlowRollBispectrum.Squeezed(exit.Epsilon1, exit.Epsilon2) / consistency - 1) < 0.05);
    }

    [Fact]
    public void Quadratic_ConvergesInStartDepthQuadratureToleranceAndEndWithinTheReportedError()
    {
        // Self-consistency: each setting made more demanding moves f_NL by less than the error reported at the base.
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 55);
        Triangle[] triangles = [Triangle.Equilateral(k), new Triangle(k, 0.7 * k, 0.5 * k), Triangle.Squeezed(k, 0.05)];
        var baseSettings = new BispectrumSettings();
        var base0 = new BispectrumSolver(bg, baseSettings).Solve(triangles);
        BispectrumSettings[] variants =
        [
            baseSettings with { StartDepth = 2.0 * baseSettings.StartDepth },
            baseSettings with { StartDepth = 8.0 * baseSettings.StartDepth },
            baseSettings with { PanelPhase = 1.0, MaxPanel = 0.05 },
            baseSettings with { Tolerance = 0.01 * baseSettings.Tolerance },
            baseSettings with { EndDepth = 0.1 * baseSettings.EndDepth },
        ];
        BispectrumTests.AssertWithinError(bg, triangles, base0, variants);
    }

    /// <summary>Each variant's f_NL lies within the error reported by <paramref name="base0"/> (self-consistency of the estimate).</summary>
    internal static void AssertWithinError(IBackground bg, Triangle[] triangles, BispectrumPoint[] base0, BispectrumSettings[] variants)
    {
        foreach (var v in variants)
        {
            var other = new BispectrumSolver(bg, v).Solve(triangles);
            for (int i = 0; i < triangles.Length; i++)
                Assert.True(Math.Abs(other[i].FNL - base0[i].FNL) <= base0[i].Error,
                    $"{v}: triangle {i}: f_NL {other[i].FNL:G10} vs base {base0[i].FNL:G10} +- {base0[i].Error:G3}");
        }
    }

    [Fact]
    public void FNL_IsSymmetricUnderPermutationsOfTheSides()
    {
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 50);
        double a = k, b = 0.8 * k, c = 0.45 * k;
        Triangle[] perms = [new(a, b, c), new(a, c, b), new(b, a, c), new(b, c, a), new(c, a, b), new(c, b, a)];
        var r = new BispectrumSolver(bg, new BispectrumSettings { EstimateTolerance = false }).Solve(perms);
        for (int i = 1; i < r.Length; i++)
            Assert.True(Math.Abs(r[i].FNL - r[0].FNL) <= 1e-12 * Math.Abs(r[0].FNL), $"permutation {i}: {r[i].FNL:R} vs {r[0].FNL:R}");
    }

    [Fact]
    public void UltraSlowRoll_LocalFNLIsFiveHalves()
    {
        // Namjoo, Firouzjahi & Sasaki 2013, EPL 101, 39001: a constant-roll ultra-slow-roll phase (e2 = -6) gives the local
        // shape with f_NL = 5/2 for every triangle, while n_s = 1 (the consistency relation is violated). Here it comes
        // from the field redefinition (e2/4 + zeta'/zeta) zeta_n^2 = (-3/2 + 3) zeta_n^2; the interaction terms are O(e1).
        var bg = new UltraSlowRollBackground(1e-5, 1e-8, 40.0);
        double k = Math.Exp(12.0) * 1e-5;
        Triangle[] triangles = [Triangle.Equilateral(k), Triangle.Squeezed(k, 0.02), new Triangle(k, 0.6 * k, 0.5 * k)];
        var r = new BispectrumSolver(bg).Solve(triangles);
        foreach (var p in r)
        {
            Assert.True(Math.Abs(p.FNL - 2.5) < 1e-4, $"({p.Triangle.K1 / k:F2}, {p.Triangle.K2 / k:F2}, {p.Triangle.K3 / k:F2}): f_NL {p.FNL:R} +- {p.Error:G3}");
            Assert.True(Math.Abs(p.FNL - 2.5) <= p.Error + 1e-9, $"error estimate {p.Error:G3} does not cover {p.FNL - 2.5:G3}");
        }
    }

    [Fact]
    public void BadTriangles_AreRefusedWithOneLine()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new Triangle(1.0, 0.2, 0.3));
        Assert.Throws<ArgumentOutOfRangeException>(() => new Triangle(1.0, -1.0, 1.0));
        var bg = QuadraticBackground.Value;
        double kLate = PivotK(bg, 0.5);
        var e = Assert.Throws<ModeSolver.Physics.PhysicsException>(() => new BispectrumSolver(bg).Solve(Triangle.Equilateral(kLate)));
        Assert.Contains("end of inflation", e.Message);
    }

    [Fact]
    public void PoleKineticTerm_GivesTheBispectrumOfItsCanonicalForm()
    {
        // Kallosh, Linde & Roest 2013, JHEP 11, 198: V = phi^2/(6 alpha) with K = (1 - phi^2/(6 alpha))^-2 is the T-model
        // V = tanh^2(chi/sqrt(6 alpha)) in chi = sqrt(6 alpha) artanh(phi/sqrt(6 alpha)). The cubic action in zeta sees the
        // theory only through e1, e2, e2' and H, so the two must give the same f_NL (within the reported errors and the
        // difference of the two backgrounds, which start on their attractors from the same field value).
        double alpha = 1.0, c = Math.Sqrt(6 * alpha), chi0 = 7.5;
        var canonical = SpectrumTests.Solve(new TModel(alpha), chi0);
        var pole = SpectrumTests.Solve(new PoleTModel(alpha), c * Math.Tanh(chi0 / c));
        foreach (var (bg, name) in new[] { ((IBackground)canonical, "canonical"), (pole, "pole") })
            Assert.True(bg.NEnd > 60, $"{name}: {bg.NEnd} e-folds");
        double kc = PivotK(canonical, 55), kp = PivotK(pole, 55);
        var settings = new BispectrumSettings { EstimateTolerance = false };
        var rc = new BispectrumSolver(canonical, settings).Solve([Triangle.Equilateral(kc), Triangle.Squeezed(kc, 0.05)]);
        var rp = new BispectrumSolver(pole, settings).Solve([Triangle.Equilateral(kp), Triangle.Squeezed(kp, 0.05)]);
        for (int i = 0; i < rc.Length; i++)
            Assert.True(Math.Abs(rc[i].FNL - rp[i].FNL) <= rc[i].Error + rp[i].Error + 1e-4 * Math.Abs(rc[i].FNL),
                $"triangle {i}: canonical {rc[i].FNL:G8} +- {rc[i].Error:G2}, pole {rp[i].FNL:G8} +- {rp[i].Error:G2}");
    }
}
