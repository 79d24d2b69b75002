using ModeSolver.Background;
using ModeSolver.Physics;

namespace ModeSolver.Tests.Background;

public class BackgroundErrorTests
{
    private static PhysicsException Fails(Action a) => Assert.Throws<PhysicsException>(a);

    [Fact]
    public void NeverEnds()
    {
        var ex = Fails(() => BackgroundSolverTests.Solve(new Exponential(0.3), 0, maxEFolds: 100));
        Assert.Contains("does not end within 100 e-folds", ex.Message);
        Assert.DoesNotContain("\n", ex.Message);
    }

    [Fact]
    public void KineticStartTooLarge()
    {
        var ex = Fails(() => BackgroundSolverTests.Solve(new Quadratic(), 15, dphi0: -2.5));
        Assert.Contains("epsilon_1 = 3.125 >= 3 at the start", ex.Message);
    }

    [Fact]
    public void PotentialNotPositiveAtStart()
    {
        var ex = Fails(() => BackgroundSolverTests.Solve(new StepToNegative(), 1.5));
        Assert.Contains("V <= 0", ex.Message);
    }

    [Fact]
    public void PotentialStepsBelowZeroDuringInflation()
    {
        // Rolls from phi = 0.5 towards larger phi (V_phi < 0) and meets the step to V = -1 at phi = 1.
        var ex = Fails(() => BackgroundSolverTests.Solve(new StepToNegative(), 0.5));
        Assert.Contains("V <= 0 reached during inflation", ex.Message);
        Assert.Contains("phi = 1", ex.Message);
    }

    [Fact]
    public void NonFiniteStateIsWrapped()
    {
        var ex = Fails(() => BackgroundSolverTests.Solve(new NaNBeyond(), 1.9));
        Assert.Contains("broke down", ex.Message);
        Assert.Contains("at N = ", ex.Message);
    }

    [Fact]
    public void OutsideValidRange()
    {
        var ex = Fails(() => BackgroundSolverTests.Solve(new PoleTModel(1.0), 3.0));
        Assert.Contains("outside the theory's valid range", ex.Message);
    }

    [Fact]
    public void MissingEndCrossing()
    {
        var ex = Fails(() => BackgroundSolver.Solve(new Quadratic(), new BackgroundSettings { Phi0 = 10, EndCrossing = 3 }));
        Assert.Contains("end-crossing choice 3 does not exist", ex.Message);
    }
}
