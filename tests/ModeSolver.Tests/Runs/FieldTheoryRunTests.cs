using ModeSolver.Models;
using ModeSolver.Runs;
using ModeSolver.Tests.Background;
using Xunit.Abstractions;

namespace ModeSolver.Tests.Runs;

/// <summary>TheoryRun on n-field theories: the report, and the one-field adapter's delegation to the single-field path.</summary>
public class FieldTheoryRunTests(ITestOutputHelper output)
{
    [Fact]
    public void SingleFieldTheory_RunsTheSingleFieldPath()
    {
        var request = new RunRequest { Fields0 = [16.0], KMin = 1e-3, KMax = 1e-1, KCount = 8, Tolerance = 1e-5 };
        var viaFields = TheoryRun.RunPivot(new SingleFieldTheory(new Quadratic()), request);
        var direct = TheoryRun.RunPivot(new Quadratic(), new RunRequest { Phi0 = 16.0, KMin = 1e-3, KMax = 1e-1, KCount = 8, Tolerance = 1e-5 });
        Assert.NotNull(viaFields.SingleField);
        Assert.Null(viaFields.Isocurvature);
        Assert.Equal(direct.Exact.Ns, viaFields.Exact.Ns);
        Assert.Equal(direct.Exact.Ps, viaFields.Exact.Ps);
        Assert.Equal(direct.Pivot.NStar, viaFields.Match.NStar);
    }

    [Fact]
    public void TwoFieldRun_ReportsSpectraAndIsocurvature()
    {
        var request = new RunRequest { Fields0 = [14.0, 12.0], KMin = 1e-3, KMax = 1e-1, KCount = 9, Tolerance = 1e-5, BackgroundSamples = 64, Threads = 1 };
        var report = TheoryRun.Run(FieldBackgroundTests.DoubleQuadratic(1, 1.0 / 3), request);
        var p = report.Pivot;
        var iso = report.Isocurvature!;
        output.WriteLine($"A_s {p.As:G6} n_s {p.Ns:G8} +- {p.Errors.Ns:E2} alpha_s {p.AlphaS:G4} +- {p.Errors.AlphaS:E2} r {p.R:G6} n_t {p.Nt:G6} N* {p.NStar:G6}");
        output.WriteLine($"P_S {iso.Pivot.Ps:G6} beta {iso.Pivot.BetaIso:G4} cos {iso.Pivot.CosDelta:G4} T_RS {iso.Pivot.Trs:G4}; wall {report.Statistics.WallSeconds:G3} s, rhs {report.Statistics.RhsEvaluations}");
        Assert.Equal(ModeSolver.Physics.Constants.DefaultScalarAmplitude, p.As, 1e-6 * p.As + p.Errors.As);
        Assert.InRange(p.Ns, 0.9, 1.0);
        Assert.Equal(9, report.Spectrum.K.Length);
        Assert.Equal(9, iso.Ps.Length);
        Assert.Equal(2, iso.FieldCount);
        Assert.True(iso.Pivot.Ps > 0 && iso.Pivot.BetaIso is > 0 and < 1);
        // The light field has converted its isocurvature (T_RS of order one) and what is left at the end is at the level
        // of the integration error: its correlation with R is not reported.
        Assert.True(iso.Pivot.Trs > 0.1, $"T_RS = {iso.Pivot.Trs}");
        Assert.True(iso.Pivot.PsError >= iso.Pivot.Ps && double.IsNaN(iso.Pivot.CosDelta));
        Assert.Contains(report.Settings.Entries, e => e.Key == "start.phi0" && e.Value == "[14, 12]");
    }
}
