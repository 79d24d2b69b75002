using ModeSolver.Perturbations;
using ModeSolver.Spectra;

namespace ModeSolver.Tests.Runs;

/// <summary>When the pivot's cos Delta is reported: only where P_S is resolved, by the same rule as the per-k arrays.</summary>
public class FieldIsocurvatureTests
{
    private static FieldModeResult Mode(double pr, double ps, double crs) =>
        new(K: 1, Pr: pr, Ps: ps, Crs: crs, Pt: 0.1 * pr, PrExit: pr, Trs: 0, NStart: 0, NFinal: 60, StartDepth: 50,
            FinalDepth: 1e-3, Frozen: true, RhsEvaluations: 1000, Steps: 80, ErrorEstimate: 1e-9);

    [Fact]
    public void CosDelta_IsReported_WhereThePowerIsResolved()
    {
        // P_S = 1e-3 P_R with a 1% error, tolerance 1e-8: resolved, cos Delta = C_RS / sqrt(P_R P_S) (physics.md 7).
        var m = Mode(2e-9, 2e-12, -0.5 * Math.Sqrt(2e-9 * 2e-12));
        var iso = FieldIsocurvature.Of(m, 2e-14, 1e-8);
        Assert.Equal(-0.5, iso.CosDelta, 12);
    }

    [Fact]
    public void CosDelta_IsNaN_WherePsIsBelowTheIntegrationErrorLevel_EvenIfItsOwnErrorIsSmaller()
    {
        // A decayed isocurvature: P_S = 6e-17 P_R, error 80% of it (the default double-quadratic's pivot). Below
        // (10 tol)^2 P_R = 1e-14 P_R at tol = 1e-8, so its correlation with R is not resolved and cos Delta is NaN.
        var m = Mode(2e-9, 1.3e-25, -0.72 * Math.Sqrt(2e-9 * 1.3e-25));
        var iso = FieldIsocurvature.Of(m, 1.1e-25, 1e-8);
        Assert.True(double.IsNaN(iso.CosDelta), $"cos Delta = {iso.CosDelta}");
        Assert.Equal(1.3e-25, iso.Ps);
    }

    [Fact]
    public void CosDelta_IsNaN_WhereTheErrorIsAsLargeAsPs()
    {
        var m = Mode(2e-9, 2e-12, 0.3 * Math.Sqrt(2e-9 * 2e-12));
        Assert.True(double.IsNaN(FieldIsocurvature.Of(m, 2e-12, 1e-8).CosDelta));
    }
}
