using System.Globalization;

namespace ModeSolver.Output;

/// <summary>
/// Helpers shared by our plots: the name a plot carries (deck title, catalogue id or the written-out potential) and the
/// symmetric-log scale of the residual panel.
/// </summary>
public static class PlotScales
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>The longest potential text put into a plot title; longer ones are cut with "...".</summary>
    public const int MaxPotentialLength = 40;

    /// <summary>
    /// The model's name for a plot title: the run's title when given, else the catalogue id, else "V = ..." (the
    /// written-out potential, shortened to <see cref="MaxPotentialLength"/> characters).
    /// </summary>
    public static string Subject(string? title, string? catalogueId, string potential)
    {
        if (!string.IsNullOrWhiteSpace(title)) return title.Trim();
        if (!string.IsNullOrWhiteSpace(catalogueId) && catalogueId != "formula") return catalogueId;
        string v = string.Join(' ', (potential ?? "").Split((char[])['\n', '\r', '\t', ' '], StringSplitOptions.RemoveEmptyEntries));
        return "V = " + (v.Length > MaxPotentialLength ? v[..(MaxPotentialLength - 3)] + "..." : v);
    }

    /// <summary>The longest one-line plot title (characters) that fits a 1000-pixel-wide plot; longer ones wrap.</summary>
    public const int MaxTitleLineLength = 88;

    /// <summary>
    /// A plot title "subject: detail" on one line when it fits <see cref="MaxTitleLineLength"/>, else with the detail on
    /// a second line (so that a long run title does not push the detail off the image).
    /// </summary>
    public static string Title(string subject, string detail) =>
        subject.Length + 2 + detail.Length <= MaxTitleLineLength ? subject + ": " + detail : subject + "\n" + detail;

    /// <summary>Pixels above the data area for a title of one line (45) or two (<see cref="Title"/> wraps long ones).</summary>
    public static float TitlePadding(string? title) => title is not null && title.Contains('\n') ? 68 : 45;

    /// <summary>
    /// The symmetric-log map of a ratio d: sign(d) log10(1 + |d| / c), linear (slope 1/(c ln 10)) within |d| &lt;&lt; c
    /// and logarithmic beyond, so that deviations from 1e-3 to 1e10 of either sign fit one axis. Monotonic and odd.
    /// </summary>
    public static double SymLog(double d, double c) => Math.Sign(d) * Math.Log10(1 + Math.Abs(d) / c);

    /// <summary>The inverse of <see cref="SymLog"/>.</summary>
    public static double SymLogInverse(double y, double c) => Math.Sign(y) * c * (Math.Pow(10, Math.Abs(y)) - 1);

    /// <summary>
    /// Ticks of a symmetric-log axis between the mapped limits <paramref name="lo"/> and <paramref name="hi"/>: 0,
    /// plus and minus <paramref name="c"/> (when clear of 0) and the powers of ten above it (thinned to at most about 5 per side), as
    /// (mapped position, label).
    /// </summary>
    public static List<(double Position, string Label)> SymLogTicks(double lo, double hi, double c)
    {
        var ticks = new List<(double, string)> { (0, "0") };
        double top = Math.Max(Math.Abs(lo), Math.Abs(hi));
        double dTop = SymLogInverse(top, c);
        int e0 = (int)Math.Ceiling(Math.Log10(c) + 1e-9), e1 = (int)Math.Floor(Math.Log10(Math.Max(dTop, c)) + 1e-9);
        int step = Math.Max(1, (int)Math.Ceiling((e1 - e0 + 1) / 5.0));
        // The ticks at plus and minus c only when they stand clear of 0 (a fifteenth of the axis or more).
        var values = new List<double>();
        if (SymLog(c, c) * 15 >= hi - lo) values.Add(c);
        for (int e = e0; e <= e1; e++)
            if ((e1 - e) % step == 0 && Math.Pow(10, e) > 1.5 * c) values.Add(Math.Pow(10, e));
        foreach (double v in values)
        {
            double y = SymLog(v, c);
            if (y <= hi) ticks.Add((y, "+" + Label(v)));
            if (-y >= lo) ticks.Add((-y, "-" + Label(v)));
        }
        return ticks;
    }

    private static string Label(double v)
    {
        double e = Math.Log10(v);
        if (Math.Abs(e - Math.Round(e)) < 1e-9 && (e >= 3 || e <= -3)) return "1e" + Math.Round(e).ToString(Inv);
        return v.ToString("G3", Inv);
    }
}
