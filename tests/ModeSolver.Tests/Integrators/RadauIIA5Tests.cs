using ModeSolver.Integrators;
using static ModeSolver.Integrators.Radau5Coefficients;

namespace ModeSolver.Tests.Integrators;

public class RadauIIA5Tests
{
    private static double[] Mul(double[] a, double[] b)
    {
        var c = new double[9];
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                for (int k = 0; k < 3; k++)
                    c[i * 3 + j] += a[i * 3 + k] * b[k * 3 + j];
        return c;
    }

    [Fact]
    public void TransformationDiagonalisesTheInverseCoefficientMatrix()
    {
        // Hairer and Wanner II, sec. IV.8: T^-1 A^-1 T = [[gamma, 0, 0], [0, alpha, -beta], [0, beta, alpha]];
        // equivalently T^-1 A T = [[1/gamma, 0, 0], [0, a, b], [0, -b, a]] with a + i b = 1/(alpha + i beta).
        double[] t = { T11, T12, T13, T21, T22, T23, T31, T32, T33 };
        double[] ti = { TI11, TI12, TI13, TI21, TI22, TI23, TI31, TI32, TI33 };
        var id = Mul(ti, t);
        for (int i = 0; i < 9; i++) Assert.True(Math.Abs(id[i] - (i % 4 == 0 ? 1 : 0)) < 1e-15, $"T^-1 T [{i}] = {id[i]}");
        var m = Mul(Mul(ti, ButcherA()), t);
        double cno = Alpha * Alpha + Beta * Beta;
        double[] expected = { 1 / Gamma, 0, 0, 0, Alpha / cno, Beta / cno, 0, -Beta / cno, Alpha / cno };
        for (int i = 0; i < 9; i++) Assert.True(Math.Abs(m[i] - expected[i]) < 1e-14, $"T^-1 A T [{i}] = {m[i]} vs {expected[i]}");
        // Radau IIA row sums are the nodes, and the last row is the weights (stiffly accurate), sum 1.
        var a = ButcherA();
        double[] c = { C1, C2, 1.0 };
        for (int i = 0; i < 3; i++) Assert.True(Math.Abs(a[3 * i] + a[3 * i + 1] + a[3 * i + 2] - c[i]) < 1e-15);
        Assert.Equal(3.6378342527444962, Gamma, 12);
    }

    [Fact]
    public void FixedStepOrderIsFive()
    {
        // y' = y cos t, exact exp(sin t), on [0, 8]: Radau IIA has order 2s - 1 = 5 at the step ends
        // (Hairer and Wanner II, sec. IV.5). Observed errors 3.3e-5, 1.0e-6, 3.2e-8 at 20, 40, 80 steps.
        int[] steps = { 20, 40, 80 };
        double[] errs = new double[steps.Length];
        for (int k = 0; k < steps.Length; k++)
        {
            var p = new OdeProblem(TestProblems.ExpSin, 0.0, new[] { 1.0 }, 8.0);
            var sol = new RadauIIA5 { FixedStep = 8.0 / steps[k] }.Solve(p, new OdeOptions { DenseOutput = false, RelativeTolerance = 1e-14 });
            Assert.Equal(steps[k], sol.Statistics.AcceptedSteps);
            errs[k] = Math.Abs(sol.FinalState[0] - Math.Exp(Math.Sin(8.0)));
        }
        Assert.InRange(Math.Log2(errs[0] / errs[1]), 4.5, 5.5);
        Assert.InRange(Math.Log2(errs[1] / errs[2]), 4.5, 5.5);
    }

    [Fact]
    public void ToleranceSweepConvergesOnTheOscillator()
    {
        // Adaptive: the global error follows the tolerance (observed 1.8e-7, 3.8e-9, 8.8e-11 at rtol 1e-6, 1e-8, 1e-10).
        double prev = double.PositiveInfinity;
        foreach (double tol in new[] { 1e-6, 1e-8, 1e-10 })
        {
            var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 20.0);
            var sol = new RadauIIA5().Solve(p, new OdeOptions { RelativeTolerance = tol, AbsoluteTolerance = tol * 1e-2 });
            double err = Math.Abs(sol.FinalState[0] - Math.Cos(20.0));
            Assert.True(err < 1e3 * tol, $"rtol {tol}: error {err:E2}");
            Assert.True(err < prev / 10, $"rtol {tol}: error {err:E2} did not fall");
            prev = err;
            // dense output between steps
            Assert.True(Math.Abs(sol.Evaluate(7.77, 1) + Math.Sin(7.77)) < 1e3 * tol);
        }
    }

    [Fact]
    public void StiffVanDerPolMatchesATightReference()
    {
        // Van der Pol, eps = 1e-6, y(0) = (2, -0.66), t = 2 (Hairer and Wanner II, sec. IV.1). Reference: our own
        // RadauIIA5 at rtol = atol = 1e-12, which agrees with the rtol 1e-10 run to 5e-12 (internal consistency).
        // Observed reference y = (1.7061674375419684, -0.8928100165524112).
        var reference = new RadauIIA5().Solve(TestProblems.VanDerPolProblem(),
            new OdeOptions { RelativeTolerance = 1e-12, AbsoluteTolerance = 1e-12, DenseOutput = false }).FinalState;
        Assert.True(Math.Abs(reference[0] - 1.7061674375419684) < 1e-9 && Math.Abs(reference[1] + 0.8928100165524112) < 1e-9);

        foreach (bool analytic in new[] { true, false })
        {
            var sol = new RadauIIA5().Solve(TestProblems.VanDerPolProblem(withJacobian: analytic),
                new OdeOptions { RelativeTolerance = 1e-8, AbsoluteTolerance = 1e-8 });
            var y = sol.FinalState;
            Assert.True(Math.Abs(y[0] - reference[0]) < 1e-7 && Math.Abs(y[1] - reference[1]) < 1e-7,
                $"y = ({y[0]:R}, {y[1]:R}), analytic Jacobian {analytic}");
            var s = sol.Statistics;
            Assert.InRange(s.AcceptedSteps, 200, 1500); // observed 1019 accepted, 11 rejected
            Assert.True(s.RejectedSteps < 100);
            Assert.True(s.JacobianEvaluations > 0 && s.Factorizations > 0);
            if (!analytic) Assert.True(s.RhsEvaluations > 2 * s.JacobianEvaluations); // finite differences cost f calls
        }
    }

    [Fact]
    public void RobertsonToOneE11MatchesTheTestSetReference()
    {
        // Robertson (Hairer and Wanner II, sec. IV.1) at t = 1e11. Reference of the Bari test set for IVP solvers
        // (Mazzia and Magherini), from memory: y = (2.083340149701255e-8, 8.333360770334713e-14, 0.9999999791665050).
        // Our RadauIIA5 at rtol 1e-12 gives (2.0833401494e-8, 8.3333607691e-14, 0.99999997916652), 1.5e-10 relative.
        var sol = new RadauIIA5().Solve(TestProblems.RobertsonProblem(),
            new OdeOptions { RelativeTolerance = 1e-10, AbsoluteTolerance = 1e-16 });
        var y = sol.FinalState;
        Assert.True(Math.Abs(y[0] / 2.083340149701255e-8 - 1) < 1e-7, $"y1 = {y[0]:R}");
        Assert.True(Math.Abs(y[1] / 8.333360770334713e-14 - 1) < 1e-7, $"y2 = {y[1]:R}");
        Assert.True(Math.Abs(y[2] - 0.9999999791665050) < 1e-13, $"y3 = {y[2]:R}");
        // mass conservation y1 + y2 + y3 = 1 (the right-hand side sums to zero)
        Assert.True(Math.Abs(y[0] + y[1] + y[2] - 1) < 1e-14);
        Span<double> mid = stackalloc double[3];
        foreach (double t in new[] { 1e-3, 0.4, 40.0, 4e5, 4e9 })
        {
            sol.Evaluate(t, mid);
            Assert.True(Math.Abs(mid[0] + mid[1] + mid[2] - 1) < 1e-12, $"sum at t = {t}");
        }
        Assert.InRange(sol.Statistics.AcceptedSteps, 300, 2500); // observed 1267 accepted, 199 rejected
    }

    [Fact]
    public void Dop853ExhaustsAStepBudgetOnStiffProblems()
    {
        // Explicit methods are step-size limited by stability on stiff problems (Hairer and Wanner II, sec. IV.1).
        var ex = Assert.Throws<IntegrationException>(() => new DormandPrince853().Solve(TestProblems.RobertsonProblem(),
            new OdeOptions { RelativeTolerance = 1e-6, AbsoluteTolerance = 1e-12, MaxSteps = 20000, DenseOutput = false }));
        Assert.Equal(IntegrationFailure.StepBudgetExhausted, ex.Failure);
        Assert.True(ex.T < 1e3, $"t = {ex.T}");
        Assert.Equal(3, ex.State.Length);
        var ex2 = Assert.Throws<IntegrationException>(() => new DormandPrince853().Solve(TestProblems.VanDerPolProblem(),
            new OdeOptions { RelativeTolerance = 1e-6, AbsoluteTolerance = 1e-6, MaxSteps = 20000, DenseOutput = false }));
        Assert.Equal(IntegrationFailure.StepBudgetExhausted, ex2.Failure);
        Assert.True(ex2.T < 2.0);
    }

    [Fact]
    public void BackwardIntegrationOfAStiffLinearProblem()
    {
        // y' = -50 (y - cos t) - sin t has the solution y = cos t through y(0) = 1 (backwards it is unstable
        // in the other direction, so integrate backwards the sign-flipped, stable version y' = 50 (y - cos t) - sin t).
        var p = new OdeProblem((t, y, f) => f[0] = 50 * (y[0] - Math.Cos(t)) - Math.Sin(t), 0.0, new[] { 1.0 }, -3.0);
        var sol = new RadauIIA5().Solve(p, new OdeOptions { RelativeTolerance = 1e-9, AbsoluteTolerance = 1e-12 });
        Assert.True(Math.Abs(sol.FinalState[0] - Math.Cos(-3.0)) < 1e-7);
        Assert.True(Math.Abs(sol.Evaluate(-1.234, 0) - Math.Cos(-1.234)) < 1e-7);
        var times = sol.StepTimes;
        for (int i = 1; i < times.Length; i++) Assert.True(times[i] < times[i - 1]);
    }

    [Fact]
    public void NaNRightHandSideIsReported()
    {
        var p = new OdeProblem((t, y, f) => f[0] = t > 1.0 ? double.NaN : -y[0], 0.0, new[] { 1.0 }, 2.0);
        var ex = Assert.Throws<IntegrationException>(() => new RadauIIA5().Solve(p, new OdeOptions()));
        Assert.Equal(IntegrationFailure.NonFiniteState, ex.Failure);
        Assert.InRange(ex.T, 0.5, 1.0);
        Assert.True(Math.Abs(ex.State[0] - Math.Exp(-ex.T)) < 1e-6);
    }

    [Fact]
    public void ObserverStopsIt()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 50.0);
        var sol = new RadauIIA5().Solve(p, new OdeOptions { Observer = (t, y) => y[0] < -0.9 });
        Assert.Equal(OdeStatus.StoppedByObserver, sol.Status);
        Assert.True(sol.FinalState[0] < -0.9 && sol.TFinal < 4.0);
    }
}
