using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using ModeSolver.Diagnostics;
using ModeSolver.Report;
using ModeSolver.Results;

namespace ModeSolver.Output;

/// <summary>
/// Writes summary.json: the pivot results at top level (keys scripts rely on), slow-roll estimates, flags, and the
/// model, settings, units and version. Numbers are written with full round-trip precision; non-finite numbers as null.
/// </summary>
public static class SummaryJsonWriter
{
    /// <summary>Default file name.</summary>
    public const string FileName = "summary.json";

    /// <summary>Writes the summary as indented UTF-8 JSON to a stream.</summary>
    public static void Write(RunReport report, Stream stream)
    {
        ArgumentNullException.ThrowIfNull(report);
        var options = new JsonWriterOptions { Indented = true, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };
        using var w = new Utf8JsonWriter(stream, options);
        WriteReport(w, report);
        w.Flush();
    }

    /// <summary>Writes the summary to a file path (overwriting).</summary>
    public static void Write(RunReport report, string path)
    {
        using var fs = new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.None);
        Write(report, fs);
        fs.WriteByte((byte)'\n');
    }

    /// <summary>The summary as a string.</summary>
    public static string ToJson(RunReport report)
    {
        using var ms = new MemoryStream();
        Write(report, ms);
        return Encoding.UTF8.GetString(ms.ToArray());
    }

    private static void WriteReport(Utf8JsonWriter w, RunReport r)
    {
        var p = r.Pivot;
        w.WriteStartObject();
        w.WriteString("version", r.Generator);
        Num(w, "n_s", p.Ns);
        Num(w, "alpha_s", p.AlphaS);
        Num(w, "r", p.R);
        Num(w, "n_t", p.Nt);
        Num(w, "A_s", p.As);
        Num(w, "k_pivot", p.KPivot);
        Num(w, "N_star", p.NStar);
        Num(w, "phi_star", p.PhiStar);
        Num(w, "H_star", p.HStar);
        Num(w, "H_star_GeV", p.HStarGeV);
        Num(w, "energy_scale_GeV", p.EnergyScaleGeV);
        Num(w, "V_scale", p.VScale);
        Num(w, "N_total", p.NTotal);
        Num(w, "N_reh", p.NReh);
        Num(w, "max_rel_error", p.MaxRelError);
        w.WriteBoolean("tolerance_met", p.ToleranceMet);
        w.WriteStartObject("errors");
        Num(w, "A_s", p.Errors.As);
        Num(w, "n_s", p.Errors.Ns);
        Num(w, "alpha_s", p.Errors.AlphaS);
        Num(w, "r", p.Errors.R);
        Num(w, "n_t", p.Errors.Nt);
        w.WriteEndObject();
        Num(w, "rhs_evaluations_per_mode", p.RhsEvaluationsPerMode);
        w.WriteString("amplitude_method", r.AmplitudeMethod);
        WriteDerived(w, r.Derived);
        ObservablesJson.Write(w, r.Observables);
        BispectrumOutputs.WriteJson(w, r.Bispectrum);
        MultiFieldJson.Write(w, r);

        w.WriteStartObject("slow_roll");
        Estimate(w, "first_order", r.SlowRoll.FirstOrder);
        Estimate(w, "second_order", r.SlowRoll.SecondOrder);
        Estimate(w, "potential", r.SlowRoll.Potential);
        w.WriteEndObject();

        w.WriteStartArray("flags");
        foreach (var f in r.Flags) WriteFlag(w, f);
        w.WriteEndArray();

        w.WriteStartObject("background");
        Num(w, "N_end", r.Background.NEnd);
        Num(w, "N_star", r.Background.NEnd - r.Background.NPivot);
        Num(w, "N_at_pivot_exit", r.Background.NPivot);
        w.WriteStartArray("observable_window_N");
        Num(w, r.Background.WindowStart);
        Num(w, r.Background.WindowEnd);
        w.WriteEndArray();
        w.WriteStartArray("epsilon_1_crossings_N");
        foreach (var x in r.Background.Epsilon1Crossings) Num(w, x);
        w.WriteEndArray();
        if (r.Background.ContinuationStop is string stop) w.WriteString("continuation_stop", stop);
        w.WriteEndObject();

        var m = r.Model;
        w.WriteStartObject("model");
        w.WriteString("id", m.Id);
        w.WriteString("description", m.Description);
        w.WriteString("frame", m.Frame.Code());
        w.WriteString("V", m.Potential);
        w.WriteString("K", m.Kinetic);
        if (m.ConformalFactor is null) w.WriteNull("Omega2");
        else w.WriteString("Omega2", m.ConformalFactor);
        w.WriteStartObject("parameters");
        foreach (var par in m.Parameters) Num(w, par.Name, par.Value);
        w.WriteEndObject();
        w.WriteEndObject();

        w.WriteStartObject("settings");
        foreach (var s in r.Settings.Entries) WriteSetting(w, s);
        w.WriteEndObject();

        var fs = r.Settings.FlagSettings;
        w.WriteStartObject("flag_settings");
        Num(w, "spectrum_threshold", fs.SpectrumThreshold);
        Num(w, "pivot_fraction", fs.PivotFraction);
        Num(w, "sigma_n_s", fs.SigmaNs);
        Num(w, "sigma_r", fs.SigmaR);
        Num(w, "sigma_alpha_s", fs.SigmaAlphaS);
        Num(w, "sigma_n_t", fs.SigmaNt);
        Num(w, "epsilon_1_limit", fs.Epsilon1Limit);
        Num(w, "epsilon_2_limit", fs.Epsilon2Limit);
        w.WriteString("reference", ReferenceCode(fs.Reference));
        w.WriteEndObject();

        w.WriteStartObject("units");
        foreach (var u in OutputUnits.All) w.WriteString(u.Key, u.Value);
        w.WriteEndObject();

        var st = r.Statistics;
        w.WriteStartObject("statistics");
        Num(w, "wall_seconds", st.WallSeconds);
        w.WriteNumber("modes", st.ModeCount);
        w.WriteNumber("rhs_evaluations", st.RhsEvaluations);
        w.WriteNumber("workers", st.Workers);
        w.WriteStartObject("stage_seconds");
        foreach (var t in st.Stages) Num(w, t.Stage, t.Seconds);
        w.WriteEndObject();
        w.WriteEndObject();

        w.WriteStartArray("warnings");
        foreach (var s in r.Warnings) w.WriteStringValue(s);
        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary>T_reh, rho_end^(1/4) and r at 0.002 /Mpc at top level (nothing when the report has none).</summary>
    private static void WriteDerived(Utf8JsonWriter w, DerivedQuantities? d)
    {
        if (d is null) return;
        Num(w, "T_reh_GeV", d.TRehGeV);
        w.WriteBoolean("T_reh_derived", d.TRehDerived);
        Num(w, "rho_end_quarter_GeV", d.RhoEndQuarterGeV);
        Num(w, "r_002", d.R002);
        w.WriteString("r_002_source", d.R002Source);
    }

    /// <summary>A setting as a JSON number when it is one (round-trip text), else as a string.</summary>
    private static void WriteSetting(Utf8JsonWriter w, Setting s)
    {
        if (s.IsNumber && double.TryParse(s.Value, System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out double x) && double.IsFinite(x))
            w.WriteNumber(s.Key, x);
        else if (s.Value is "true" or "false" && (s.Key.EndsWith("palatini", StringComparison.Ordinal) || s.Key.StartsWith("observables.", StringComparison.Ordinal)))
            w.WriteBoolean(s.Key, s.Value == "true");
        else
            w.WriteString(s.Key, s.Value);
    }

    /// <summary>Code of a slow-roll reference as written to files.</summary>
    public static string ReferenceCode(SlowRollReference reference) => reference switch
    {
        SlowRollReference.FirstOrder => "first_order",
        SlowRollReference.Potential => "potential",
        _ => "second_order",
    };

    private static void Estimate(Utf8JsonWriter w, string name, Estimates.SlowRollPrediction e)
    {
        w.WriteStartObject(name);
        Num(w, "A_s", e.Ps);
        Num(w, "n_s", e.Ns);
        Num(w, "r", e.R);
        Num(w, "alpha_s", e.AlphaS);
        Num(w, "n_t", e.Nt);
        w.WriteEndObject();
    }

    private static void WriteFlag(Utf8JsonWriter w, Flag f)
    {
        w.WriteStartObject();
        w.WriteString("kind", f.Kind);
        w.WriteString("quantity", f.Quantity);
        w.WriteString("message", f.Message);
        w.WriteString("where", f.Where);
        w.WriteStartArray("range");
        Num(w, f.Lower);
        Num(w, f.Upper);
        w.WriteEndArray();
        Num(w, "exact", f.Exact);
        Num(w, "slow_roll", f.SlowRoll);
        Num(w, "difference", f.Difference);
        w.WriteEndObject();
    }

    // Utf8JsonWriter formats doubles with the shortest round-trippable representation; JSON has no NaN/Infinity.
    internal static void Num(Utf8JsonWriter w, string name, double v)
    {
        if (double.IsFinite(v)) w.WriteNumber(name, v);
        else w.WriteNull(name);
    }

    internal static void Num(Utf8JsonWriter w, double v)
    {
        if (double.IsFinite(v)) w.WriteNumberValue(v);
        else w.WriteNullValue();
    }
}
