using ModeSolver.Integrators;

namespace ModeSolver.Tests.Integrators;

public class AllocationTests
{
    [Theory]
    [InlineData("DOP853")]
    [InlineData("RadauIIA5")]
    [InlineData("AutoSwitching")]
    public void AllocatesNothingPerStepWithoutDenseOutput(string name)
    {
        // Work arrays are allocated once per Solve: a run 100 times longer allocates (almost) the same bytes.
        var method = EventTests.Create(name);
        var opts = new OdeOptions { DenseOutput = false, RelativeTolerance = 1e-10, Observer = (t, y) => false };
        method.Solve(new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 1.0), opts); // warm-up (JIT)
        long Measure(double tEnd, out int steps)
        {
            var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, tEnd);
            long before = GC.GetAllocatedBytesForCurrentThread();
            var sol = method.Solve(p, opts);
            long after = GC.GetAllocatedBytesForCurrentThread();
            steps = sol.Statistics.AcceptedSteps;
            return after - before;
        }
        long shortRun = Measure(10.0, out int fewSteps);
        long longRun = Measure(1000.0, out int manySteps);
        Assert.True(manySteps > 25 * fewSteps, $"{manySteps} vs {fewSteps} steps");
        // Any allocation per step costs at least 24 bytes (the smallest object), so growth below one byte per extra step
        // rules out per-step allocation while leaving room for the runtime's own one-off allocations on this thread
        // (tiered re-compilation of the hot loop under load allocated a few hundred bytes once).
        Assert.True(longRun - shortRun < manySteps - fewSteps, $"allocation grew by {longRun - shortRun} bytes over {manySteps - fewSteps} extra steps");
    }
}
