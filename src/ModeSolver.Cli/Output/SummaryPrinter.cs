using System.Globalization;
using ModeSolver.Diagnostics;
using ModeSolver.Output;
using Spectre.Console;
using ModeSolver.Report;

namespace ModeSolver.Cli.Output;

/// <summary>
/// Terminal summary of a run: a table of the exact pivot values with their estimated errors beside the slow-roll ones (first order, second order,
/// potential form) with the differences exact minus slow roll (relative for A_s), then N_*, phi_*, H_*, V_*^(1/4),
/// N_total, then the flags (one line each) and warnings.
/// </summary>
public static class SummaryPrinter
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>
    /// A console writing to <paramref name="writer"/>: plain text (no colour, no ANSI codes, ASCII borders, 120
    /// columns) when <paramref name="plain"/> is true, e.g. when the output is redirected.
    /// </summary>
    public static IAnsiConsole CreateConsole(TextWriter writer, bool plain)
    {
        var console = AnsiConsole.Create(new AnsiConsoleSettings
        {
            Out = new AnsiConsoleOutput(writer),
            Ansi = plain ? AnsiSupport.No : AnsiSupport.Detect,
            ColorSystem = plain ? ColorSystemSupport.NoColors : ColorSystemSupport.Detect,
            Interactive = InteractionSupport.No,
        });
        if (plain) console.Profile.Width = 120;
        return console;
    }

    /// <summary>Console for standard output, plain when standard output is redirected.</summary>
    public static IAnsiConsole ForStandardOutput() => CreateConsole(Console.Out, Console.IsOutputRedirected);

    /// <summary>Prints the summary to a text writer.</summary>
    public static void Print(RunReport report, TextWriter writer, bool plain) => Print(report, CreateConsole(writer, plain), plain);

    /// <summary>Prints the summary to a console.</summary>
    public static void Print(RunReport report, IAnsiConsole console, bool plain = false)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(console);
        var p = report.Pivot;
        var sr = report.SlowRoll;
        var border = plain ? TableBorder.Ascii : TableBorder.Rounded;

        var m = report.Model;
        console.MarkupLine($"[bold]{Markup.Escape(TextSafety.Printable(m.Id))}[/] ({Markup.Escape(m.Frame.Code())}): {Markup.Escape(TextSafety.Printable(m.Description))}");
        console.MarkupLine(Markup.Escape(string.Create(Inv, $"pivot k_* = {p.KPivot:G6} /Mpc, amplitude: {report.AmplitudeMethod}")));

        var table = new Table().Border(border);
        table.AddColumn("quantity");
        table.AddColumn(new TableColumn("exact").RightAligned());
        table.AddColumn(new TableColumn("+- error").RightAligned());
        table.AddColumn(new TableColumn("SR 1st").RightAligned());
        table.AddColumn(new TableColumn("diff").RightAligned());
        table.AddColumn(new TableColumn("SR 2nd").RightAligned());
        table.AddColumn(new TableColumn("diff").RightAligned());
        table.AddColumn(new TableColumn("SR potential").RightAligned());
        table.AddColumn(new TableColumn("diff").RightAligned());
        var e = p.Errors;
        Row(table, "A_s", p.As, e.As, sr.FirstOrder.Ps, sr.SecondOrder.Ps, sr.Potential.Ps, relative: true);
        Row(table, "n_s", p.Ns, e.Ns, sr.FirstOrder.Ns, sr.SecondOrder.Ns, sr.Potential.Ns);
        Row(table, "alpha_s", p.AlphaS, e.AlphaS, sr.FirstOrder.AlphaS, sr.SecondOrder.AlphaS, sr.Potential.AlphaS);
        Row(table, "r", p.R, e.R, sr.FirstOrder.R, sr.SecondOrder.R, sr.Potential.R);
        Row(table, "n_t", p.Nt, e.Nt, sr.FirstOrder.Nt, sr.SecondOrder.Nt, sr.Potential.Nt);
        table.Caption("error = estimated absolute error of the exact value; diff = exact - slow roll (A_s: relative, exact/SR - 1)");
        console.Write(table);

        var info = new Table().Border(border).HideHeaders();
        info.AddColumn("name");
        info.AddColumn(new TableColumn("value").RightAligned());
        info.AddColumn("unit");
        info.AddRow("N_*", Num(p.NStar, "0.00"), "e-folds");
        info.AddRow("phi_*", Num(p.PhiStar, "G6"), "M_pl");
        info.AddRow("H_*", Num(p.HStar, "0.0000e+00"), "M_pl");
        info.AddRow("H_*", Num(p.HStarGeV, "0.0000e+00"), "GeV");
        info.AddRow("V_*^(1/4)", Num(p.EnergyScaleGeV, "0.0000e+00"), "GeV");
        info.AddRow("N_total", Num(p.NTotal, "0.00"), "e-folds");
        info.AddRow("N_reh", Num(p.NReh, "0.00"), "e-folds");
        AddDerived(info, report.Derived);
        info.AddRow("max rel. error", Num(p.MaxRelError, "0.0e+00"), "");
        info.AddRow("RHS evals / mode", Num(p.RhsEvaluationsPerMode, "0"), "");
        console.Write(info);
        ObservablesPrinter.Print(console, plain, report.Observables);
        if (report.Bispectrum is { } b)
        {
            Line(console, plain, string.Create(CultureInfo.InvariantCulture,
                $"bispectrum at k_* = {b.KPivot:G4} /Mpc: f_NL equilateral = {b.Equilateral.FNL:G5} +- {b.Equilateral.Error:G2} (slow roll {b.Equilateral.SlowRoll:G5}), squeezed (k3/k1 = {b.SqueezedRatio:G3}) = {b.Squeezed.FNL:G5} +- {b.Squeezed.Error:G2} (consistency (5/12)(1 - n_s) = {b.Squeezed.SlowRoll:G5})"), null);
            for (int i = 0; i < b.Triangles.Length && i < 10; i++)
            {
                var t = b.Triangles[i];
                Line(console, plain, string.Create(CultureInfo.InvariantCulture, $"  triangle ({t.K1:G4}, {t.K2:G4}, {t.K3:G4}) /Mpc: f_NL = {t.FNL:G5} +- {t.Error:G2}"), null);
            }
            if (b.Triangles.Length > 10) Line(console, plain, $"  ... {b.Triangles.Length - 10} more triangles in summary.json", null);
            if (b.Curve.K.Length > 0)
            {
                double lo = double.PositiveInfinity, hi = double.NegativeInfinity;
                foreach (double f in b.Curve.FNL) { lo = Math.Min(lo, f); hi = Math.Max(hi, f); }
                Line(console, plain, string.Create(CultureInfo.InvariantCulture,
                    $"  equilateral f_NL(k): {b.Curve.K.Length} points over k = {b.Curve.K[0]:G3} .. {b.Curve.K[^1]:G3} /Mpc, f_NL from {lo:G4} to {hi:G4}"), null);
            }
        }
        MultiFieldPrinter.Print(console, plain, report);

        // Flags and warnings: one line each. Plain output bypasses Spectre's wrapping so a line is never split.
        if (report.Flags.IsDefaultOrEmpty)
            Line(console, plain, "flags: none", "green");
        else
        {
            Line(console, plain, $"flags: {report.Flags.Length}", null);
            foreach (var f in report.Flags) Line(console, plain, $"  [{f.Kind}] {f.Message}", "yellow");
        }
        if (!report.Warnings.IsDefaultOrEmpty)
            foreach (var w in report.Warnings) Line(console, plain, $"warning: {w}", "red");
    }

    /// <summary>T_reh (when known), rho_end^(1/4) and r at 0.002 /Mpc with how it was obtained.</summary>
    private static void AddDerived(Table info, DerivedQuantities? d)
    {
        if (d is null) return;
        if (double.IsFinite(d.TRehGeV)) info.AddRow(d.TRehDerived ? "T_reh (derived)" : "T_reh (given)", Num(d.TRehGeV, "0.0000e+00"), "GeV");
        info.AddRow("rho_end^(1/4)", Num(d.RhoEndQuarterGeV, "0.0000e+00"), "GeV");
        string how = d.R002Source switch
        {
            "spectrum" => "exact spectrum",
            "mode" => "one exact mode",
            _ => Markup.Escape(d.R002Source),
        };
        info.AddRow("r at 0.002/Mpc", Num(d.R002, "0.00000e+00"), how);
    }

    internal static void Line(IAnsiConsole console, bool plain, string text, string? colour)
    {
        if (plain)
        {
            console.Profile.Out.Writer.WriteLine(text);
            return;
        }
        string escaped = Markup.Escape(text);
        console.MarkupLine(colour is null ? escaped : $"[{colour}]{escaped}[/]");
    }

    private static void Row(Table t, string name, double exact, double error, double first, double second, double potential, bool relative = false)
    {
        t.AddRow(name, Num(exact), double.IsFinite(error) ? error.ToString("0.0e+00", Inv) : "n/a", Num(first), Diff(exact, first, relative), Num(second), Diff(exact, second, relative),
            Num(potential), Diff(exact, potential, relative));
    }

    /// <summary>A value for the table: 6 significant digits, exponent form outside [1e-3, 1e4); "n/a" when not finite.</summary>
    internal static string Num(double v, string? format = null)
    {
        if (!double.IsFinite(v)) return "n/a";
        if (format is not null) return v.ToString(format, Inv);
        double a = Math.Abs(v);
        return a != 0 && (a < 1e-3 || a >= 1e4) ? v.ToString("0.00000e+00", Inv) : v.ToString("0.######", Inv);
    }

    private static string Diff(double exact, double sr, bool relative)
    {
        if (!double.IsFinite(exact) || !double.IsFinite(sr)) return "n/a";
        if (relative) return sr == 0 ? "n/a" : ((exact / sr - 1) * 100).ToString("+0.000;-0.000", Inv) + "%";
        return (exact - sr).ToString("+0.00e+00;-0.00e+00", Inv);
    }
}
