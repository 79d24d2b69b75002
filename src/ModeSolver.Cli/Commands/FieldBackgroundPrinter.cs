using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Output;
using ModeSolver.Pipeline;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// `modesolver background` for a several-field model: N_total, the end of inflation (epsilon_1 = 1 or the end surface)
/// with the field values there, one line per epsilon_1 = 1 crossing, the start and the field-space curvature.
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
        output.WriteLine("  note: pivot matching, normalisation and spectra of several fields are not available here yet (background only)");
        if (bg.ContinuationStop is string stop) output.WriteLine("  note: " + TextSafety.Printable(stop));
        if (bg.ContinuationNote is string stopped) error.WriteLine("modesolver: warning: " + TextSafety.Printable(stopped));
        return 0;
    }
}
