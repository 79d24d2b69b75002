using System.Globalization;
using System.Text;
using ModeSolver.Observables;
using ScottPlot;
using ModeSolver.Report;

namespace ModeSolver.Output;

/// <summary>
/// Plots of the observables, in the style of <see cref="RunPlots"/>: (a) Omega_GW,0 h^2 against f today (log-log) with
/// the choices in the title; (b) f_PBH(M) per unit ln M against M (log-log) with the total and the choices. No detector
/// sensitivity curves are drawn.
/// </summary>
public static class ObservablesPlots
{
    /// <summary>Figure height in pixels (width: <see cref="RunPlots.Width"/>).</summary>
    public const int Height = 560;

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>Saves the induced-GW figure.</summary>
    public static void SaveInducedGw(RunReport report, string path, PlotFormat format) => Save(BuildInducedGw(report), path, format);

    /// <summary>Saves the black-hole figure.</summary>
    public static void SavePbh(RunReport report, string path, PlotFormat format) => Save(BuildPbh(report), path, format);

    /// <summary>Omega_GW,0 h^2 against f; a plot saying why when nothing was computed.</summary>
    public static Plot BuildInducedGw(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var plot = RunPlots.NewPlot();
        var gw = report.Observables?.InducedGw;
        var lines = new List<(double[] X, double[] Y)>();
        if (gw is not null)
        {
            RunPlots.AddLogLine(plot, lines, gw.Frequency.AsSpan(), gw.OmegaGwH2.AsSpan(), PlotPalette.DeepTeal, LinePattern.Solid, "Omega_GW,0 h^2 (radiation-era kernel)");
            plot.Title(PlotScales.Title(RunPlots.Subject(report), string.Create(Inv, $"scalar-induced GWs (g_* = {gw.GStar:G5}, Omega_r h^2 = {gw.OmegaRadiationH2:G3}, c_g = {gw.Cg:G3})")));
        }
        Finish(plot, lines, "f [Hz]", "Omega_GW,0 h^2", gw is null ? "induced GWs not computed (see the notes)" : null, report);
        return plot;
    }

    /// <summary>f_PBH(M) against M; a plot saying why when nothing was computed.</summary>
    public static Plot BuildPbh(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var plot = RunPlots.NewPlot();
        var pbh = report.Observables?.Pbh;
        var lines = new List<(double[] X, double[] Y)>();
        string? empty = pbh is null ? "black holes not computed (see the notes)" : null;
        if (pbh is not null)
        {
            RunPlots.AddLogLine(plot, lines, pbh.MassSolar.AsSpan(), pbh.FPbh.AsSpan(), PlotPalette.Plum, LinePattern.Solid, "f_PBH(M) per ln M (Press-Schechter estimate)");
            if (lines.Count == 0) empty = "f_PBH underflows (zero) at every mass of the table";
            plot.Title(PlotScales.Title(RunPlots.Subject(report), string.Create(Inv, $"black holes, f_PBH = {pbh.FTotal:G3} (delta_c = {pbh.DeltaC:G3}, gamma = {pbh.Gamma:G2}, {pbh.Window.Code()} window; an estimate)")));
        }
        Finish(plot, lines, "M [solar masses]", "f_PBH(M)", empty, report);
        return plot;
    }

    private static void Finish(Plot plot, List<(double[] X, double[] Y)> lines, string xLabel, string yLabel, string? empty, RunReport report)
    {
        plot.XLabel(xLabel);
        plot.YLabel(yLabel);
        if (lines.Count == 0)
        {
            plot.Title(PlotScales.Title(RunPlots.Subject(report), empty ?? ""));
            plot.Axes.SetLimits(0, 1, 0, 1);
            plot.Layout.Fixed(new PixelPadding(95, 30, 55, 45));
            return;
        }
        var (xMin, xMax) = RunPlots.Range(lines.Select(l => l.X));
        var (yMin, yMax) = RunPlots.Range(lines.Select(l => l.Y));
        yMin = Math.Max(yMin, yMax - 12); // the tails fall by many decades: show the top twelve
        double pad = Math.Max(0.05 * (yMax - yMin), 0.05);
        plot.Axes.SetLimits(xMin, xMax, yMin - pad, yMax + 4 * pad);
        plot.Axes.Bottom.TickGenerator = RunPlots.LogTicks(xMin, xMax, labels: true);
        plot.Axes.Left.TickGenerator = RunPlots.LogTicks(yMin - pad, yMax + 4 * pad, labels: true);
        plot.ShowLegend(Alignment.UpperRight);
        plot.Layout.Fixed(new PixelPadding(95, 30, 55, 45));
    }

    private static void Save(Plot plot, string path, PlotFormat format) => RunPlots.SaveSingle(plot, path, format, RunPlots.Width, Height);
}
