using System.Collections.Immutable;
using ModeSolver.Output;
using ModeSolver.Sweeps;
using ModeSolver.Report;

namespace ModeSolver.Tests.Output;

/// <summary>
/// Plots say what they show: the model's name in every title, a residual panel that stays readable when slow roll is
/// poor (symmetric-log axis), P_t off the axis edge, and a sweep legend that stays readable with many families.
/// </summary>
public class PlotLabellingTests
{
    private static (int Width, int Height) PngSize(string path)
    {
        var b = File.ReadAllBytes(path);
        Assert.Equal([0x89, (byte)'P', (byte)'N', (byte)'G'], b[..4]);
        return ((b[16] << 24) | (b[17] << 16) | (b[18] << 8) | b[19], (b[20] << 24) | (b[21] << 16) | (b[22] << 8) | b[23]);
    }

    private static IReadOnlyList<string> Texts(string path) => SvgText.Of(File.ReadAllText(path));

    [Fact]
    public void A_residual_far_beyond_one_goes_on_a_symmetric_log_axis_and_a_small_one_stays_linear()
    {
        string dir = SyntheticReport.TempDir();
        try
        {
            // A bump of 1e4 in P_exact / P_SR - 1 (a synthetic run; on a linear axis its tick labels would reach 1e4).
            var poor = SyntheticReport.Create(bumpHeight: 1e4);
            string png = Path.Combine(dir, "spectra.png"), svg = Path.Combine(dir, "spectra.svg");
            RunPlots.SaveSpectra(poor, png, PlotFormat.Png);
            RunPlots.SaveSpectra(poor, svg, PlotFormat.Svg);
            Assert.Equal((RunPlots.Width, RunPlots.SpectraTopHeight + RunPlots.SpectraBottomHeight), PngSize(png));
            var texts = Texts(svg);
            Assert.Contains("P/P_SR - 1 (symlog)", texts);
            Assert.Contains("+1e4", texts);
            Assert.Contains("0", texts);
            var (_, bottom) = RunPlots.BuildSpectra(poor);
            var limits = bottom.Axes.GetLimits();
            // log10(1 + 1e4 / 0.01) = 6: the axis spans a few units, not 1e4.
            Assert.InRange(limits.Top, PlotScales.SymLog(1e4, 0.01), 8);
            Assert.InRange(limits.Bottom, -2, 0);

            var fine = SyntheticReport.Create();
            RunPlots.SaveSpectra(fine, svg, PlotFormat.Svg);
            texts = Texts(svg);
            Assert.Contains("P_exact / P_SR - 1", texts);
            Assert.DoesNotContain(texts, t => t.Contains("symlog"));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void The_lowest_curve_sits_at_least_a_third_of_a_decade_above_the_lower_edge()
    {
        var r = SyntheticReport.Create();
        var (top, _) = RunPlots.BuildSpectra(r);
        double lowest = Math.Log10(r.Spectrum.Pt.Min());
        Assert.True(top.Axes.GetLimits().Bottom <= lowest - 1.0 / 3 + 1e-12, $"{top.Axes.GetLimits().Bottom} vs P_t at {lowest}");
    }

    [Fact]
    public void Spectra_and_background_titles_carry_the_model_or_the_run_title()
    {
        string dir = SyntheticReport.TempDir();
        try
        {
            var r = SyntheticReport.Create();
            string s = Path.Combine(dir, "spectra.svg"), b = Path.Combine(dir, "background.svg");
            RunPlots.SaveSpectra(r, s, PlotFormat.Svg);
            RunPlots.SaveBackground(r, b, PlotFormat.Svg);
            Assert.Contains(Texts(s), t => t.StartsWith("demo-plateau: primordial spectra (n_s = 0.9650", StringComparison.Ordinal));
            Assert.Contains("demo-plateau: Hubble-flow parameters", Texts(b));

            var titled = r with { Settings = r.Settings with { Entries = r.Settings.Entries.Insert(0, new Setting("title", "plateau check")) } };
            RunPlots.SaveBackground(titled, b, PlotFormat.Svg);
            Assert.Contains("plateau check: Hubble-flow parameters", Texts(b));
            var formula = r with { Model = r.Model with { Id = "formula" } };
            RunPlots.SaveBackground(formula, b, PlotFormat.Svg);
            Assert.Contains("V = V0*(1 - exp(-sqrt(2/3)*phi))^2: Hubble-flow parameters", Texts(b));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void The_plot_subject_shortens_a_long_potential()
    {
        Assert.Equal("t-model", PlotScales.Subject(null, "t-model", "ignored"));
        Assert.Equal("my title", PlotScales.Subject("  my title ", "t-model", "ignored"));
        string longV = string.Concat(Enumerable.Repeat("phi^2 + ", 20));
        string s = PlotScales.Subject(null, "formula", longV);
        Assert.Equal("V = ".Length + PlotScales.MaxPotentialLength, s.Length);
        Assert.EndsWith("...", s);
        Assert.Equal("V = a * phi", PlotScales.Subject("", null, "a *\n  phi"));
    }

    [Fact]
    public void Symmetric_log_is_odd_monotonic_linear_near_zero_and_inverted_exactly()
    {
        const double c = 0.01;
        double previous = double.NegativeInfinity;
        foreach (double d in new[] { -1e10, -1e3, -1, -0.01, -1e-5, 0, 1e-5, 0.01, 1, 1e3, 1e10 })
        {
            double y = PlotScales.SymLog(d, c);
            Assert.True(y > previous);
            previous = y;
            Assert.Equal(-y, PlotScales.SymLog(-d, c));
            Assert.Equal(d, PlotScales.SymLogInverse(y, c), Math.Max(Math.Abs(d), 1e-300) * 1e-12);
        }
        // Within |d| << c the map is d / (c ln 10) to first order (Taylor series of log10(1 + x)); at x = d/c = 1e-4
        // the second-order term, x^2 / (2 ln 10) = 2.2e-9, is inside the tolerance.
        Assert.Equal(1e-6 / (c * Math.Log(10)), PlotScales.SymLog(1e-6, c), 3e-9);
        var ticks = PlotScales.SymLogTicks(PlotScales.SymLog(-1e6, c), PlotScales.SymLog(1e9, c), c);
        Assert.Contains(ticks, t => t.Label == "0" && t.Position == 0);
        Assert.Contains(ticks, t => t.Label == "+1e9");
        Assert.All(ticks, t => Assert.Equal(t.Position, PlotScales.SymLog(double.Parse(t.Label, System.Globalization.CultureInfo.InvariantCulture), c), 9));
        Assert.DoesNotContain(ticks, t => t.Position < PlotScales.SymLog(-1e6, c));
    }

    /// <summary>20 families (a synthetic sweep, demo numbers): the legend names 10 of them and says how many there are.</summary>
    [Fact]
    public void A_sweep_with_many_families_keeps_a_short_legend_and_says_how_many_lines_there_are()
    {
        var spec = new SweepSpec([SweepAxis.Log("param.alpha", 0.01, 100, 5), SweepAxis.Linear("efolds", 45, 64, 20)], null, "param.alpha", null, false);
        var records = Enumerable.Range(0, (int)spec.PointCount).Select(i =>
        {
            var p = spec.GetPoint(i);
            double n = p.Values[1], alpha = p.Values[0];
            return new SweepRecord { Index = i, Ok = true, Ns = 1 - 2 / n, R = 12 * alpha / (n * n), NStar = n };
        }).ToList();
        string dir = SyntheticReport.TempDir();
        try
        {
            SweepPlot.Write(dir, spec, records, new SweepPlotOptions { LogR = true, Subject = "T-model demo" });
            Assert.Equal((1300, 700), PngSize(Path.Combine(dir, SweepFiles.PlotPng)));
            var texts = Texts(Path.Combine(dir, SweepFiles.PlotSvg));
            Assert.Contains("T-model demo: n_s and r, lines along param.alpha", texts);
            Assert.Contains("... 20 lines in all (10 not named here; see sweep.csv)", texts);
            var named = texts.Where(t => t.StartsWith("efolds = ", StringComparison.Ordinal)).ToArray();
            Assert.Equal(SweepPlot.MaxLegendLines, named.Length);
            Assert.Contains("efolds = 45", named);
            Assert.Contains("efolds = 64", named);
            Assert.Contains("param.alpha = 0.01", texts);
        }
        finally { Directory.Delete(dir, true); }
        var few = SweepPlot.LegendSelection(4, 10);
        Assert.Equal([0, 1, 2, 3], few);
        var many = SweepPlot.LegendSelection(101, 10);
        Assert.Equal(10, many.Count);
        Assert.Contains(0, many);
        Assert.Contains(100, many);
    }
}
