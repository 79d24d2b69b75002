using System.Globalization;
using System.Text;
using ModeSolver.Diagnostics;
using ModeSolver.Report;
using ModeSolver.Results;
using ScottPlot;

namespace ModeSolver.Output;

/// <summary>
/// The plots of an n-field run, in the style of <see cref="RunPlots"/>: (a) the trajectory in field space over contours of
/// ln V (two fields; the start, the pivot's exit and the end marked); (b) the turn rate eta_perp (left axis) and the
/// entropic mass m_s^2/H^2 (right axis, two fields) against N, with the flag thresholds and the flagged ranges shaded.
/// </summary>
public static class MultiFieldPlots
{
    /// <summary>Figure height in pixels (width: <see cref="RunPlots.Width"/>).</summary>
    public const int Height = 640;

    /// <summary>Contour levels of ln V drawn in the field-space plot.</summary>
    public const int ContourLevels = 14;

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;
    private static Color C(string hex) => Color.FromHex(hex);

    /// <summary>Saves the field-space figure.</summary>
    public static void SaveTrajectory(RunReport report, string path, PlotFormat format) => Save(BuildTrajectory(report), path, format);

    /// <summary>Saves the eta_perp and m_s^2/H^2 figure.</summary>
    public static void SaveKinematics(RunReport report, string path, PlotFormat format) => Save(BuildKinematics(report), path, format);

    /// <summary>The trajectory over contours of ln V (two fields); for other n, a plot saying so.</summary>
    public static Plot BuildTrajectory(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var plot = RunPlots.NewPlot();
        var m = report.MultiField;
        if (m is null || m.Trajectory.FieldCount != 2 || m.Potential is null)
        {
            plot.Title(PlotScales.Title(RunPlots.Subject(report), m is null ? "not an n-field run" : "the field-space plot is drawn for two fields"));
            plot.Axes.SetLimits(0, 1, 0, 1);
            return plot;
        }
        var g = m.Potential;
        var t = m.Trajectory;
        int nx = g.X.Length, ny = g.Y.Length;
        double lo = double.PositiveInfinity, hi = double.NegativeInfinity;
        foreach (double v in g.LnV)
            if (double.IsFinite(v)) { lo = Math.Min(lo, v); hi = Math.Max(hi, v); }
        if (double.IsFinite(lo) && hi > lo)
        {
            var grid = new Coordinates3d[ny, nx];
            for (int j = 0; j < ny; j++)
                for (int i = 0; i < nx; i++)
                {
                    double v = g.LnV[j * nx + i];
                    grid[j, i] = new Coordinates3d(g.X[i], g.Y[j], double.IsFinite(v) ? v : lo);
                }
            var contours = plot.Add.ContourLines(grid);
            var levels = new double[ContourLevels];
            for (int k = 0; k < ContourLevels; k++) levels[k] = lo + (hi - lo) * (k + 0.5) / ContourLevels;
            contours.ContourLineLevels = levels;
            contours.LineColor = C(PlotPalette.Mist).WithAlpha(1.0).Darken(0.25);
            contours.LabelStyle.IsVisible = false;
        }
        int count = t.N.Length;
        var xs = new double[count];
        var ys = new double[count];
        for (int i = 0; i < count; i++) { xs[i] = t.Fields[2 * i]; ys[i] = t.Fields[2 * i + 1]; }
        var line = plot.Add.ScatterLine(xs, ys, C(PlotPalette.DeepTeal));
        line.LineWidth = 2.4f;
        line.LegendText = "trajectory";
        Mark(plot, xs[0], ys[0], MarkerShape.OpenCircle, PlotPalette.Slate, "start");
        double nPivot = report.Background.NPivot;
        if (double.IsFinite(nPivot) && nPivot >= t.N[0] && nPivot <= t.N[^1])
        {
            var (px, py) = At(t, nPivot);
            Mark(plot, px, py, MarkerShape.FilledDiamond, PlotPalette.BurntOrange, string.Create(Inv, $"pivot exit (N_* = {report.Pivot.NStar:0.0})"));
        }
        Mark(plot, xs[^1], ys[^1], MarkerShape.FilledSquare, PlotPalette.Plum, "end of inflation");
        plot.Axes.SetLimits(g.X[0], g.X[^1], g.Y[0], g.Y[^1]);
        plot.XLabel(t.FieldNames[0]);
        plot.YLabel(t.FieldNames[1]);
        plot.Title(PlotScales.Title(RunPlots.Subject(report), "trajectory in field space over contours of ln V"));
        plot.ShowLegend(Alignment.UpperLeft);
        plot.Layout.Fixed(new PixelPadding(95, 30, 55, PlotScales.TitlePadding(plot.Axes.Title.Label.Text)));
        return plot;
    }

    /// <summary>eta_perp and m_s^2/H^2 against N during inflation.</summary>
    public static Plot BuildKinematics(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var plot = RunPlots.NewPlot();
        var m = report.MultiField;
        if (m is null)
        {
            plot.Title(PlotScales.Title(RunPlots.Subject(report), "not an n-field run"));
            plot.Axes.SetLimits(0, 1, 0, 1);
            return plot;
        }
        var t = m.Trajectory;
        foreach (var f in report.Flags)
        {
            if (f.Kind != FlagKinds.LightEntropicTurn && f.Kind != FlagKinds.EntropicInstability) continue;
            var span = plot.Add.HorizontalSpan(f.Lower, f.Upper, C(PlotPalette.Plum).WithAlpha(0.12));
            span.LineColor = Colors.Transparent;
            span.LegendText = f.Kind;
        }
        var (nTurn, turn) = Finite(t.N.AsSpan(), t.TurnRate.AsSpan());
        var turnLine = plot.Add.ScatterLine(nTurn, turn, C(PlotPalette.DeepTeal));
        turnLine.LineWidth = 2.2f;
        turnLine.LegendText = "eta_perp (left)";
        var limit = plot.Add.HorizontalLine(TrajectoryFlags.TurnRateLimit, 1f, C(PlotPalette.DeepTeal), LinePattern.Dotted);
        limit.LegendText = string.Create(Inv, $"eta_perp = {TrajectoryFlags.TurnRateLimit:0.##}");
        double turnMax = turn.Length > 0 ? Math.Max(turn.Max(), 2 * TrajectoryFlags.TurnRateLimit) : 1;
        plot.Axes.Left.Label.Text = "eta_perp";
        if (t.FieldCount == 2)
        {
            var (nMass, mass) = Finite(t.N.AsSpan(), t.EntropicMass.AsSpan());
            var massLine = plot.Add.ScatterLine(nMass, mass, C(PlotPalette.BurntOrange));
            massLine.LineWidth = 2.2f;
            massLine.LegendText = "m_s^2/H^2 (right)";
            massLine.Axes.YAxis = plot.Axes.Right;
            var light = plot.Add.HorizontalLine(TrajectoryFlags.LightEntropicMass, 1f, C(PlotPalette.BurntOrange), LinePattern.Dotted);
            light.Axes.YAxis = plot.Axes.Right;
            light.LegendText = string.Create(Inv, $"m_s^2/H^2 = {TrajectoryFlags.LightEntropicMass:0.#}");
            var zero = plot.Add.HorizontalLine(0, 1f, C(PlotPalette.Slate), LinePattern.Dashed);
            zero.Axes.YAxis = plot.Axes.Right;
            double mLo = mass.Length > 0 ? Math.Min(mass.Min(), 0) : -1, mHi = mass.Length > 0 ? Math.Max(mass.Max(), 2 * TrajectoryFlags.LightEntropicMass) : 1;
            plot.Axes.Right.Min = mLo - 0.05 * (mHi - mLo);
            plot.Axes.Right.Max = mHi + 0.05 * (mHi - mLo);
            plot.Axes.Right.Label.Text = "m_s^2/H^2";
        }
        if (double.IsFinite(report.Background.NPivot))
        {
            var v = plot.Add.VerticalLine(report.Background.NPivot, 1.5f, C(PlotPalette.Slate), LinePattern.Dashed);
            v.LegendText = string.Create(Inv, $"pivot exit (N_* = {report.Pivot.NStar:0.0})");
        }
        plot.Axes.SetLimitsX(t.N[0], t.N[^1]);
        plot.Axes.SetLimitsY(0, 1.08 * turnMax, plot.Axes.Left);
        plot.XLabel("N [e-folds]");
        plot.Title(PlotScales.Title(RunPlots.Subject(report), "turn rate and entropic mass during inflation"));
        plot.ShowLegend(Alignment.UpperLeft);
        plot.Layout.Fixed(new PixelPadding(95, 95, 55, PlotScales.TitlePadding(plot.Axes.Title.Label.Text)));
        return plot;
    }

    private static (double X, double Y) At(Trajectories.TrajectorySamples t, double n)
    {
        int i = 1;
        while (i < t.N.Length - 1 && t.N[i] < n) i++;
        double w = (n - t.N[i - 1]) / (t.N[i] - t.N[i - 1]);
        return (t.Fields[2 * (i - 1)] + w * (t.Fields[2 * i] - t.Fields[2 * (i - 1)]),
            t.Fields[2 * (i - 1) + 1] + w * (t.Fields[2 * i + 1] - t.Fields[2 * (i - 1) + 1]));
    }

    private static (double[] X, double[] Y) Finite(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var xs = new List<double>(x.Length);
        var ys = new List<double>(x.Length);
        for (int i = 0; i < x.Length; i++)
            if (double.IsFinite(x[i]) && double.IsFinite(y[i])) { xs.Add(x[i]); ys.Add(y[i]); }
        return (xs.ToArray(), ys.ToArray());
    }

    private static void Mark(Plot plot, double x, double y, MarkerShape shape, string color, string label)
    {
        var mk = plot.Add.Marker(x, y, shape, 11, C(color));
        mk.LegendText = label;
    }

    private static void Save(Plot plot, string path, PlotFormat format) => RunPlots.SaveSingle(plot, path, format, RunPlots.Width, Height);
}
