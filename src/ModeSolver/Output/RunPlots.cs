using System.Globalization;
using System.Text;
using ModeSolver.Diagnostics;
using ScottPlot;
using SkiaSharp;
using ModeSolver.Report;
using ModeSolver.Results;

namespace ModeSolver.Output;

/// <summary>Image format of a plot file.</summary>
public enum PlotFormat
{
    /// <summary>PNG raster.</summary>
    Png,
    /// <summary>SVG vector.</summary>
    Svg,
}

/// <summary>Our plot palette, as named constants (hex RGB).</summary>
public static class PlotPalette
{
    /// <summary>Scalar spectrum and epsilon_1: deep teal.</summary>
    public const string DeepTeal = "#0E5E6F";
    /// <summary>Tensor spectrum and |epsilon_2|: burnt orange.</summary>
    public const string BurntOrange = "#C8621A";
    /// <summary>Axes, text, pivot marker: slate.</summary>
    public const string Slate = "#46505E";
    /// <summary>End of inflation and flagged ranges: dark plum.</summary>
    public const string Plum = "#7A2E5C";
    /// <summary>Observable-window shading: pale sand.</summary>
    public const string Sand = "#EAD9B5";
    /// <summary>Grid lines: light mist.</summary>
    public const string Mist = "#DDE3E8";
    /// <summary>Figure background: warm off-white.</summary>
    public const string Paper = "#FCFBF8";
}

/// <summary>
/// The run's plots. Log axes are drawn by plotting log10 values with our own tick labels (powers of ten, or
/// mantissa ticks when the range spans less than a decade).
/// (a) spectra: P_s and P_t against k (log-log), exact solid, second-order slow roll dashed, pivot marked, with a
/// lower panel of P_exact/P_SR - 1 (threshold lines and flagged k ranges shaded).
/// (b) background: epsilon_1 and |epsilon_2| against N (log y), observable window shaded, pivot exit and every end of
/// inflation (epsilon_1 = 1 crossing) marked.
/// </summary>
public static class RunPlots
{
    /// <summary>Figure width in pixels.</summary>
    public const int Width = 1000;
    /// <summary>Height of the upper spectra panel in pixels.</summary>
    public const int SpectraTopHeight = 520;
    /// <summary>Height of the lower spectra panel (relative difference) in pixels.</summary>
    public const int SpectraBottomHeight = 260;
    /// <summary>Height of the background figure in pixels.</summary>
    public const int BackgroundHeight = 560;

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;
    private static Color C(string hex) => Color.FromHex(hex);

    /// <summary>Saves the two-panel spectra figure.</summary>
    public static void SaveSpectra(RunReport report, string path, PlotFormat format)
    {
        var (top, bottom) = BuildSpectra(report);
        if (format == PlotFormat.Png) SaveStackedPng(path, top, SpectraTopHeight, bottom, SpectraBottomHeight);
        else File.WriteAllText(path, StackedSvg(top, SpectraTopHeight, bottom, SpectraBottomHeight), new UTF8Encoding(false));
    }

    /// <summary>Saves the background figure.</summary>
    public static void SaveBackground(RunReport report, string path, PlotFormat format)
    {
        SaveSingle(BuildBackground(report), path, format, Width, BackgroundHeight);
    }

    /// <summary>Writes one plot of <paramref name="width"/> x <paramref name="height"/> pixels as PNG or SVG (UTF-8, no BOM).</summary>
    internal static void SaveSingle(Plot plot, string path, PlotFormat format, int width, int height)
    {
        if (format == PlotFormat.Png) File.WriteAllBytes(path, plot.GetImageBytes(width, height, ImageFormat.Png));
        else File.WriteAllText(path, plot.GetSvgXml(width, height), new UTF8Encoding(false));
    }

    /// <summary>Builds the upper (spectra) and lower (relative difference) plots of the spectra figure.</summary>
    public static (Plot Top, Plot Bottom) BuildSpectra(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var s = report.Spectrum;
        var sr = report.SlowRollSpectra;
        var k = s.K.AsSpan();
        if (k.Length < 1) throw new ArgumentException("spectra plot: no k samples");
        if (sr.K.Length != k.Length) throw new ArgumentException("spectra plot: slow-roll spectra are not on the same k as the exact spectrum");

        var top = NewPlot();
        var lines = new List<(double[] X, double[] Y)>();
        AddLogLine(top, lines, k, s.Ps.AsSpan(), PlotPalette.DeepTeal, LinePattern.Solid, "P_s exact");
        AddLogLine(top, lines, k, sr.PsSecondOrder.AsSpan(), PlotPalette.DeepTeal, LinePattern.Dashed, "P_s slow roll (2nd order)");
        AddLogLine(top, lines, k, s.Pt.AsSpan(), PlotPalette.BurntOrange, LinePattern.Solid, "P_t exact");
        AddLogLine(top, lines, k, sr.PtSecondOrder.AsSpan(), PlotPalette.BurntOrange, LinePattern.Dashed, "P_t slow roll (2nd order)");

        double xMin = Math.Log10(k[0]), xMax = Math.Log10(k[^1]);
        if (!(xMax > xMin)) (xMin, xMax) = (xMin - 0.5, xMax + 0.5); // one wavenumber: its points, a decade wide
        var (yMin, yMax) = Range(lines.Select(l => l.Y));
        double kp = report.Pivot.KPivot;
        if (kp > 0 && double.IsFinite(kp))
        {
            var v = top.Add.VerticalLine(Math.Log10(kp), 1.5f, C(PlotPalette.Slate), LinePattern.Dotted);
            v.LegendText = string.Create(Inv, $"pivot k = {kp:0.###e+0} /Mpc");
            if (report.Pivot.As > 0 && double.IsFinite(report.Pivot.As))
            {
                var mk = top.Add.Marker(Math.Log10(kp), Math.Log10(report.Pivot.As), MarkerShape.OpenCircle, 11, C(PlotPalette.Slate));
                mk.LegendText = "A_s at pivot";
            }
        }
        MarkUnreliable(top, s);
        double pad = Math.Max(0.05 * (yMax - yMin), 0.05);
        // Below the lowest curve (often P_t, flat) a margin of at least a third of a decade keeps it off the axis edge.
        double below = Math.Max(pad, 1.0 / 3);
        double headroom = 0.5 * (yMax - yMin) + 2 * pad; // room for the legend above the curves
        top.Axes.SetLimits(xMin, xMax, yMin - below, yMax + headroom);
        top.Axes.Bottom.TickGenerator = LogTicks(xMin, xMax, labels: false);
        top.Axes.Left.TickGenerator = LogTicks(yMin - below, yMax + headroom, labels: true);
        top.YLabel("P(k)");
        top.Title(PlotScales.Title(Subject(report), string.Create(Inv, $"primordial spectra (n_s = {report.Pivot.Ns:0.0000}, r = {report.Pivot.R:0.###e+0})")));
        top.ShowLegend(Alignment.UpperRight);
        top.Layout.Fixed(new PixelPadding(95, 30, 12, PlotScales.TitlePadding(top.Axes.Title.Label.Text)));

        var bottom = NewPlot();
        double thr = report.Settings.FlagSettings.SpectrumThreshold;
        var ps = Ratio(k, s.Ps.AsSpan(), sr.PsSecondOrder.AsSpan());
        var pt = Ratio(k, s.Pt.AsSpan(), sr.PtSecondOrder.AsSpan());
        var (dMin, dMax) = Range(new[] { ps.Y, pt.Y }.Where(y => y.Length >= 1));
        // Slow roll poor or negative (ratios far beyond 1, or below -1): a symmetric-log axis, linear within the flag
        // threshold, so that the whole range stays readable with tick labels of powers of ten.
        bool symLog = Math.Max(Math.Abs(dMin), Math.Abs(dMax)) > SymLogAbove;
        double c = thr > 0 && double.IsFinite(thr) ? thr : 0.01;
        Func<double, double> map = symLog ? d => PlotScales.SymLog(d, c) : d => d;
        AddRatioLine(bottom, ps, map, PlotPalette.DeepTeal, "P_s");
        AddRatioLine(bottom, pt, map, PlotPalette.BurntOrange, "P_t");
        foreach (var f in report.Flags)
        {
            if (f.Kind != FlagKinds.SpectrumDeviation || !(f.Lower > 0) || !(f.Upper > 0)) continue;
            var span = bottom.Add.HorizontalSpan(Math.Log10(f.Lower), Math.Log10(f.Upper), C(PlotPalette.Plum).WithAlpha(0.15));
            span.LineColor = Colors.Transparent;
        }
        bottom.Add.HorizontalLine(map(thr), 1f, C(PlotPalette.Plum), LinePattern.Dotted);
        bottom.Add.HorizontalLine(map(-thr), 1f, C(PlotPalette.Plum), LinePattern.Dotted);
        bottom.Add.HorizontalLine(0, 1f, C(PlotPalette.Slate), LinePattern.Solid);
        double yLo = Math.Min(map(dMin), map(-1.5 * thr)), yHi = Math.Max(map(dMax), map(1.5 * thr));
        double dPad = 0.08 * (yHi - yLo);
        if (kp > 0 && double.IsFinite(kp)) bottom.Add.VerticalLine(Math.Log10(kp), 1.5f, C(PlotPalette.Slate), LinePattern.Dotted);
        bottom.Axes.SetLimits(xMin, xMax, yLo - dPad, yHi + dPad);
        bottom.Axes.Bottom.TickGenerator = LogTicks(xMin, xMax, labels: true);
        if (symLog)
        {
            var ticks = new ScottPlot.TickGenerators.NumericManual();
            foreach (var (pos, label) in PlotScales.SymLogTicks(yLo - dPad, yHi + dPad, c)) ticks.AddMajor(pos, label);
            bottom.Axes.Left.TickGenerator = ticks;
        }
        bottom.XLabel("k [Mpc^-1]");
        bottom.YLabel(symLog ? "P/P_SR - 1 (symlog)" : "P_exact / P_SR - 1");
        bottom.Layout.Fixed(new PixelPadding(95, 30, 55, 8));
        return (top, bottom);
    }

    /// <summary>Builds the background plot.</summary>
    public static Plot BuildBackground(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var b = report.Background;
        if (b.N.Length < 2) throw new ArgumentException("background plot: need at least two samples");
        var plot = NewPlot();
        double wLo = b.WindowStart, wHi = b.WindowEnd;
        if (double.IsFinite(wLo) && double.IsFinite(wHi) && wHi > wLo)
        {
            var span = plot.Add.HorizontalSpan(wLo, wHi, C(PlotPalette.Sand).WithAlpha(0.6));
            span.LineColor = Colors.Transparent;
            span.LegendText = "observable window";
        }
        var lines = new List<(double[] X, double[] Y)>();
        AddLogLine(plot, lines, b.N.AsSpan(), b.Epsilon1.AsSpan(), PlotPalette.DeepTeal, LinePattern.Solid, "epsilon_1", logX: false);
        var absE2 = new double[b.Epsilon2.Length];
        for (int i = 0; i < absE2.Length; i++) absE2[i] = Math.Abs(b.Epsilon2[i]);
        AddLogLine(plot, lines, b.N.AsSpan(), absE2, PlotPalette.BurntOrange, LinePattern.Solid, "|epsilon_2|", logX: false);
        plot.Add.HorizontalLine(0, 1f, C(PlotPalette.Slate), LinePattern.Dotted); // epsilon = 1
        if (double.IsFinite(b.NPivot))
        {
            var v = plot.Add.VerticalLine(b.NPivot, 1.5f, C(PlotPalette.Slate), LinePattern.Dashed);
            v.LegendText = string.Create(Inv, $"pivot exit (N_* = {report.Pivot.NStar:0.0})");
        }
        bool first = true;
        foreach (var nx in b.Epsilon1Crossings)
        {
            if (!double.IsFinite(nx) || nx == b.NEnd) continue;
            var v = plot.Add.VerticalLine(nx, 1f, C(PlotPalette.Plum), LinePattern.Dotted);
            if (first) v.LegendText = "epsilon_1 = 1 crossings";
            first = false;
        }
        if (double.IsFinite(b.NEnd))
        {
            var v = plot.Add.VerticalLine(b.NEnd, 2f, C(PlotPalette.Plum), LinePattern.Solid);
            v.LegendText = "end of inflation";
        }
        double xMin = b.N[0], xMax = b.N[^1];
        var (yMin, yMax) = Range(lines.Select(l => l.Y));
        yMax = Math.Max(yMax, 0.3);
        yMin = Math.Max(yMin, yMax - 9); // |epsilon_2| passes through zero: keep its dips from flattening the plot
        double pad = 0.05 * (yMax - yMin);
        plot.Axes.SetLimits(xMin, xMax, yMin - pad, yMax + pad);
        plot.Axes.Left.TickGenerator = LogTicks(yMin - pad, yMax + pad, labels: true);
        plot.XLabel("N [e-folds]");
        plot.YLabel("epsilon_1, |epsilon_2|");
        plot.Title(PlotScales.Title(Subject(report), "Hubble-flow parameters"));
        plot.ShowLegend(Alignment.UpperLeft);
        plot.Layout.Fixed(new PixelPadding(95, 30, 55, PlotScales.TitlePadding(plot.Axes.Title.Label.Text)));
        return plot;
    }

    internal static Plot NewPlot()
    {
        var p = new Plot();
        p.FigureBackground.Color = C(PlotPalette.Paper);
        p.DataBackground.Color = Colors.White;
        p.Axes.Color(C(PlotPalette.Slate));
        p.Grid.MajorLineColor = C(PlotPalette.Mist);
        p.Legend.FontSize = 12;
        p.Legend.BackgroundColor = Colors.White.WithAlpha(0.85);
        p.Legend.OutlineColor = C(PlotPalette.Mist);
        return p;
    }

    /// <summary>
    /// Shades the k ranges whose estimated error is above the tolerance or not a bound (one legend entry), so that a
    /// curve drawn there is read as unreliable rather than as structure.
    /// </summary>
    private static void MarkUnreliable(Plot plot, SpectrumSamples s)
    {
        bool labelled = false;
        int n = s.K.Length;
        for (int i = 0; i < n; i++)
        {
            if (!s.Unreliable(i)) continue;
            int j = i;
            while (j + 1 < n && s.Unreliable(j + 1)) j++;
            // Half-way to the neighbouring samples in ln k, so that a single sample still shows.
            double lo = i > 0 ? 0.5 * (Math.Log10(s.K[i - 1]) + Math.Log10(s.K[i])) : Math.Log10(s.K[i]);
            double hi = j + 1 < n ? 0.5 * (Math.Log10(s.K[j]) + Math.Log10(s.K[j + 1])) : Math.Log10(s.K[j]);
            var span = plot.Add.HorizontalSpan(lo, hi, C(PlotPalette.Plum).WithAlpha(0.18));
            span.LineColor = Colors.Transparent;
            if (!labelled)
            {
                span.LegendText = string.Create(Inv, $"error above tolerance {s.Tolerance:0.#e+0} or not bounded");
                labelled = true;
            }
            i = j;
        }
    }

    internal static void AddLogLine(Plot plot, List<(double[] X, double[] Y)> sink, ReadOnlySpan<double> x, ReadOnlySpan<double> y,
        string color, LinePattern pattern, string label, bool logX = true)
    {
        var xs = new List<double>(x.Length);
        var ys = new List<double>(x.Length);
        int n = Math.Min(x.Length, y.Length);
        for (int i = 0; i < n; i++)
        {
            if (!(y[i] > 0) || !double.IsFinite(y[i]) || !double.IsFinite(x[i]) || (logX && !(x[i] > 0))) continue;
            xs.Add(logX ? Math.Log10(x[i]) : x[i]);
            ys.Add(Math.Log10(y[i]));
        }
        if (xs.Count == 0) return;
        if (xs.Count == 1)
        {
            AddPoint(plot, xs[0], ys[0], color, pattern.Equals(LinePattern.Solid) ? MarkerShape.FilledCircle : MarkerShape.OpenCircle, label);
            sink.Add((xs.ToArray(), ys.ToArray()));
            return;
        }
        var line = plot.Add.ScatterLine(xs.ToArray(), ys.ToArray(), C(color));
        line.LinePattern = pattern;
        line.LineWidth = 2.2f;
        line.LegendText = label;
        sink.Add((xs.ToArray(), ys.ToArray()));
    }

    /// <summary>The residual panel switches to a symmetric-log axis when |P_exact / P_SR - 1| exceeds this somewhere.</summary>
    public const double SymLogAbove = 1.0;

    // (log10 k, P_exact / P_SR - 1) where both are finite.
    private static (double[] X, double[] Y) Ratio(ReadOnlySpan<double> k, ReadOnlySpan<double> exact, ReadOnlySpan<double> slowRoll)
    {
        var xs = new List<double>(k.Length);
        var ys = new List<double>(k.Length);
        for (int i = 0; i < k.Length; i++)
        {
            double d = exact[i] / slowRoll[i] - 1;
            if (!(k[i] > 0) || !double.IsFinite(d)) continue;
            xs.Add(Math.Log10(k[i]));
            ys.Add(d);
        }
        return (xs.ToArray(), ys.ToArray());
    }

    private static void AddRatioLine(Plot plot, (double[] X, double[] Y) ratio, Func<double, double> map, string color, string label)
    {
        if (ratio.X.Length == 0) return;
        if (ratio.X.Length == 1)
        {
            AddPoint(plot, ratio.X[0], map(ratio.Y[0]), color, MarkerShape.FilledCircle, label);
            return;
        }
        var line = plot.Add.ScatterLine(ratio.X, ratio.Y.Select(map).ToArray(), C(color));
        line.LineWidth = 2f;
        line.LegendText = label;
    }

    /// <summary>The model's name in our plot titles (<see cref="PlotScales.Subject"/>).</summary>
    public static string Subject(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        return PlotScales.Subject(report.Settings.Get("title"), report.Model.Id, report.Model.Potential);
    }

    /// <summary>A lone sample (a spectrum of one wavenumber) drawn as a labelled marker instead of a line.</summary>
    private static void AddPoint(Plot plot, double x, double y, string color, MarkerShape shape, string label)
    {
        var mk = plot.Add.Marker(x, y, shape, 9, C(color));
        mk.LegendText = label;
    }

    internal static (double Min, double Max) Range(IEnumerable<double[]> series)
    {
        double lo = double.PositiveInfinity, hi = double.NegativeInfinity;
        foreach (var s in series)
            foreach (var v in s)
            {
                if (v < lo) lo = v;
                if (v > hi) hi = v;
            }
        if (!double.IsFinite(lo)) return (-1, 1);
        if (hi - lo < 1e-12) return (lo - 0.5, hi + 0.5);
        return (lo, hi);
    }

    /// <summary>
    /// Ticks for an axis that carries log10 values from lo to hi: powers of ten with 2..9 minor ticks when the
    /// range spans at least one decade (thinned if many), otherwise mantissa ticks 1-2-5 times a power of ten.
    /// </summary>
    internal static ScottPlot.TickGenerators.NumericManual LogTicks(double lo, double hi, bool labels)
    {
        var gen = new ScottPlot.TickGenerators.NumericManual();
        foreach (var (pos, label, major) in LogTickList(lo, hi, labels))
        {
            if (major) gen.AddMajor(pos, label);
            else gen.AddMinor(pos);
        }
        return gen;
    }

    /// <summary>The ticks of <see cref="LogTicks"/> as (position in log10, label, is major).</summary>
    internal static List<(double Position, string Label, bool Major)> LogTickList(double lo, double hi, bool labels)
    {
        var ticks = new List<(double, string, bool)>();
        if (hi - lo >= 1.0)
        {
            int e0 = (int)Math.Floor(lo), e1 = (int)Math.Ceiling(hi);
            int step = Math.Max(1, (int)Math.Ceiling((e1 - e0) / 8.0));
            for (int e = e0; e <= e1; e++)
            {
                if (e >= lo && e <= hi && (e - e0) % step == 0)
                    ticks.Add((e, labels ? $"1e{e.ToString(Inv)}" : "", true));
                if (step == 1)
                    for (int m = 2; m <= 9; m++)
                    {
                        double v = e + Math.Log10(m);
                        if (v >= lo && v <= hi) ticks.Add((v, "", false));
                    }
            }
            return ticks;
        }
        // Less than a decade: linear mantissa ticks 1-2-5 times a power of ten.
        double a = Math.Pow(10, lo), b = Math.Pow(10, hi);
        double raw = (b - a) / 5;
        double p = Math.Pow(10, Math.Floor(Math.Log10(raw)));
        double stepLin = raw / p < 1.5 ? p : raw / p < 3.5 ? 2 * p : raw / p < 7.5 ? 5 * p : 10 * p;
        for (long i = (long)Math.Ceiling(a / stepLin); i * stepLin <= b * (1 + 1e-12); i++)
        {
            double v = i * stepLin;
            ticks.Add((Math.Log10(v), labels ? v.ToString("0.###e+0", Inv) : "", true));
        }
        return ticks;
    }

    internal static void SaveStackedPng(string path, Plot top, int hTop, Plot bottom, int hBottom)
    {
        // Each panel is rendered on its own (a plot render clears the whole canvas it is given), then composed.
        var info = new SKImageInfo(Width, hTop + hBottom);
        using var surface = SKSurface.Create(info) ?? throw new InvalidOperationException("cannot create a drawing surface");
        var canvas = surface.Canvas;
        canvas.Clear(SKColor.Parse(PlotPalette.Paper));
        using (var a = SKImage.FromEncodedData(top.GetImageBytes(Width, hTop, ImageFormat.Png)))
            canvas.DrawImage(a, 0, 0);
        using (var b = SKImage.FromEncodedData(bottom.GetImageBytes(Width, hBottom, ImageFormat.Png)))
            canvas.DrawImage(b, 0, hTop);
        canvas.Flush();
        using var image = surface.Snapshot();
        using var data = image.Encode(SKEncodedImageFormat.Png, 100);
        using var fs = new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.None);
        data.SaveTo(fs);
    }

    /// <summary>Two SVG plots stacked into one SVG document (nested svg elements, ids of the second prefixed).</summary>
    internal static string StackedSvg(Plot top, int hTop, Plot bottom, int hBottom)
    {
        string a = InnerSvg(top.GetSvgXml(Width, hTop), 0, "p1-");
        string b = InnerSvg(bottom.GetSvgXml(Width, hBottom), hTop, "p2-");
        var sb = new StringBuilder();
        sb.Append("<?xml version=\"1.0\" encoding=\"utf-8\" ?>\n");
        sb.Append(Inv, $"<svg xmlns=\"http://www.w3.org/2000/svg\" xmlns:xlink=\"http://www.w3.org/1999/xlink\" width=\"{Width}\" height=\"{hTop + hBottom}\">\n");
        sb.Append(a).Append('\n').Append(b).Append("\n</svg>\n");
        return sb.ToString();
    }

    private static string InnerSvg(string svg, int yOffset, string idPrefix)
    {
        int start = svg.IndexOf("<svg", StringComparison.Ordinal);
        if (start < 0) throw new InvalidOperationException("plot renderer returned no SVG element");
        string body = svg[start..];
        body = body.Replace("id=\"", "id=\"" + idPrefix, StringComparison.Ordinal)
                   .Replace("url(#", "url(#" + idPrefix, StringComparison.Ordinal)
                   .Replace("href=\"#", "href=\"#" + idPrefix, StringComparison.Ordinal);
        return "<svg x=\"0\" y=\"" + yOffset.ToString(Inv) + "\"" + body[4..];
    }
}
