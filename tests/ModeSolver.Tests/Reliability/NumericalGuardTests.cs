using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Perturbations;
using ModeSolver.Physics;
using ModeSolver.Pipeline;

namespace ModeSolver.Tests.Reliability;

/// <summary>NaN or infinity in the background or a mode stops the run with a one-line error saying where (N, k, state).</summary>
public class NumericalGuardTests
{
    /// <summary>V = 1 + phi/10 above phi = 3 and NaN below (as sqrt of a negative number would give); no valid range set.</summary>
    private sealed class NaNBelowThree : IInflatonTheory
    {
        public string Description => "linear, NaN below phi = 3";
        public Jet3 Potential(double phi) => phi >= 3 ? new(1 + 0.1 * phi, 0.1, 0, 0) : new(double.NaN, double.NaN, double.NaN, double.NaN);
        public Jet3 Kinetic(double phi) => new(1, 0, 0, 0);
        public bool IsCanonical => true;
        public IReadOnlyList<double> NonSmoothPoints => [];
        public (double Min, double Max) ValidRange => (double.NegativeInfinity, double.PositiveInfinity);
    }

    [Fact]
    public void BackgroundThatMeetsNaNNamesNAndPhi()
    {
        // On the slow-roll attractor phi' = -V_phi/V the field takes about 76 e-folds from 8 to 3.
        var ex = Assert.Throws<PhysicsException>(() => BackgroundSolver.Solve(new NaNBelowThree(), new BackgroundSettings { Phi0 = 8 }));
        Assert.DoesNotContain("\n", ex.Message);
        Assert.Contains("the model is not finite there (V = NaN", ex.Message);
        Assert.Matches(@"at N = 7\d\.\d+, phi = 3(\.0+\d*)?, dphi/dN = -0\.07", ex.Message);
    }

    /// <summary>An exact power-law background whose H turns NaN from <paramref name="nBad"/> on.</summary>
    private sealed class BrokenBackground(PowerLawBackground inner, double nBad) : IBackground
    {
        public double NStart => inner.NStart;
        public double NStop => inner.NStop;
        public double NEnd => inner.NEnd;
        public IReadOnlyList<double> EndCrossings => inner.EndCrossings;
        public IReadOnlyList<double> NonSmoothTimes => inner.NonSmoothTimes;
        public double VScale => inner.VScale;
        public BackgroundPoint At(double n) => n < nBad ? inner.At(n) : inner.At(n) with { H = double.NaN };
    }

    [Fact]
    public void ModeThatMeetsNaNNamesKAndN()
    {
        var clean = new PowerLawBackground(0.1, 1e-5, 60);
        double k = 1e-5 * Math.Exp(20 * (1 - clean.Epsilon1)); // leaves the horizon at N = 20
        var bg = new BrokenBackground(clean, 20.5);
        var ex = Assert.Throws<PhysicsException>(() => new ModeIntegrator().Solve(bg, k, new ModeSettings { Tolerance = 1e-6 }));
        Assert.DoesNotContain("\n", ex.Message);
        Assert.StartsWith($"mode k = {k:G6}: the integration broke down at N = 20.5", ex.Message);
        Assert.Contains("phi = ", ex.Message);
    }

    [Fact]
    public void ModeWithNaNInitialDataNamesN()
    {
        var clean = new PowerLawBackground(0.1, 1e-5, 60);
        double k = 1e-5 * Math.Exp(20 * (1 - clean.Epsilon1));
        var bg = new BrokenBackground(clean, 0.0); // H is NaN everywhere
        var ex = Assert.ThrowsAny<Exception>(() => new ModeIntegrator().Solve(bg, k, new ModeSettings { Tolerance = 1e-6 }));
        Assert.IsType<PhysicsException>(ex);
        Assert.DoesNotContain("\n", ex.Message);
        Assert.Contains($"mode k = {k:G6}", ex.Message);
    }

    [Fact]
    public void PowerLawBackgroundHasFiniteEpsilon3AndAnExactPivot()
    {
        // Exponential potential on its attractor: epsilon_2 = 0 exactly, so epsilon_3 = d ln|epsilon_2|/dN was 0/0 (NaN)
        // and the pivot mode could not start. Power law (Lucchin & Matarrese 1985, Phys. Rev. D 32, 1316; Lyth & Stewart
        // 1992, Phys. Lett. B 274, 168; physics.md 4a): n_s - 1 = 3 - 2 nu = -2 e1/(1 - e1), r = 16 e1, e1 = lambda^2/2.
        var settings = SettingsResolver.Resolve(new RunInput { ModelId = new Located<string>("exponential", "test") });
        var run = SpectrumPipeline.RunPivot(settings);
        double e1 = 0.5 * 0.1 * 0.1;
        var p = run.Pivot.Background.At(run.Pivot.NPivot);
        Assert.Equal(0.0, p.Epsilon2, 1e-9);
        Assert.True(double.IsFinite(p.Epsilon3));
        Assert.Equal(-2 * e1 / (1 - e1), run.Exact.Ns - 1, 1e-5);
        Assert.Equal(16 * e1, run.Exact.R, 16 * e1 * 1e-4);
        Assert.True(double.IsFinite(run.SlowRoll.SecondOrder.Ns));
    }

    [Fact]
    public void FieldLeavingTheValidRangeAfterTheEndOnlyShortensTheContinuation()
    {
        // V = sqrt(phi - 5): inflation ends near phi = 5 (slow roll puts it at 5 + 1/sqrt(8)); the field then reaches
        // phi = 5, where the model stops being defined. That is after the end: the background is still usable.
        var settings = SettingsResolver.Resolve(new RunInput
        {
            Potential = new Located<string>("sqrt(phi - 5)", "test"),
            Phi0 = new Located<double>(9, "test"),
        });
        var theory = TheoryFactory.Build(settings);
        var bg = BackgroundSolver.Solve(theory, SpectrumPipeline.BackgroundSettingsFor(settings));
        Assert.Equal(1.0, bg.At(bg.NEnd).Epsilon1, 1e-8);
        Assert.True(bg.At(bg.NEnd).Phi > 5.05);
        Assert.True(bg.NStop > bg.NEnd);
        Assert.Equal(5.0, bg.At(bg.NStop).Phi, 1e-6);
    }
}
