using ModeSolver.Diagnostics;
using ModeSolver.Runs;
using ModeSolver.Tests.Background;
using Xunit.Abstractions;

namespace ModeSolver.Tests.Runs;

/// <summary>The n-field additions of a TheoryRun report: delta N beside the modes, the trajectory and its flags.</summary>
public class MultiFieldRunTests(ITestOutputHelper output)
{
    [Theory]
    [InlineData(1.0 / 3, 14.0, 12.0)]
    [InlineData(2.0, 15.0, 9.0)]
    public void DoubleQuadratic_DeltaNAgreesWithTheModes(double massRatio, double phi0, double chi0)
    {
        // physics.md section 7: on super-horizon scales delta N's (H_*/2 pi)^2 G^IJ N_I N_J is the modes' P_zeta at the end,
        // up to the slow-roll corrections of the field perturbations at exit (relative order epsilon_1, epsilon_2 and
        // m_s^2/3H^2; the run's allowance, MultiFieldStage.Allowance).
        var request = new RunRequest { Fields0 = [phi0, chi0], KMin = 1e-3, KMax = 1e-1, KCount = 5, Tolerance = 1e-5, BackgroundSamples = 64, Threads = 1 };
        var report = TheoryRun.Run(FieldBackgroundTests.DoubleQuadratic(1, massRatio), request);
        var m = report.MultiField!;
        var d = m.DeltaN!;
        output.WriteLine($"modes {report.Pivot.As:E6} +- {report.Pivot.Errors.As:E1}; delta N {d.Pzeta:E6} +- {d.PzetaError:E1}: {d.RelativeDifference:E3} (allowance {d.Allowance:E2}); f_NL {d.FNL:E4} +- {d.FNLError:E1}; epsilon_1 {d.Raw.Epsilon1:E3}");
        foreach (var st in report.Statistics.Stages) output.WriteLine($"stage {st.Stage}: {st.Seconds:F3} s");
        Assert.True(d.Agrees, $"delta N and the modes differ by {d.RelativeDifference:E3}, allowance {d.Allowance:E2}");
        Assert.DoesNotContain(report.Flags, f => f.Kind == FlagKinds.DeltaNDisagreement);
        // The allowance is the slow-roll size, not a blanket: a few percent at most here.
        Assert.True(d.Allowance < 0.1, $"allowance {d.Allowance:E2}");
        Assert.Equal(2, m.Trajectory.FieldCount);
        Assert.Equal(report.Background.NEnd, m.Trajectory.NEnd, 1e-9);
        Assert.NotNull(m.Potential);
    }
}
