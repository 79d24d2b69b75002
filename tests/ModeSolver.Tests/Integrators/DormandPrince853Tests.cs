using ModeSolver.Integrators;
using static ModeSolver.Integrators.Dop853Coefficients;

namespace ModeSolver.Tests.Integrators;

public class DormandPrince853Tests
{
    private static readonly double[] Cs = { 0, C2, C3, C4, C5, C6, C7, C8, C9, C10, C11, 1.0 };
    private static readonly double[] Bs = { B1, 0, 0, 0, 0, B6, B7, B8, B9, B10, B11, B12 };

    [Fact]
    public void CoefficientsSatisfyQuadratureAndRowSumConditions()
    {
        // Order conditions sum b_i c_i^(q-1) = 1/q, q = 1..8 (Hairer, Norsett and Wanner I, sec. II.2, Thm 2.13).
        for (int q = 1; q <= 8; q++)
        {
            double s = 0;
            for (int i = 0; i < 12; i++) s += Bs[i] * Math.Pow(Cs[i], q - 1);
            Assert.True(Math.Abs(s - 1.0 / q) < 1e-14, $"quadrature condition q={q}: {s} vs {1.0 / q}");
        }
        // Row sums sum_j a_ij = c_i (ibid., eq. (1.9)).
        (double c, double sum)[] rows =
        {
            (C2, A21), (C3, A31 + A32), (C4, A41 + A43), (C5, A51 + A53 + A54), (C6, A61 + A64 + A65),
            (C7, A71 + A74 + A75 + A76), (C8, A81 + A84 + A85 + A86 + A87), (C9, A91 + A94 + A95 + A96 + A97 + A98),
            (C10, A101 + A104 + A105 + A106 + A107 + A108 + A109),
            (C11, A111 + A114 + A115 + A116 + A117 + A118 + A119 + A1110),
            (1.0, A121 + A124 + A125 + A126 + A127 + A128 + A129 + A1210 + A1211),
            (C14, A141 + A147 + A148 + A149 + A1410 + A1411 + A1412 + A1413),
            (C15, A151 + A156 + A157 + A158 + A1511 + A1512 + A1513 + A1514),
            (C16, A161 + A166 + A167 + A168 + A169 + A1613 + A1614 + A1615),
        };
        foreach (var (c, sum) in rows) Assert.True(Math.Abs(sum - c) < 1e-13, $"row sum {sum} vs c = {c}");
        // The 5th-order estimator is a difference of two consistent weight sets: its weights sum to zero.
        Assert.True(Math.Abs(Er1 + Er6 + Er7 + Er8 + Er9 + Er10 + Er11 + Er12) < 1e-13);
        Assert.True(Math.Abs(Bhh1 + Bhh2 + Bhh3 - 1.0) < 1e-14);
    }

    [Fact]
    public void ArenstorfOrbitReturnsToItsStart()
    {
        // Arenstorf orbit, Hairer, Norsett and Wanner I, sec. II.0: periodic with T = 17.0652165601579625588917206249.
        var sol = new DormandPrince853().Solve(TestProblems.ArenstorfProblem(),
            new OdeOptions { RelativeTolerance = 1e-12, AbsoluteTolerance = 1e-12 });
        var y = sol.FinalState;
        var y0 = TestProblems.ArenstorfY0;
        double posErr = Math.Max(Math.Abs(y[0] - y0[0]), Math.Abs(y[1] - y0[1]));
        double velErr = Math.Max(Math.Abs(y[2] - y0[2]), Math.Abs(y[3] - y0[3]));
        Assert.Equal(OdeStatus.Completed, sol.Status);
        // observed: position 5.5e-12, velocity 9.4e-10, 312 accepted and 23 rejected steps
        Assert.True(posErr < 1e-10, $"position error {posErr:E3}");
        Assert.True(velErr < 1e-8, $"velocity error {velErr:E3}");
        Assert.InRange(sol.Statistics.AcceptedSteps, 100, 600);
    }

    [Fact]
    public void FixedStepOrderIsEight()
    {
        // Harmonic oscillator y1 = cos t on [0, 10]: the global error of the fixed-step method falls like h^8
        // (Hairer, Norsett and Wanner I, sec. II.10). Observed errors 9.8e-10, 4.6e-12, 1.9e-14 at 20, 40, 80 steps.
        int[] steps = { 20, 40, 80 };
        double[] errs = new double[steps.Length];
        for (int k = 0; k < steps.Length; k++)
        {
            var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 10.0);
            var sol = new DormandPrince853 { FixedStep = 10.0 / steps[k] }.Solve(p, new OdeOptions { DenseOutput = false });
            errs[k] = Math.Abs(sol.FinalState[0] - Math.Cos(10.0));
            Assert.Equal(steps[k], sol.Statistics.AcceptedSteps);
        }
        Assert.InRange(Math.Log2(errs[0] / errs[1]), 7.0, 9.0);
        Assert.InRange(Math.Log2(errs[1] / errs[2]), 7.0, 9.0);
    }

    [Fact]
    public void DenseOutputIsAccurateBetweenSteps()
    {
        // Harmonic oscillator, exact cos t / -sin t; the 7th-order interpolant (sec. II.10) at step midpoints.
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 20.0);
        var sol = new DormandPrince853().Solve(p, new OdeOptions { RelativeTolerance = 1e-10, AbsoluteTolerance = 1e-12 });
        var times = sol.StepTimes.ToArray();
        Assert.Equal(0.0, times[0]);
        Assert.Equal(20.0, times[^1]);
        Span<double> y = stackalloc double[2];
        double worst = 0;
        for (int i = 0; i + 1 < times.Length; i++)
        {
            foreach (double f in new[] { 0.25, 0.5, 0.8 })
            {
                double t = times[i] + f * (times[i + 1] - times[i]);
                sol.Evaluate(t, y);
                worst = Math.Max(worst, Math.Max(Math.Abs(y[0] - Math.Cos(t)), Math.Abs(y[1] + Math.Sin(t))));
                Assert.Equal(y[0], sol.Evaluate(t, 0));
            }
        }
        Assert.True(worst < 1e-8, $"dense output error {worst:E3}");
    }

    [Fact]
    public void IntegratesBackwards()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, -10.0);
        var sol = new DormandPrince853().Solve(p, new OdeOptions { RelativeTolerance = 1e-11, AbsoluteTolerance = 1e-13 });
        Assert.Equal(-10.0, sol.TFinal);
        Assert.True(Math.Abs(sol.FinalState[0] - Math.Cos(-10.0)) < 1e-9);
        Assert.True(Math.Abs(sol.FinalState[1] + Math.Sin(-10.0)) < 1e-9);
        var times = sol.StepTimes;
        for (int i = 1; i < times.Length; i++) Assert.True(times[i] < times[i - 1]);
        Assert.True(Math.Abs(sol.Evaluate(-3.3, 0) - Math.Cos(-3.3)) < 1e-9);
    }

    [Fact]
    public void WithoutDenseOutputKeepsOnlyTheEnds()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 5.0);
        var sol = new DormandPrince853().Solve(p, new OdeOptions { DenseOutput = false });
        Assert.False(sol.HasDenseOutput);
        Assert.Equal(new[] { 0.0, 5.0 }, sol.StepTimes.ToArray());
        Assert.Throws<InvalidOperationException>(() => sol.Evaluate(2.5, 0));
        Assert.Equal(sol.FinalState[0], sol.Evaluate(5.0, 0));
        Assert.Throws<ArgumentOutOfRangeException>(() => sol.Evaluate(6.0, 0));
        // without the 3 dense-output stages: 12 evaluations per step attempt plus the start and first-step probe
        var s = sol.Statistics;
        Assert.Equal(12 * (s.AcceptedSteps + s.RejectedSteps) + 2, s.RhsEvaluations);
    }

    [Fact]
    public void ObserverSeesEveryStepAndCanStop()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 50.0);
        int calls = 0;
        double lastT = double.NaN;
        var sol = new DormandPrince853().Solve(p, new OdeOptions
        {
            Observer = (t, y) => { calls++; lastT = t; return t > 10.0; },
        });
        Assert.Equal(OdeStatus.StoppedByObserver, sol.Status);
        Assert.Equal(calls, sol.Statistics.AcceptedSteps);
        Assert.Equal(lastT, sol.TFinal);
        Assert.True(sol.TFinal > 10.0 && sol.TFinal < 50.0);
        Assert.True(Math.Abs(sol.FinalState[0] - Math.Cos(sol.TFinal)) < 1e-6);
    }

    [Fact]
    public void DerivativeObserverGetsTheLastStageBitForBitAndCanStop()
    {
        // DOP853's first-same-as-last stage is f(t, y) at the accepted step's end: the same bits as calling f again.
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 50.0);
        int calls = 0, mismatches = 0;
        var again = new double[2];
        var sol = new DormandPrince853().Solve(p, new OdeOptions
        {
            DenseOutput = false,
            DerivativeObserver = (t, y, dydt) =>
            {
                calls++;
                TestProblems.Oscillator(t, y, again);
                if (dydt.Length != 2 || BitConverter.DoubleToInt64Bits(dydt[0]) != BitConverter.DoubleToInt64Bits(again[0])
                    || BitConverter.DoubleToInt64Bits(dydt[1]) != BitConverter.DoubleToInt64Bits(again[1])) mismatches++;
                return t > 10.0;
            },
        });
        Assert.Equal(OdeStatus.StoppedByObserver, sol.Status);
        Assert.Equal(calls, sol.Statistics.AcceptedSteps);
        Assert.Equal(0, mismatches);
        Assert.True(sol.TFinal > 10.0 && sol.TFinal < 50.0);
    }

    [Fact]
    public void DerivativeObserverGetsNoDerivativeFromRadau()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 5.0);
        int calls = 0, nonEmpty = 0;
        new RadauIIA5().Solve(p, new OdeOptions { DerivativeObserver = (t, y, dydt) => { calls++; if (!dydt.IsEmpty) nonEmpty++; return false; } });
        Assert.True(calls > 0);
        Assert.Equal(0, nonEmpty);
    }

    [Fact]
    public void NaNRightHandSideIsReportedWithTimeAndState()
    {
        // f becomes NaN for t > 1 (as sqrt of a negative number would).
        var p = new OdeProblem((t, y, f) => f[0] = t > 1.0 ? double.NaN : 1.0, 0.0, new[] { 0.0 }, 2.0);
        var ex = Assert.Throws<IntegrationException>(() => new DormandPrince853().Solve(p, new OdeOptions()));
        Assert.Equal(IntegrationFailure.NonFiniteState, ex.Failure);
        Assert.InRange(ex.T, 0.5, 1.0);
        Assert.True(Math.Abs(ex.State[0] - ex.T) < 1e-9, $"state {ex.State[0]} at t = {ex.T}");
    }

    [Fact]
    public void BlowUpIsReported()
    {
        // y' = y^2, y(0) = 1: y = 1/(1 - t) blows up at t = 1.
        var p = new OdeProblem((t, y, f) => f[0] = y[0] * y[0], 0.0, new[] { 1.0 }, 2.0);
        var ex = Assert.Throws<IntegrationException>(() => new DormandPrince853().Solve(p, new OdeOptions()));
        Assert.True(ex.Failure is IntegrationFailure.StepSizeUnderflow or IntegrationFailure.NonFiniteState, ex.Failure.ToString());
        // The numerical pole sits within the tolerance of t = 1 (observed 1 + 9.6e-10 at rtol 1e-8).
        Assert.True(Math.Abs(ex.T - 1.0) < 1e-7, $"t = {ex.T:R}");
        Assert.True(ex.State[0] > 1e8, $"state {ex.State[0]} at t = {ex.T}");
    }

    [Fact]
    public void StepBudgetIsEnforced()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 1000.0);
        var ex = Assert.Throws<IntegrationException>(() => new DormandPrince853().Solve(p, new OdeOptions { MaxSteps = 50 }));
        Assert.Equal(IntegrationFailure.StepBudgetExhausted, ex.Failure);
        Assert.True(ex.T > 0 && ex.T < 1000.0);
        Assert.True(Math.Abs(ex.State[0] - Math.Cos(ex.T)) < 1e-6);
    }

    [Fact]
    public void BadInputGivesOneLineErrors()
    {
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, double.NaN }, 1.0);
        var ex = Assert.Throws<ArgumentException>(() => new DormandPrince853().Solve(p, new OdeOptions()));
        Assert.Contains("Y0[1]", ex.Message);
        var q = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 1.0);
        Assert.Throws<ArgumentException>(() => new DormandPrince853().Solve(q, new OdeOptions { RelativeTolerance = -1 }));
        Assert.Throws<ArgumentException>(() => new DormandPrince853().Solve(q, new OdeOptions { AbsoluteToleranceVector = new[] { 1e-8 } }));
    }
}
