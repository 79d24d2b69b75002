using ModeSolver.Integrators;

namespace ModeSolver.Tests.Integrators;

public class AutoSwitchingTests
{
    [Fact]
    public void SwitchesBothWaysOnANonStiffStiffNonStiffProblem()
    {
        // Exact solution y = cos t (Prothero-Robinson type problem, Hairer and Wanner II, sec. IV.15); stiff
        // (lambda ~ 1e5) on about [2.5, 7.5] only. Observed at rtol 1e-8: switches at t = 1.94 and 9.71,
        // 117 accepted and 67 rejected steps, final error 7e-10.
        var opts = new OdeOptions
        {
            RelativeTolerance = 1e-8,
            AbsoluteTolerance = 1e-8,
            Events = new[] { new EventSpec((t, y) => y[0], Name: "cos = 0") },
        };
        var sol = new AutoSwitching().Solve(TestProblems.BumpProblem(), opts);
        var s = sol.Statistics;
        Assert.Equal(OdeStatus.Completed, sol.Status);
        Assert.True(s.MethodSwitches >= 2, $"{s.MethodSwitches} switches");
        Assert.True(s.AcceptedSteps + s.RejectedSteps < 500, s.ToString());
        Assert.True(s.JacobianEvaluations > 0);
        Assert.True(Math.Abs(sol.FinalState[0] - Math.Cos(12.0)) < 1e-8);
        // every step end is accurate, in both phases (worst observed 1.3e-7, on a step of length 1 in the stiff phase)
        foreach (double t in sol.StepTimes) Assert.True(Math.Abs(sol.Evaluate(t, 0) - Math.Cos(t)) < 5e-7, $"t = {t}");
        // dense output between steps in the non-stiff phases (the implicit phase interpolates with the cubic
        // collocation polynomial over long steps: accurate at the step ends, ~1e-3 in between; see the notes)
        for (double t = 0.01; t < 1.5; t += 0.037) Assert.True(Math.Abs(sol.Evaluate(t, 0) - Math.Cos(t)) < 1e-7);
        for (double t = 10.01; t < 12; t += 0.037) Assert.True(Math.Abs(sol.Evaluate(t, 0) - Math.Cos(t)) < 1e-7);
        // events from both methods, in time order: pi/2 (explicit), 3pi/2 and 5pi/2 (implicit), 7pi/2 (explicit)
        Assert.Equal(4, sol.Events.Count);
        Assert.True(Math.Abs(sol.Events[0].T - Math.PI / 2) < 1e-8);
        Assert.True(Math.Abs(sol.Events[1].T - 3 * Math.PI / 2) < 1e-2);
        Assert.True(Math.Abs(sol.Events[2].T - 5 * Math.PI / 2) < 1e-2);
        Assert.True(Math.Abs(sol.Events[3].T - 7 * Math.PI / 2) < 1e-8);
        Assert.True(sol.Events[1].Rising && !sol.Events[2].Rising);

        // DOP853 alone is held to |h lambda| < ~6 in the stiff phase and runs out of a 20000-step budget.
        var ex = Assert.Throws<IntegrationException>(() => new DormandPrince853().Solve(TestProblems.BumpProblem(),
            opts with { MaxSteps = 20000, Events = Array.Empty<EventSpec>(), DenseOutput = false }));
        Assert.Equal(IntegrationFailure.StepBudgetExhausted, ex.Failure);
    }

    [Fact]
    public void VanDerPolWithModestWork()
    {
        // Reference: our RadauIIA5 at rtol 1e-12 (see RadauIIA5Tests), y(2) = (1.7061674375419684, -0.8928100165524112).
        // Observed at rtol 1e-8: 5 switches (DOP853 through the fast jumps), 441 accepted steps vs 1019 for RadauIIA5.
        var sol = new AutoSwitching().Solve(TestProblems.VanDerPolProblem(),
            new OdeOptions { RelativeTolerance = 1e-8, AbsoluteTolerance = 1e-8 });
        var y = sol.FinalState;
        Assert.True(Math.Abs(y[0] - 1.7061674375419684) < 1e-7 && Math.Abs(y[1] + 0.8928100165524112) < 1e-7,
            $"y = ({y[0]:R}, {y[1]:R})");
        Assert.True(sol.Statistics.MethodSwitches >= 2);
        Assert.InRange(sol.Statistics.AcceptedSteps, 100, 1200);
    }

    [Fact]
    public void RobertsonWithModestWork()
    {
        // Bari test set reference (Mazzia and Magherini), from memory: y(1e11) = (2.083340149701255e-8,
        // 8.333360770334713e-14, 0.9999999791665050). Observed: one switch at t = 0.06, 1199 accepted steps.
        int observed = 0;
        var sol = new AutoSwitching().Solve(TestProblems.RobertsonProblem(withJacobian: false),
            new OdeOptions { RelativeTolerance = 1e-10, AbsoluteTolerance = 1e-16, DenseOutput = false, Observer = (t, y) => { observed++; return false; } });
        var y = sol.FinalState;
        Assert.True(Math.Abs(y[0] / 2.083340149701255e-8 - 1) < 1e-7, $"y1 = {y[0]:R}");
        Assert.True(Math.Abs(y[1] / 8.333360770334713e-14 - 1) < 1e-7, $"y2 = {y[1]:R}");
        Assert.True(Math.Abs(y[0] + y[1] + y[2] - 1) < 1e-14);
        Assert.True(sol.Statistics.MethodSwitches >= 1);
        Assert.InRange(sol.Statistics.AcceptedSteps, 300, 2500);
        Assert.Equal(sol.Statistics.AcceptedSteps, observed);
    }

    [Fact]
    public void NonStiffProblemStaysExplicit()
    {
        // Arenstorf orbit (Hairer, Norsett and Wanner I, sec. II.0): no switch, same result as DOP853 alone.
        var opts = new OdeOptions { RelativeTolerance = 1e-10, AbsoluteTolerance = 1e-10, DenseOutput = false };
        var auto = new AutoSwitching().Solve(TestProblems.ArenstorfProblem(), opts);
        var dop = new DormandPrince853().Solve(TestProblems.ArenstorfProblem(), opts);
        Assert.Equal(0, auto.Statistics.MethodSwitches);
        Assert.Equal(dop.FinalState, auto.FinalState);
        Assert.Equal(0, auto.Statistics.JacobianEvaluations);
    }
}
