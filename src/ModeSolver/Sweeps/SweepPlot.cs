using System.Globalization;
using ScottPlot;

namespace ModeSolver.Sweeps;

/// <summary>Options of the (n_s, r) plot.</summary>
public sealed class SweepPlotOptions
{
    /// <summary>Plot log10 r with decade ticks labelled as powers of ten.</summary>
    public bool LogR { get; init; }
    /// <summary>Draw the next-generation target line r = <see cref="TargetR"/>.</summary>
    public bool ShowTarget { get; init; } = true;
    /// <summary>Central n_s (Planck 2018 X, A&amp;A 641, A10).</summary>
    public double NsCentre { get; init; } = 0.9649;
    /// <summary>One-sigma n_s error (Planck 2018 X, A&amp;A 641, A10).</summary>
    public double NsSigma { get; init; } = 0.0042;
    /// <summary>95% upper bound on r at 0.05/Mpc (BICEP/Keck 2021, PRL 127, 151301).</summary>
    public double RUpper95 { get; init; } = 0.036;
    /// <summary>Next-generation B-mode target (common practice).</summary>
    public double TargetR { get; init; } = 1e-3;
    /// <summary>Draw the 1 and 2 sigma contours of the Gaussian Delta chi^2 in (n_s, r) (<see cref="Observables.DataDistance"/>).</summary>
    public bool ShowContours { get; init; } = true;
    /// <summary>Image width in pixels.</summary>
    public int Width { get; init; } = 1300;
    /// <summary>Image height in pixels.</summary>
    public int Height { get; init; } = 700;
    /// <summary>What the sweep is of (deck title or model name), put in front of the plot title; null for none.</summary>
    public string? Subject { get; init; }
}

/// <summary>The colours of our sweep plots.</summary>
public static class SweepPalette
{
    /// <summary>Text and frame.</summary>
    public const string Ink = "#1E2233";
    /// <summary>n_s one-sigma band.</summary>
    public const string NsOneSigma = "#6C9BC438";
    /// <summary>n_s two-sigma band.</summary>
    public const string NsTwoSigma = "#6C9BC41C";
    /// <summary>Region excluded by the r bound.</summary>
    public const string RExcluded = "#B0413E14";
    /// <summary>The r bound line.</summary>
    public const string RBound = "#B0413E";
    /// <summary>The next-generation target line.</summary>
    public const string Target = "#6D6A75";
    /// <summary>Colours of the lines, cycled.</summary>
    public static readonly IReadOnlyList<string> Lines =
        ["#0F6E5A", "#D1603D", "#3D5A98", "#8C4A8C", "#B38A14", "#2F8F9D", "#A23B55", "#59616E"];
}

/// <summary>The (n_s, r) plot of a sweep: one line per family (points joined along the families key), marker shapes per markers key, observational bands.</summary>
public static class SweepPlot
{
    private static readonly MarkerShape[] Shapes =
        [MarkerShape.FilledCircle, MarkerShape.FilledSquare, MarkerShape.FilledTriangleUp, MarkerShape.FilledDiamond,
         MarkerShape.OpenCircle, MarkerShape.OpenSquare, MarkerShape.FilledTriangleDown, MarkerShape.Cross];

    /// <summary>Writes ns-r.png and ns-r.svg into <paramref name="directory"/> (each under a temporary name, then renamed).</summary>
    public static void Write(string directory, SweepSpec spec, IEnumerable<SweepRecord> records, SweepPlotOptions? options = null)
    {
        options ??= new SweepPlotOptions();
        var plot = Build(spec, records, options);
        SweepOutputs.WriteAtomically(Path.Combine(directory, SweepFiles.PlotPng), p => plot.SavePng(p, options.Width, options.Height));
        SweepOutputs.WriteAtomically(Path.Combine(directory, SweepFiles.PlotSvg), p => plot.SaveSvg(p, options.Width, options.Height));
    }

    /// <summary>Builds the plot (failed points and points without a finite n_s, r are left out; so is r &lt;= 0 on a log axis).</summary>
    public static Plot Build(SweepSpec spec, IEnumerable<SweepRecord> records, SweepPlotOptions options)
    {
        bool log = options.LogR;
        int fam = spec.Families is null ? 0 : spec.IndexOf(spec.Families);
        int mark = spec.Markers is null ? (spec.Keys.Count > 1 ? (fam == 0 ? 1 : 0) : -1) : spec.IndexOf(spec.Markers);
        // Keys zipped with the families key move along the line with it: they do not split the lines.
        var along = new bool[spec.Keys.Count];
        if (fam >= 0 && spec.Keys.Count > 0)
        {
            along[fam] = true;
            foreach (var group in spec.Zip)
                if (group.Contains(spec.Keys[fam]))
                    foreach (var k in group) along[spec.IndexOf(k)] = true;
        }
        if (mark >= 0 && along[mark]) mark = fam;
        var values = new double[spec.Keys.Count];
        var lines = new SortedDictionary<string, List<(long Index, double Along, double MarkValue, double X, double Y)>>(StringComparer.Ordinal);
        var lineOrder = new Dictionary<string, long>();
        foreach (var r in records.OrderBy(r => r.Index))
        {
            if (!r.Ok || !double.IsFinite(r.Ns) || !double.IsFinite(r.R) || (log && r.R <= 0)) continue;
            spec.GetValues(r.Index, values);
            var label = string.Join(", ", Enumerable.Range(0, values.Length).Where(j => !along[j]).Select(j => $"{spec.Keys[j]} = {spec.Axes[j].Text(values[j])}"));
            if (!lines.TryGetValue(label, out var list)) { lines[label] = list = []; lineOrder[label] = r.Index; }
            list.Add((r.Index, values[fam], mark >= 0 ? values[mark] : 0, r.Ns, log ? Math.Log10(r.R) : r.R));
        }

        var plot = new Plot();
        var ink = Color.FromHex(SweepPalette.Ink);
        plot.Axes.Bottom.Label.Text = "n_s";
        plot.Axes.Left.Label.Text = log ? "r (log scale)" : "r";
        plot.Axes.Bottom.Label.ForeColor = ink;
        plot.Axes.Left.Label.ForeColor = ink;
        plot.Title(TitleText(spec, fam, options.Subject));

        double c = options.NsCentre, s = options.NsSigma;
        var two = plot.Add.HorizontalSpan(c - 2 * s, c + 2 * s, Color.FromHex(SweepPalette.NsTwoSigma));
        two.LegendText = $"n_s = {G(c)} ± {G(2 * s)} (2σ), Planck 2018 X, A&A 641, A10";
        two.LineWidth = 0;
        two.EnableAutoscale = false;
        var one = plot.Add.HorizontalSpan(c - s, c + s, Color.FromHex(SweepPalette.NsOneSigma));
        one.LegendText = $"n_s = {G(c)} ± {G(s)} (1σ), Planck 2018 X";
        one.LineWidth = 0;
        one.EnableAutoscale = false;

        double yBound = log ? Math.Log10(options.RUpper95) : options.RUpper95;
        var excluded = plot.Add.VerticalSpan(yBound, log ? yBound + 10 : options.RUpper95 * 100, Color.FromHex(SweepPalette.RExcluded));
        excluded.LineWidth = 0;
        excluded.EnableAutoscale = false;
        var bound = plot.Add.HorizontalLine(yBound, 1.5f, Color.FromHex(SweepPalette.RBound), LinePattern.Solid);
        bound.LegendText = $"r < {G(options.RUpper95)} (95%), BICEP/Keck 2021, PRL 127, 151301";
        bound.EnableAutoscale = false;
        if (options.ShowTarget)
        {
            var target = plot.Add.HorizontalLine(log ? Math.Log10(options.TargetR) : options.TargetR, 1.2f, Color.FromHex(SweepPalette.Target), LinePattern.Dashed);
            target.LegendText = $"r = {G(options.TargetR)}, next-generation target (common practice)";
            target.EnableAutoscale = false;
        }

        if (options.ShowContours) AddContours(plot, options, log);

        var markShapes = new Dictionary<double, MarkerShape>();
        if (mark >= 0)
            for (int i = 0; i < spec.Axes[mark].Values.Count; i++)
                markShapes.TryAdd(spec.Axes[mark].Values[i], Shapes[markShapes.Count % Shapes.Length]);
        double xmin = c - 2.5 * s, xmax = c + 2.5 * s, ymin = double.PositiveInfinity, ymax = yBound;
        if (options.ShowContours) ymax = Math.Max(ymax, log ? Math.Log10(ContourTop(options)) : ContourTop(options));
        var ordered = lines.Keys.OrderBy(k => lineOrder[k]).ToList();
        // Many families: colours run along a colour map in line order, and the legend names an evenly spread
        // selection of them (first and last included) plus one entry saying how many lines there are.
        bool many = ordered.Count > SweepPalette.Lines.Count;
        var named = LegendSelection(ordered.Count, MaxLegendLines);
        var map = new ScottPlot.Colormaps.Viridis();
        for (int li = 0; li < ordered.Count; li++)
        {
            string label = ordered[li];
            var pts = lines[label].OrderBy(p => p.Along).ThenBy(p => p.Index).ToList();
            var col = many ? map.GetColor(0.9 * li / (ordered.Count - 1)) : Color.FromHex(SweepPalette.Lines[li % SweepPalette.Lines.Count]);
            var xs = pts.Select(p => p.X).ToArray();
            var ys = pts.Select(p => p.Y).ToArray();
            var sc = plot.Add.Scatter(xs, ys, col);
            sc.LineWidth = many ? 1.5f : 2;
            if (named.Contains(li)) sc.LegendText = label.Length == 0 ? spec.Keys[fam] : label;
            // The swept values at a few points of the first and the last line (both ends and the middle).
            if (fam >= 0 && (li == 0 || li == ordered.Count - 1))
                foreach (int pi in PointsToLabel(pts.Count))
                {
                    string value = spec.Axes[fam].Text(pts[pi].Along);
                    var t = plot.Add.Text(pi == 0 && li == 0 ? $"{spec.Keys[fam]} = {value}" : value, xs[pi], ys[pi]);
                    t.LabelFontSize = 11;
                    t.LabelFontColor = col;
                    t.LabelAlignment = li == 0 ? Alignment.LowerLeft : Alignment.UpperRight;
                    t.OffsetX = li == 0 ? 5 : -5;
                    t.OffsetY = li == 0 ? -4 : 4;
                }
            bool oneShape = mark >= 0 && mark != fam;
            sc.MarkerSize = oneShape ? 7 : 0;
            if (oneShape) sc.MarkerShape = markShapes[pts[0].MarkValue];
            if (mark == fam)
                foreach (var grp in pts.GroupBy(p => p.MarkValue))
                    plot.Add.Markers(grp.Select(p => p.X).ToArray(), grp.Select(p => p.Y).ToArray(), markShapes[grp.Key], 8, col);
            foreach (var p in pts)
            {
                xmin = Math.Min(xmin, p.X); xmax = Math.Max(xmax, p.X);
                ymin = Math.Min(ymin, p.Y); ymax = Math.Max(ymax, p.Y);
            }
        }
        if (mark == fam && mark >= 0)
            foreach (var (v, shape) in markShapes)
            {
                var legendOnly = plot.Add.Markers(new[] { double.NaN }, new[] { double.NaN }, shape, 8, ink);
                legendOnly.LegendText = $"{spec.Keys[mark]} = {spec.Axes[mark].Text(v)}";
            }

        double dx = (xmax - xmin) * 0.05;
        plot.Axes.SetLimitsX(xmin - dx, xmax + dx);
        if (log)
        {
            if (options.ShowTarget) ymin = Math.Min(ymin, Math.Log10(options.TargetR));
            if (!double.IsFinite(ymin)) ymin = yBound - 2;
            plot.Axes.SetLimitsY(Math.Floor(ymin - 0.15), Math.Ceiling(ymax + 0.15));
            var ticks = new ScottPlot.TickGenerators.NumericAutomatic
            {
                IntegerTicksOnly = true,
                LabelFormatter = y => "1e" + Math.Round(y).ToString(CultureInfo.InvariantCulture),
                MinorTickGenerator = new ScottPlot.TickGenerators.LogMinorTickGenerator(),
            };
            plot.Axes.Left.TickGenerator = ticks;
        }
        else
        {
            plot.Axes.SetLimitsY(0, Math.Max(ymax, options.RUpper95) * 1.15);
        }
        if (ordered.Count > named.Count)
        {
            var note = plot.Add.Markers(new[] { double.NaN }, new[] { double.NaN }, MarkerShape.None, 1, ink);
            note.LegendText = $"... {ordered.Count} lines in all ({ordered.Count - named.Count} not named here; see sweep.csv)";
        }
        plot.ShowLegend(Edge.Right);
        if (ordered.Count > 8) plot.Legend.FontSize = 11;
        return plot;
    }

    /// <summary>The most lines the legend names one by one.</summary>
    public const int MaxLegendLines = 10;

    /// <summary>The plot title: the subject (deck title or model), then what the lines follow.</summary>
    public static string TitleText(SweepSpec spec, int families, string? subject)
    {
        ArgumentNullException.ThrowIfNull(spec);
        string what = spec.Families is null && spec.Keys.Count == 1 ? $"n_s and r along {spec.Keys[0]}" : $"n_s and r, lines along {spec.Keys[families]}";
        return string.IsNullOrWhiteSpace(subject) ? what : $"{subject}: {what}";
    }

    /// <summary>The positions (of <paramref name="count"/> lines) the legend names: all up to <paramref name="max"/>, else an even spread with both ends.</summary>
    public static IReadOnlySet<int> LegendSelection(int count, int max)
    {
        var set = new SortedSet<int>();
        if (count <= max) { for (int i = 0; i < count; i++) set.Add(i); return set; }
        for (int i = 0; i < max; i++) set.Add((int)Math.Round((double)i * (count - 1) / (max - 1)));
        return set;
    }

    // Both ends and the middle of a line of n points.
    private static IEnumerable<int> PointsToLabel(int n) => n <= 0 ? [] : new SortedSet<int> { 0, n / 2, n - 1 };

    /// <summary>
    /// The n-sigma contours (n = 1, 2) of Delta chi^2 = ((n_s - c)/sigma)^2 + (r/sigma_r)^2 for two degrees of freedom,
    /// sigma_r = half the 95% bound: half-ellipses over r &gt;= 0.
    /// </summary>
    internal static List<(double[] Ns, double[] R)> Contours(SweepPlotOptions options)
    {
        var data = new Observables.DataConstraints(Ns: options.NsCentre, SigmaNs: options.NsSigma, SigmaR: options.RUpper95 / 2);
        var list = new List<(double[], double[])>();
        foreach (int n in new[] { 1, 2 })
        {
            double radius = Math.Sqrt(Observables.DataDistance.ContourLevel(n, 2));
            // Angles from just above 0 to just below pi (r > 0 for the log axis), geometric towards both ends so that
            // on a log axis the contour runs down to r ~ 1e-9 instead of stopping short.
            var angles = new List<double>();
            for (int j = 36; j > 0; j--) angles.Add(0.1 * Math.Pow(10, -j / 4.0));
            for (int i = 0; i <= 120; i++) angles.Add(0.1 + (Math.PI - 0.2) * i / 120);
            for (int j = 1; j <= 36; j++) angles.Add(Math.PI - 0.1 * Math.Pow(10, -j / 4.0));
            var x = new double[angles.Count]; var y = new double[angles.Count];
            for (int i = 0; i < x.Length; i++)
            {
                x[i] = data.Ns + data.SigmaNs * radius * Math.Cos(angles[i]);
                y[i] = data.SigmaR * radius * Math.Sin(angles[i]);
            }
            list.Add((x, y));
        }
        return list;
    }

    private static double ContourTop(SweepPlotOptions options) => options.RUpper95 / 2 * Math.Sqrt(Observables.DataDistance.ContourLevel(2, 2));

    private static void AddContours(Plot plot, SweepPlotOptions options, bool log)
    {
        var contours = Contours(options);
        for (int n = 0; n < contours.Count; n++)
        {
            var (x, y) = contours[n];
            var ys = log ? y.Select(Math.Log10).ToArray() : y;
            var line = plot.Add.ScatterLine(x, ys, Color.FromHex(SweepPalette.Ink).WithAlpha(n == 0 ? 0.8 : 0.5));
            line.LinePattern = n == 0 ? LinePattern.Solid : LinePattern.Dashed;
            line.LineWidth = 1.2f;
            line.LegendText = $"{n + 1}σ contour of the Gaussian Δχ² in (n_s, r), 2 dof (an approximation)";
        }
    }

    private static string G(double x) => x.ToString("G6", CultureInfo.InvariantCulture);
}
