using ModeSolver.Cli.Output;

namespace ModeSolver.Tests.Output;

public class SummaryPrinterTests
{
    [Fact]
    public void Plain_summary_has_exact_and_slow_roll_values_flags_and_no_escape_codes()
    {
        var r = SyntheticReport.Create();
        var sw = new StringWriter();
        SummaryPrinter.Print(r, sw, plain: true);
        string s = sw.ToString();
        Assert.DoesNotContain('\u001b', s);
        Assert.Contains("demo-plateau", s);
        foreach (var q in new[] { "A_s", "n_s", "alpha_s", "r", "n_t", "N_*", "phi_*", "H_*", "V_*^(1/4)", "N_total" })
            Assert.Contains(q, s);
        Assert.Contains("0.965", s);                  // exact n_s
        Assert.Contains("0.96505", s);                // second-order n_s
        Assert.Contains("-5.00e-05", s);              // exact - second order for n_s: 0.965 - 0.96505
        Assert.Contains("1.3800e+16", s);             // V_*^(1/4) in GeV
        Assert.Contains("5.6005e+13", s);             // H_* in GeV = 2.3e-5 * 2.435e18
        Assert.Contains("[spectrum-deviation] P_s", s);
        Assert.Contains("warning: demo warning", s);
        var flagLine = s.Split('\n').Single(l => l.Contains("[spectrum-deviation]"));
        Assert.Contains("worst at k", flagLine);       // the whole flag on one line
    }

    [Fact]
    public void Summary_without_flags_says_none()
    {
        var r = SyntheticReport.Create(bumpHeight: 0.001);
        var sw = new StringWriter();
        SummaryPrinter.Print(r, sw, plain: true);
        Assert.Contains("flags: none", sw.ToString());
    }
}
