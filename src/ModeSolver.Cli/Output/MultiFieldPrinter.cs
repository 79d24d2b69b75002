using System.Globalization;
using ModeSolver.Report;
using Spectre.Console;

namespace ModeSolver.Cli.Output;

/// <summary>
/// Terminal lines of an n-field run: the isocurvature at the pivot, delta N beside the modes with f_NL, and the
/// trajectory's largest turn rate and smallest entropic mass. Nothing for one field.
/// </summary>
internal static class MultiFieldPrinter
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public static void Print(IAnsiConsole console, bool plain, RunReport report)
    {
        void Say(FormattableString s, string? colour = null) => SummaryPrinter.Line(console, plain, Lower(s.ToString(Inv)), colour);
        if (report.Isocurvature is { } iso)
        {
            var p = iso.Pivot;
            Say($"isocurvature at the pivot: P_S = {p.Ps:0.0000e+00} +- {p.PsError:0.0e+00}, beta_iso = {p.BetaIso:G4}, cos Delta = {p.CosDelta:G4}, T_RS = {p.Trs:G4}");
        }
        if (report.MultiField is not { } m) return;
        if (m.DeltaN is { } d)
            Say($"delta N: P_zeta = {d.Pzeta:0.0000e+00} +- {d.PzetaError:0.0e+00} against the modes' {d.ModesPzeta:0.0000e+00} ({d.RelativeDifference:+0.000e+00;-0.000e+00} relative, slow-roll allowance {d.Allowance:0.0e+00}: {(d.Agrees ? "agree" : "DISAGREE")}); f_NL^local = {d.FNL:0.0000e+00} +- {d.FNLError:0.0e+00}",
                d.Agrees ? null : "yellow");
        else Say($"{m.DeltaNNote}", "yellow");
        var t = m.Trajectory;
        int turn = t.LargestTurnIndex, mass = t.SmallestEntropicMassIndex;
        string turnText = turn < 0 ? "n/a" : string.Create(Inv, $"{t.TurnRate[turn]:G3} at N = {t.N[turn]:0.00}");
        string massText = mass < 0 ? "" : string.Create(Inv, $", smallest m_s^2/H^2 = {t.EntropicMass[mass]:G3} at N = {t.N[mass]:0.00}");
        Say($"trajectory ({string.Join(", ", t.FieldNames)}): largest eta_perp = {turnText}{massText}");
        if (report.Frozen is { Note: { } note }) Say($"{note}", "yellow");
        else if (report.Frozen is { } f)
        {
            var p = report.Pivot;
            bool differs = f.Differs(p);
            Say($"one field ({f.Free}; {f.Describe()} frozen at the pivot's exit): n_s = {f.Ns:0.000000} +- {f.NsError:0.0e+00}, r = {f.R:0.00000e+00} +- {f.RError:0.0e+00} against n_s = {p.Ns:0.000000}, r = {p.R:0.00000e+00} with {f.Frozen.Length + 1} fields (differences {p.Ns - f.Ns:+0.0e+00;-0.0e+00}, {p.R - f.R:+0.0e+00;-0.0e+00}: {(differs ? "beyond the errors" : "within the errors")})",
                differs ? "yellow" : null);
        }
    }

    // Exponents as the rest of the summary writes them (1.5e+13, not 1.5E+13).
    private static string Lower(string s) => s.Replace("E+", "e+", StringComparison.Ordinal).Replace("E-", "e-", StringComparison.Ordinal);
}
