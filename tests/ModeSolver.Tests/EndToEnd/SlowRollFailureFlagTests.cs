using ModeSolver.Diagnostics;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>
/// Second-order slow roll, P_s = H^2/(8 pi^2 e1) [1 - 2(C+1) e1 - C e2] with C = -0.73 (physics.md 4c), turns negative
/// once e2 &lt; -1.4 or so, as in ultra-slow roll. Such samples are the worst disagreement and must be flagged, with a
/// message that says slow roll gives a non-positive value; non-finite values are still skipped.
/// </summary>
public class SlowRollFailureFlagTests
{
    [Fact]
    public void NonPositiveSlowRollValuesAreFlagged()
    {
        int n = 40;
        var k = new double[n];
        var exact = new double[n];
        var sr = new double[n];
        for (int i = 0; i < n; i++)
        {
            k[i] = Math.Pow(10, -2 + 4.0 * i / (n - 1));
            exact[i] = 2e-9;
            // Agrees (within 0.1 %) below k = 1, then a stretch where the slow-roll value is negative or zero, then agrees again.
            sr[i] = k[i] < 1 || k[i] > 10 ? 2e-9 * (1 + 1e-3) : (i % 2 == 0 ? -3e-10 : 0.0);
        }
        var f = Assert.Single(Flags.SpectrumDeviations(k, exact, sr, "P_s", 0.01));
        Assert.True(f.Lower > 0.7 && f.Lower <= 1.3, $"lower end {f.Lower}");
        Assert.True(f.Upper >= 7 && f.Upper < 14, $"upper end {f.Upper}");
        Assert.False(f.SlowRoll > 0);
        Assert.Contains("slow roll fails", f.Message);
        Assert.Contains("not positive", f.Message);
        Assert.DoesNotContain('\n', f.Message);
    }

    [Fact]
    public void NonFiniteSlowRollValuesAreStillSkipped()
    {
        var k = new[] { 1.0, 2.0, 3.0, 4.0 };
        var exact = new[] { 1.0, 1.0, 1.0, 1.0 };
        var sr = new[] { 1.0, double.NaN, double.PositiveInfinity, 1.0 };
        Assert.Empty(Flags.SpectrumDeviations(k, exact, sr, "P_s", 0.01));
    }
}
