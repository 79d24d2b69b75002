using ModeSolver.Background;
using ModeSolver.Bispectrum;
using ModeSolver.Models;
using ModeSolver.Tests.Background;
using ModeSolver.Tests.Perturbations;

namespace ModeSolver.Tests.Bispectrum;

/// <summary>V = m^2 phi^2 / 2 (1 + c tanh((phi - phi_s)/d)) with exact derivatives (the step demo's model).</summary>
internal sealed class TanhStep(double c, double phiS, double d) : CanonicalTheory
{
    public override string Description => $"step c = {c}, phi_s = {phiS}, d = {d}";
    public override Jet3 Potential(double phi)
    {
        double t = Math.Tanh((phi - phiS) / d), s = 1 - t * t;
        double t1 = s / d, t2 = -2 * t * s / (d * d), t3 = s * (6 * t * t - 2) / (d * d * d);
        double g = 1 + c * t, m2 = 1e-10;
        return new(0.5 * m2 * phi * phi * g, m2 * phi * g + 0.5 * m2 * phi * phi * c * t1,
            m2 * g + 2 * m2 * phi * c * t1 + 0.5 * m2 * phi * phi * c * t2,
            3 * m2 * c * t1 + 3 * m2 * phi * c * t2 + 0.5 * m2 * phi * phi * c * t3);
    }
}

public class BispectrumFeatureTests
{
    [Fact]
    public void Step_ConvergesInQuadratureStartDepthAndToleranceWithinTheReportedError()
    {
        // Self-consistency on a fast feature (a 0.1% step about 0.15 e-folds wide): f_NL of the modes that ring is of
        // order one, far from slow roll; finer panels, a deeper start (2x, 8x) and a tighter tolerance each move it
        // by less than the error reported at the defaults.
        var bg = SpectrumTests.Solve(new TanhStep(1e-3, 15.3, 0.02), 17.0);
        double nStep = 0;
        for (double n = bg.NStart; n < bg.NEnd; n += 0.01)
            if (bg.At(n).Phi < 15.3) { nStep = n; break; }
        Assert.True(nStep > 0);
        double k = Math.Exp(nStep + 1.5) * bg.At(nStep + 1.5).H; // leaves the horizon 1.5 e-folds after the step: it rings
        Triangle[] triangles = [Triangle.Equilateral(k), new Triangle(k, 0.8 * k, 0.5 * k)];
        var baseSettings = new BispectrumSettings();
        var base0 = new BispectrumSolver(bg, baseSettings).Solve(triangles);
        Assert.True(Math.Abs(base0[0].FNL) > 0.3, $"equilateral f_NL {base0[0].FNL:G4}: the feature should be visible");
        BispectrumSettings[] variants =
        [
            baseSettings with { PanelPhase = 1.0, MaxPanel = 0.02 },
            baseSettings with { StartDepth = 2.0 * baseSettings.StartDepth },
            baseSettings with { StartDepth = 8.0 * baseSettings.StartDepth },
            baseSettings with { Tolerance = 0.01 * baseSettings.Tolerance },
        ];
        BispectrumTests.AssertWithinError(bg, triangles, base0, variants);
    }
}
