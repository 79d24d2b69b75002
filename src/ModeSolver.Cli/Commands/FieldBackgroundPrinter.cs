using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Output;
using ModeSolver.Pipeline;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// `modesolver background` for a several-field model: N_total, the end of inflation (epsilon_1 = 1 or the end surface)
/// with the field values there, one line per epsilon_1 = 1 crossing, the start and the field-space curvature; then the
/// pivot matching, normalisation and the exact pivot values with the isocurvature (Core's n-field RunPivot).
/// </summary>
public static class FieldBackgroundPrinter
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>Solves the background of <paramref name="settings"/> and prints it; returns the exit code.</summary>
    public static int Print(RunSettings settings, TextWriter output, TextWriter error, bool progress)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(error);
        if (progress) error.WriteLine("modesolver: background ...");
        var run = FieldPipeline.RunBackground(settings);
        var bg = run.Background;
        var theory = run.Theory;
        int n = theory.FieldCount;
        void Line(string name, string value) => output.WriteLine(string.Format(Inv, "  {0,-26} {1}", name, value));
        string names = n == 1 ? theory.FieldNames[0] : "(" + string.Join(", ", theory.FieldNames) + ")";
        string Fields(double[] x) => names + " = (" + string.Join(", ", x.Select(v => v.ToString("G10", Inv))) + ")";
        output.WriteLine(TextSafety.Printable(settings.Model.Describe()));
        Line("fields", string.Format(Inv, "{0} ({1})", n, string.Join(", ", theory.FieldNames)));
        var phi = new double[n];
        var dphi = new double[n];
        bg.At(bg.NStart, phi, dphi);
        Line("start", $"{Fields(phi)}, dphi/dN = ({string.Join(", ", dphi.Select(v => v.ToString("G6", Inv)))}){(settings.Initial.Velocity0 is null ? "  (slow-roll attractor)" : "")}");
        if (!theory.IsCanonical)
            Line("field-space R at start", FieldGeometry.RicciScalar(theory, phi).ToString("G8", Inv));
        Line("N_total", bg.NTotal.ToString("F4", Inv));
        var end = bg.At(bg.NEnd, phi, dphi);
        Line("end of inflation", bg.EndedAtSurface
            ? string.Format(Inv, "on the end surface {0} = 0 at N = {1:F4}, {2} (epsilon_1 = {3:G4})", settings.Model.End, bg.NEnd, Fields(phi), end.Epsilon1)
            : string.Format(Inv, "epsilon_1 = 1 at N = {0:F4}, {1}", bg.NEnd, Fields(phi)));
        Line("H at the end (V as given)", end.H.ToString("G6", Inv));
        foreach (double crossing in bg.EndCrossings)
        {
            bg.At(crossing, phi, dphi);
            bool rising = bg.RisingCrossings.Contains(crossing);
            Line(rising ? "epsilon_1 = 1 (rising)" : "epsilon_1 = 1 (falling)", string.Format(Inv, "N = {0:F4}, {1}", crossing - bg.NStart, Fields(phi)));
        }
        if (bg.NonSmoothTimes.Count > 0)
            Line("non-smooth surfaces", string.Join(", ", bg.NonSmoothTimes.Select(t => "N = " + t.ToString("F4", Inv))));
        if (bg.ContinuationStop is string stop) output.WriteLine("  note: " + TextSafety.Printable(stop));
        if (bg.ContinuationNote is string stopped) error.WriteLine("modesolver: warning: " + TextSafety.Printable(stopped));
        PrintPivot(settings, output, error, progress, Fields);
        return 0;
    }

    // The pivot matching, normalisation and the exact pivot values with the isocurvature (TheoryRun.RunPivot of n fields).
    private static void PrintPivot(RunSettings settings, TextWriter output, TextWriter error, bool progress, Func<double[], string> fields)
    {
        var options = new PipelineOptions { Stage = progress ? stage => error.WriteLine($"modesolver: {stage} ...") : null };
        var stage = FieldPipeline.RunPivot(settings, options);
        var m = stage.Match;
        void Line(string name, string value) => output.WriteLine(string.Format(Inv, "  {0,-26} {1}", name, value));
        Line("k_pivot [1/Mpc]", m.KPivot.ToString("G6", Inv));
        Line("N_*", string.Format(Inv, "{0:F6}{1}", m.NStar, settings.Pivot.Efolds is null ? string.Format(Inv, "  (from reheating: N_reh = {0:F3})", m.NReh) : "  (given)"));
        if (stage.Background is { } view) Line("fields at the pivot", fields(view.Fields.FieldsAt(m.NPivot + view.Origin)));
        Line("H_* [M_pl] / [GeV]", string.Format(Inv, "{0:G6} / {1:G6}", m.HStar, m.HStarGeV));
        Line("V_*^(1/4) [GeV]", m.VStarQuarterGeV.ToString("G6", Inv));
        Line("V scale", string.Format(Inv, "{0:G8}  (amplitude from {1}, {2} iterations)", m.VScale, m.AmplitudeName, m.Iterations));
        Line("k served [1/Mpc]", string.Format(Inv, "[{0:G4}, {1:G4}]", m.KMinMpc, m.KMaxMpc));
        output.WriteLine();
        output.WriteLine(string.Format(Inv, "  {0,-22} {1,14} {2,14} {3,14} {4,14} {5,14}", "", "A_s", "n_s", "r", "alpha_s", "n_t"));
        var e = stage.Exact;
        output.WriteLine(string.Format(Inv, "  {0,-22} {1,14:G7} {2,14:F7} {3,14:G6} {4,14:G5} {5,14:G6}", "exact (n-field modes)", e.Ps, e.Ns, e.R, e.AlphaS, e.Nt));
        foreach (var sr in new[] { stage.SlowRoll.SecondOrder, stage.SlowRoll.FirstOrder })
            output.WriteLine(string.Format(Inv, "  {0,-22} {1,14:G7} {2,14:F7} {3,14:G6} {4,14:G5} {5,14:G6}", "slow roll, " + sr.Order, sr.Ps, sr.Ns, sr.R, sr.AlphaS, sr.Nt));
        if (stage.Isocurvature is { } iso)
        {
            output.WriteLine();
            Line("isocurvature at the pivot", string.Format(Inv, "P_S = {0:G6}, cos Delta = {1:G6}, beta_iso = {2:G6}, T_RS = {3:G6}", iso.Ps, iso.CosDelta, iso.BetaIso, iso.Trs));
        }
    }
}
