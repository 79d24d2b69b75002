using ScottPlot;

namespace ModeSolver.Sweeps;

/// <summary>
/// The (n_s, r) plot of a large sweep: above <see cref="LineLimit"/> plotted points the lines of <see cref="SweepPlot"/>
/// would be an unreadable tangle (and an SVG of many megabytes), so the points are binned into a density map
/// (cells coloured by log10 of the number of points) over the same observational bands. Built from two streaming
/// passes over the records: memory and file size do not depend on the number of points.
/// </summary>
public static class SweepDensityPlot
{
    /// <summary>Up to this many plottable points the plot draws lines and markers (<see cref="SweepPlot.Build"/>); above it, a density map.</summary>
    public const int LineLimit = 20_000;

    /// <summary>Cells of the density map along n_s.</summary>
    public const int CellsX = 240;

    /// <summary>Cells of the density map along r.</summary>
    public const int CellsY = 160;

    /// <summary>
    /// Writes ns-r.png and ns-r.svg: lines and markers for up to <see cref="LineLimit"/> plottable points, a density
    /// map above. <paramref name="records"/> is enumerated once, or twice for the density map.
    /// </summary>
    public static void Write(string directory, SweepSpec spec, Func<IEnumerable<SweepRecord>> records, SweepPlotOptions? options = null)
    {
        options ??= new SweepPlotOptions();
        var small = new List<SweepRecord>();
        bool large = false;
        foreach (var r in records())
        {
            if (!Plottable(r, options.LogR)) continue;
            if (small.Count == LineLimit) { large = true; break; }
            small.Add(r.WithoutSpectrum()); // the plot needs n_s and r only: spectra are not held
        }
        if (!large)
        {
            SweepPlot.Write(directory, spec, small, options);
            return;
        }
        var plot = BuildDensity(spec, records, options);
        SweepOutputs.WriteAtomically(Path.Combine(directory, SweepFiles.PlotPng), p => plot.SavePng(p, options.Width, options.Height));
        SweepOutputs.WriteAtomically(Path.Combine(directory, SweepFiles.PlotSvg), p => plot.SaveSvg(p, options.Width, options.Height));
    }

    /// <summary>The density map of every plottable record over the observational bands of <see cref="SweepPlot.Build"/>.</summary>
    public static Plot BuildDensity(SweepSpec spec, Func<IEnumerable<SweepRecord>> records, SweepPlotOptions options)
    {
        bool log = options.LogR;
        double xmin = double.PositiveInfinity, xmax = double.NegativeInfinity, ymin = double.PositiveInfinity, ymax = double.NegativeInfinity;
        long n = 0;
        foreach (var r in records())
        {
            if (!Plottable(r, log)) continue;
            double y = log ? Math.Log10(r.R) : r.R;
            xmin = Math.Min(xmin, r.Ns); xmax = Math.Max(xmax, r.Ns);
            ymin = Math.Min(ymin, y); ymax = Math.Max(ymax, y);
            n++;
        }
        if (xmax <= xmin) { xmin -= 1e-3; xmax += 1e-3; }
        if (ymax <= ymin) { double pad = log ? 0.1 : Math.Max(Math.Abs(ymin) * 0.01, 1e-6); ymin -= pad; ymax += pad; }
        double cellW = (xmax - xmin) / CellsX, cellH = (ymax - ymin) / CellsY;
        var counts = new double[CellsY, CellsX];
        foreach (var r in records())
        {
            if (!Plottable(r, log)) continue;
            double y = log ? Math.Log10(r.R) : r.R;
            int i = Math.Clamp((int)((r.Ns - xmin) / cellW), 0, CellsX - 1);
            int j = Math.Clamp((int)((y - ymin) / cellH), 0, CellsY - 1);
            counts[CellsY - 1 - j, i]++; // row 0 is the top of the map
        }
        for (int j = 0; j < CellsY; j++)
            for (int i = 0; i < CellsX; i++)
                counts[j, i] = counts[j, i] > 0 ? Math.Log10(counts[j, i]) : double.NaN; // empty cells stay transparent

        // The bands, bounds, axis labels and ticks of the line plot, from a one-axis stand-in with no points (so that
        // no per-value legend or marker table of a long axis is built).
        var standIn = new SweepSpec([SweepAxis.List("point", [0.0])]);
        var plot = SweepPlot.Build(standIn, [], options);
        // The colour scale is named in the title: a colour-bar label would overlap its tick labels.
        string what = $"n_s and r: density of {n} points (sweep over {string.Join(", ", spec.Keys)})\ncolour: log10 of the points per cell";
        plot.Title(string.IsNullOrWhiteSpace(options.Subject) ? what : $"{options.Subject}: {what}");
        var map = plot.Add.Heatmap(counts);
        map.Extent = new CoordinateRect(xmin, xmax, ymin, ymax);
        map.Colormap = new ScottPlot.Colormaps.Viridis();
        map.NaNCellColor = Colors.Transparent;
        plot.Add.ColorBar(map, Edge.Right);

        double c = options.NsCentre, s = options.NsSigma;
        double x0 = Math.Min(xmin, c - 2.5 * s), x1 = Math.Max(xmax, c + 2.5 * s), dx = (x1 - x0) * 0.05;
        plot.Axes.SetLimitsX(x0 - dx, x1 + dx);
        if (log)
        {
            double bound = Math.Log10(options.RUpper95), lo = Math.Min(ymin, options.ShowTarget ? Math.Log10(options.TargetR) : ymin);
            plot.Axes.SetLimitsY(Math.Floor(lo - 0.15), Math.Ceiling(Math.Max(ymax, bound) + 0.15));
        }
        else plot.Axes.SetLimitsY(0, Math.Max(ymax, options.RUpper95) * 1.15);
        return plot;
    }

    private static bool Plottable(SweepRecord r, bool log) => r.Ok && double.IsFinite(r.Ns) && double.IsFinite(r.R) && !(log && r.R <= 0);
}
