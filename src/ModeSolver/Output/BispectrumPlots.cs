using System.Globalization;
using System.Text;
using ModeSolver.Report;
using ScottPlot;

namespace ModeSolver.Output;

/// <summary>
/// Plots of the bispectrum, in the style of <see cref="RunPlots"/>: (a) P_s(k) above the equilateral f_NL(k) with its
/// error band and the slow-roll value (55/36) e1 + (5/12) e2; (b) a heat map of f_NL over the triangle shapes
/// (x2, x3) = (k2/k1, k3/k1) at k1 = k_*.
/// </summary>
public static class BispectrumPlots
{
    /// <summary>Height of the P_s panel (the f_NL panel below is <see cref="CurveBottomHeight"/>).</summary>
    public const int CurveTopHeight = 300;
    /// <summary>Height of the f_NL panel.</summary>
    public const int CurveBottomHeight = 420;
    /// <summary>Height of the shape figure.</summary>
    public const int ShapeHeight = 760;

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;
    private static Color C(string hex) => Color.FromHex(hex);

    /// <summary>Saves the f_NL(k) figure.</summary>
    public static void SaveCurve(RunReport report, string path, PlotFormat format)
    {
        var (top, bottom) = BuildCurve(report);
        if (format == PlotFormat.Png) RunPlots.SaveStackedPng(path, top, CurveTopHeight, bottom, CurveBottomHeight);
        else File.WriteAllText(path, RunPlots.StackedSvg(top, CurveTopHeight, bottom, CurveBottomHeight), new UTF8Encoding(false));
    }

    /// <summary>Saves the shape heat map.</summary>
    public static void SaveShape(RunReport report, string path, PlotFormat format)
    {
        RunPlots.SaveSingle(BuildShape(report), path, format, ShapeHeight, ShapeHeight);
    }

    /// <summary>P_s(k) (top) and the equilateral f_NL(k) (bottom) over the curve's k range.</summary>
    public static (Plot Top, Plot Bottom) BuildCurve(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var b = report.Bispectrum ?? throw new ArgumentException("bispectrum plot: the run computed no bispectrum");
        var c = b.Curve;
        double[] k = c.K.Length > 0 ? [.. c.K] : [b.KPivot];
        double[] f = c.K.Length > 0 ? [.. c.FNL] : [b.Equilateral.FNL];
        double[] e = c.K.Length > 0 ? [.. c.Error] : [b.Equilateral.Error];
        double[] sr = c.K.Length > 0 ? [.. c.SlowRoll] : [b.Equilateral.SlowRoll];
        double xMin = Math.Log10(k[0]), xMax = Math.Log10(k[^1]);
        if (!(xMax > xMin)) (xMin, xMax) = (xMin - 0.5, xMax + 0.5);

        var top = RunPlots.NewPlot();
        var lines = new List<(double[] X, double[] Y)>();
        var s = report.Spectrum;
        var ks = new List<double>();
        var ps = new List<double>();
        for (int i = 0; i < s.K.Length; i++)
        {
            double lk = Math.Log10(s.K[i]);
            if (lk >= xMin - 1e-9 && lk <= xMax + 1e-9) { ks.Add(s.K[i]); ps.Add(s.Ps[i]); }
        }
        RunPlots.AddLogLine(top, lines, ks.ToArray(), ps.ToArray(), PlotPalette.DeepTeal, LinePattern.Solid, "P_s exact");
        var (yMin, yMax) = lines.Count > 0 ? RunPlots.Range(lines.Select(l => l.Y)) : (-10.0, -8.0);
        double pad = Math.Max(0.1 * (yMax - yMin), 0.1);
        top.Axes.SetLimits(xMin, xMax, yMin - pad, yMax + 3 * pad);
        top.Axes.Bottom.TickGenerator = RunPlots.LogTicks(xMin, xMax, labels: false);
        top.Axes.Left.TickGenerator = RunPlots.LogTicks(yMin - pad, yMax + 3 * pad, labels: true);
        top.YLabel("P_s(k)");
        top.Title(PlotScales.Title(RunPlots.Subject(report), string.Create(Inv, $"equilateral f_NL (k_* value {b.Equilateral.FNL:G4} +- {b.Equilateral.Error:G2}, slow roll {b.Equilateral.SlowRoll:G4})")));
        top.ShowLegend(Alignment.UpperRight);
        top.Layout.Fixed(new PixelPadding(95, 30, 12, PlotScales.TitlePadding(top.Axes.Title.Label.Text)));

        var bottom = RunPlots.NewPlot();
        var lx = k.Select(Math.Log10).ToArray();
        double lo = double.PositiveInfinity, hi = double.NegativeInfinity;
        for (int i = 0; i < k.Length; i++)
        {
            lo = Math.Min(lo, Math.Min(f[i] - e[i], sr[i]));
            hi = Math.Max(hi, Math.Max(f[i] + e[i], sr[i]));
        }
        if (k.Length > 1)
        {
            var band = bottom.Add.FillY(lx, f.Select((v, i) => v + e[i]).ToArray(), f.Select((v, i) => v - e[i]).ToArray());
            band.FillColor = C(PlotPalette.Plum).WithAlpha(0.25);
            band.LineColor = Colors.Transparent;
            band.LegendText = "error estimate";
            var exact = bottom.Add.ScatterLine(lx, f, C(PlotPalette.Plum));
            exact.LineWidth = 2.2f;
            exact.LegendText = "f_NL exact (in-in)";
            var slow = bottom.Add.ScatterLine(lx, sr, C(PlotPalette.Slate));
            slow.LinePattern = LinePattern.Dashed;
            slow.LineWidth = 1.8f;
            slow.LegendText = "slow roll (55/36) e1 + (5/12) e2";
        }
        else
        {
            var mk = bottom.Add.Marker(lx[0], f[0], MarkerShape.FilledCircle, 9, C(PlotPalette.Plum));
            mk.LegendText = "f_NL exact at k_*";
            var mk2 = bottom.Add.Marker(lx[0], sr[0], MarkerShape.OpenCircle, 9, C(PlotPalette.Slate));
            mk2.LegendText = "slow roll";
        }
        bottom.Add.HorizontalLine(0, 1f, C(PlotPalette.Slate), LinePattern.Solid);
        double kp = Math.Log10(b.KPivot);
        bottom.Add.VerticalLine(kp, 1.5f, C(PlotPalette.Slate), LinePattern.Dotted);
        lo = Math.Min(lo, 0); hi = Math.Max(hi, 0);
        double dp = Math.Max(0.08 * (hi - lo), 1e-3);
        bottom.Axes.SetLimits(xMin, xMax, lo - dp, hi + 4 * dp);
        bottom.Axes.Bottom.TickGenerator = RunPlots.LogTicks(xMin, xMax, labels: true);
        bottom.XLabel("k [Mpc^-1]");
        bottom.YLabel("f_NL equilateral");
        bottom.ShowLegend(Alignment.UpperRight);
        bottom.Layout.Fixed(new PixelPadding(95, 30, 55, 8));
        return (top, bottom);
    }

    /// <summary>The shape heat map; a plot saying why when no grid was computed.</summary>
    public static Plot BuildShape(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var plot = RunPlots.NewPlot();
        var g = report.Bispectrum?.Shape;
        plot.XLabel("x2 = k2/k1");
        plot.YLabel("x3 = k3/k1");
        if (g is null || g.X.Length == 0)
        {
            plot.Title(PlotScales.Title(RunPlots.Subject(report), "no f_NL shape grid computed ([bispectrum] shape_grid)"));
            plot.Axes.SetLimits(0, 1, 0, 1);
            return plot;
        }
        int n = g.X.Length;
        var data = new double[n, n];
        for (int r = 0; r < n; r++) // row 0 at the top: the largest x3
            for (int col = 0; col < n; col++)
                data[r, col] = g.FNL[col * n + (n - 1 - r)];
        var hm = plot.Add.Heatmap(data);
        double h = n > 1 ? 0.5 * (g.X[1] - g.X[0]) : 0.5;
        hm.Rectangle = new CoordinateRect(g.X[0] - h, g.X[^1] + h, g.X[0] - h, g.X[^1] + h);
        hm.NaNCellColor = Colors.Transparent;
        var bar = plot.Add.ColorBar(hm);
        bar.Label = "f_NL";
        plot.Axes.SetLimits(g.X[0] - h, g.X[^1] + h, g.X[0] - h, g.X[^1] + h);
        plot.Title(PlotScales.Title(RunPlots.Subject(report), string.Create(Inv, $"f_NL(k1, x2 k1, x3 k1) at k1 = {g.K1:0.###e+0} /Mpc, x3 <= x2 <= 1")));
        return plot;
    }
}
