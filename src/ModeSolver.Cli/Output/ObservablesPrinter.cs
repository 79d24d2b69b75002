using System.Globalization;
using ModeSolver.Observables;
using Spectre.Console;

namespace ModeSolver.Cli.Output;

/// <summary>
/// Terminal lines of the observables: distance to the data, peak, induced GWs, black holes with the caution, then every
/// choice and caution of the stage (the notes), one line each.
/// </summary>
internal static class ObservablesPrinter
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public static void Print(IAnsiConsole console, bool plain, ObservablesReport? o)
    {
        if (o is null) return;
        void Say(FormattableString s, string? colour = null) => SummaryPrinter.Line(console, plain, Lower(s.ToString(Inv)), colour);
        if (o.Distance is { } d)
            Say($"distance to the data: Delta chi^2 = {d.DeltaChi2:G4}, {d.Sigmas:0.00} sigma for {d.DegreesOfFreedom} degrees of freedom (Gaussian approximation)");
        if (o.Peak is { } p)
        {
            if (p.Found)
                Say($"peak: k_peak = {p.KPeak:G4} /Mpc, P_peak = {p.PPeak:G4} ({p.RatioToAs:G3} A_s, rel. error {p.RelError:G2}), width {Num(p.WidthLnK, "0.00")} in ln k, steepest d ln P_s/d ln k = {p.SteepestGrowth:0.00} at k = {p.KSteepest:G3} /Mpc, left the horizon at N = {p.NExit:0.00} ({p.EfoldsBeforeEnd:0.00} e-folds before the end)");
            else Say($"peak: none ({p.Reason})");
        }
        if (o.InducedGw is { } g)
        {
            int i = g.OmegaGwH2.IndexOf(g.PeakOmegaGwH2);
            double err = i >= 0 ? g.ErrorH2[i] : double.NaN;
            Say($"induced GWs: Omega_GW,0 h^2 peaks at {g.PeakOmegaGwH2:G4} +- {err:G2} at f = {g.PeakFrequency:G4} Hz (table {g.Frequency[0]:G3} to {g.Frequency[^1]:G3} Hz, {g.K.Length} points{(g.Converged ? "" : ", NOT all converged")})");
        }
        if (o.Pbh is { } b)
        {
            Say($"black holes: f_PBH = {b.FTotal:G4} (rel. error {Num(b.FTotalRelError, "G2")} from the spectrum and quadrature only), largest f_PBH(M) = {b.FAtPeak:G3} at M = {b.MassAtPeak:G3} solar masses; delta_c = {b.DeltaC:G4}, gamma = {b.Gamma:G3}, {b.Window.Code()} window");
            Say($"black holes: CAUTION these are estimates that depend exponentially on the threshold: d ln f_PBH / d ln delta_c = {Num(b.DlnFDlnDeltaC, "G3")}, so 1% more delta_c multiplies f_PBH by {Num(Math.Pow(1.01, b.DlnFDlnDeltaC), "G3")}", "yellow");
        }
        foreach (var n in o.Notes) SummaryPrinter.Line(console, plain, "  " + Lower(n), null);
    }

    // Exponents as the rest of the summary writes them (1.5e+13, not 1.5E+13).
    private static string Lower(string s) => s.Replace("E+", "e+", StringComparison.Ordinal).Replace("E-", "e-", StringComparison.Ordinal);

    private static string Num(double v, string format) => double.IsFinite(v) ? v.ToString(format, Inv) : "n/a";
}
