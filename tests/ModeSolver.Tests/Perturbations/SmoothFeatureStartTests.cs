using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Perturbations;

namespace ModeSolver.Tests.Perturbations;

/// <summary>
/// Modes that are inside the horizon while the field crosses a sharp but smooth step in V. The step excites them
/// (the ringing of the step spectrum); local vacuum data started after the step would miss that, so such modes must
/// start before it. Reference: the same mode started far deeper (k/aH = 300 at the start, well before the step), at
/// a tighter tolerance. Self-consistency check, no outside source.
/// </summary>
public class SmoothFeatureStartTests
{
    private static readonly Lazy<(BackgroundSolution Bg, double NStep)> Step = new(() =>
    {
        var e = ModelCatalogue.Get("step");
        var pars = new Dictionary<string, double>(e.DefaultParameters) { ["c"] = 2e-3 };
        var theory = TheoryFactory.Build(new ModelSpec(e.Id, e.Potential, e.Kinetic, e.Coupling, e.Palatini, pars, e.PhiEnd));
        var bg = SpectrumTests.Solve(theory, 17.0);
        // N where phi crosses phi_s = 14.7 (phi decreases): bisection.
        double a = bg.NStart, b = bg.NEnd;
        for (int i = 0; i < 200; i++)
        {
            double m = 0.5 * (a + b);
            if (bg.At(m).Phi > 14.7) a = m; else b = m;
        }
        return (bg, 0.5 * (a + b));
    });

    [Theory]
    [InlineData(8.0)]
    [InlineData(14.0)]
    [InlineData(25.0)]
    public void ModeInsideTheHorizonAtAStepStartsBeforeIt(double depthAtStep)
    {
        var (bg, nStep) = Step.Value;
        double k = depthAtStep * Math.Exp(nStep) * bg.At(nStep).H;
        var mi = new ModeIntegrator();
        var mode = mi.Solve(bg, k, new ModeSettings { Tolerance = 1e-5 });
        var reference = mi.Solve(bg, k, new ModeSettings { Tolerance = 1e-7, StartDepth = 300 });
        Assert.True(reference.NStart < nStep - 0.5, "the reference must start before the step");
        Assert.True(mode.NStart < nStep, $"mode with k/aH = {depthAtStep} at the step started at N = {mode.NStart:F3}, after the step at {nStep:F3}");
        double dev = Math.Abs(mode.Ps / reference.Ps - 1);
        Assert.True(dev < Math.Max(mode.ErrorEstimate, 2e-5), $"P_s off the deep-start reference by {dev:E2} (reported {mode.ErrorEstimate:E2})");
        Assert.True(Math.Abs(mode.Ns - reference.Ns) < 1e-3, $"n_s {mode.Ns} vs {reference.Ns}");
    }
}
