using System.Globalization;
using System.Text;

namespace ModeSolver.Decks;

/// <summary>
/// Writes resolved <see cref="RunSettings"/> as a deck in our schema (formulas written out, every value explicit), so
/// that a run can record exactly what it did and be repeated: DeckReader on the text gives the same settings.
/// </summary>
public static class DeckWriter
{
    /// <summary>The deck text.</summary>
    public static string Write(RunSettings s)
    {
        ArgumentNullException.ThrowIfNull(s);
        var sb = new StringBuilder();
        sb.AppendLine("# Resolved run settings written by modesolver (reduced Planck units, k in 1/Mpc, T in GeV).");
        if (s.Title.Length > 0) sb.AppendLine($"title = {Str(s.Title)}");
        sb.AppendLine();
        sb.AppendLine("[model]");
        // A catalogue model started in e-folds before the end keeps its id: the id tells the start solver on which side
        // of the potential inflation happens (written-out formulas would leave it to choose); otherwise the formulas
        // are written out.
        bool byId = s.Model.CatalogueId is not null && s.Initial.StartEfolds is not null;
        if (byId) sb.AppendLine($"catalogue = {Str(s.Model.CatalogueId!)}");
        else
        {
            if (s.Model.CatalogueId is not null) sb.AppendLine($"# from the catalogue: {s.Model.CatalogueId}");
            if (s.Model.Fields is { } fields) sb.AppendLine($"fields = [{string.Join(", ", fields.Select(Str))}]");
            sb.AppendLine($"potential = {Str(s.Model.Potential)}");
            if (s.Model.Metric is { } metric) sb.AppendLine($"metric = [{string.Join(", ", metric.Select(r => "[" + string.Join(", ", r.Select(Str)) + "]"))}]");
            if (s.Model.Kinetic is not null) sb.AppendLine($"kinetic = {Str(s.Model.Kinetic)}");
            if (s.Model.Coupling is not null)
            {
                sb.AppendLine($"coupling = {Str(s.Model.Coupling)}");
                sb.AppendLine($"palatini = {(s.Model.Palatini ? "true" : "false")}");
            }
        }
        if (s.Model.PhiEnd is double pe) sb.AppendLine($"phi_end = {Num(pe)}");
        if (s.Model.End is string end) sb.AppendLine($"end = {Str(end)}");
        if (s.Model.Parameters.Count > 0)
        {
            sb.AppendLine();
            sb.AppendLine("[model.parameters]");
            foreach (var (k, v) in s.Model.Parameters.OrderBy(p => p.Key, StringComparer.Ordinal)) sb.AppendLine($"{k} = {Num(v)}");
        }
        sb.AppendLine();
        sb.AppendLine("[start]");
        // A start in e-folds before the end is written as such (phi0 is then only the solver's first guess).
        if (s.Initial.StartEfolds is double se) sb.AppendLine($"efolds = {Num(se)}");
        else if (s.Initial.Fields0 is { } f0) sb.AppendLine($"phi0 = [{string.Join(", ", f0.Select(Num))}]");
        else sb.AppendLine($"phi0 = {Num(s.Initial.Phi0)}");
        if (s.Initial.Velocity0 is { } u) sb.AppendLine($"dphi0 = [{string.Join(", ", u.Select(Num))}]");
        else if (s.Initial.DPhi0 is double d) sb.AppendLine($"dphi0 = {Num(d)}");
        sb.AppendLine();
        sb.AppendLine("[pivot]");
        sb.AppendLine($"k = {Num(s.Pivot.KPivot)}");
        if (s.Pivot.Efolds is double n) sb.AppendLine($"efolds = {Num(n)}");
        var r = s.Pivot.Reheating;
        if (s.Pivot.Efolds is null)
        {
            sb.AppendLine();
            sb.AppendLine("[reheating]");
            if (r.Kind != ReheatingKind.Instantaneous) sb.AppendLine($"w = {Num(r.W)}");
            if (r.TemperatureGeV is double t) sb.AppendLine($"temperature_gev = {Num(t)}");
            if (r.Efolds is double nr) sb.AppendLine($"efolds = {Num(nr)}");
            sb.AppendLine($"dof = {Num(r.Dof)}");
        }
        sb.AppendLine();
        sb.AppendLine("[normalisation]");
        sb.AppendLine(s.Amplitude.ScalarAmplitude is double a ? $"a_s = {Num(a)}" : "a_s = \"none\"");
        if (s.Amplitude.SolveFor is string sf) sb.AppendLine($"solve_for = {Str(sf)}");
        sb.AppendLine();
        sb.AppendLine("[modes]");
        sb.AppendLine($"k_min = {Num(s.KRange.KMin)}");
        sb.AppendLine($"k_max = {Num(s.KRange.KMax)}");
        sb.AppendLine($"count = {s.KRange.Count.ToString(CultureInfo.InvariantCulture)}");
        sb.AppendLine($"tolerance = {Num(s.KRange.Tolerance)}");
        sb.AppendLine();
        sb.AppendLine("[output]");
        sb.AppendLine($"dir = {Str(s.Output.Directory)}");
        sb.AppendLine($"formats = [{string.Join(", ", s.Output.Formats.Select(Str))}]");
        if (s.Output.TableH is double h) sb.AppendLine($"table_h = {Num(h)}");
        var f = s.Flags;
        sb.AppendLine();
        sb.AppendLine("[flags]");
        foreach (var (key, value) in new[]
                 {
                     ("spectrum_threshold", f.SpectrumThreshold), ("pivot_fraction", f.PivotFraction), ("sigma_n_s", f.SigmaNs),
                     ("sigma_r", f.SigmaR), ("sigma_alpha_s", f.SigmaAlphaS), ("sigma_n_t", f.SigmaNt),
                     ("epsilon_1_limit", f.Epsilon1Limit), ("epsilon_2_limit", f.Epsilon2Limit),
                 })
            sb.AppendLine($"{key} = {Num(value)}");
        sb.AppendLine($"reference = {Str(f.Reference switch { Diagnostics.SlowRollReference.FirstOrder => "first_order", Diagnostics.SlowRollReference.Potential => "potential", _ => "second_order" })}");
        WriteObservables(sb, s.Observables);
        return sb.ToString();
    }

    // The [observables] keys whose values differ from the defaults (none: no table).
    private static void WriteObservables(StringBuilder sb, Observables.ObservablesSettings o)
    {
        var defaults = ObservablesKeys.Entries(Observables.ObservablesSettings.Default);
        var entries = ObservablesKeys.Entries(o);
        bool header = false;
        for (int i = 0; i < entries.Count; i++)
        {
            var (key, value, _) = entries[i];
            if (value == defaults[i].Value) continue;
            if (!header) { sb.AppendLine(); sb.AppendLine("[observables]"); header = true; }
            string text = ObservablesKeys.KindOf(key) switch
            {
                ObservableKeyKind.Number => Num(double.Parse(value, CultureInfo.InvariantCulture)),
                ObservableKeyKind.Word => Str(value),
                _ => value,
            };
            sb.AppendLine($"{key} = {text}");
        }
    }

    /// <summary>A TOML float that reads back to the same double (always with a '.' or exponent).</summary>
    private static string Num(double x)
    {
        string t = x.ToString("R", CultureInfo.InvariantCulture);
        if (t.Contains('E')) t = t.Replace("E", "e");
        if (!t.Contains('.') && !t.Contains('e')) t += ".0";
        else if (t.Contains('e') && !t[..t.IndexOf('e')].Contains('.')) t = t.Insert(t.IndexOf('e'), ".0");
        return t;
    }

    private static string Str(string s)
    {
        var sb = new StringBuilder("\"");
        foreach (char c in s)
        {
            switch (c)
            {
                case '"': sb.Append("\\\""); break;
                case '\\': sb.Append("\\\\"); break;
                case '\n': sb.Append("\\n"); break;
                case '\t': sb.Append("\\t"); break;
                case '\r': sb.Append("\\r"); break;
                default:
                    if (char.IsControl(c)) sb.Append("\\u").Append(((int)c).ToString("x4", CultureInfo.InvariantCulture));
                    else sb.Append(c);
                    break;
            }
        }
        return sb.Append('"').ToString();
    }
}
