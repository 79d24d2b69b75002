using System.Text.Json;
using ModeSolver.Estimates;
using ModeSolver.Results;

namespace ModeSolver.Output;

/// <summary>
/// The n-field keys of summary.json, at top level (n-field runs only): "f_NL_local" and "f_NL_local_error" (delta N at the
/// pivot; null when delta N was not computed), "delta_N" (P_zeta with its error beside the modes' P_zeta, their relative
/// difference, the slow-roll allowance and whether they agree, N_I with errors, the slice and start velocity used; null
/// with "delta_N_note" saying why when it could not be computed) and "trajectory" (field names, the largest eta_perp and
/// the smallest m_s^2/H^2 during inflation and where); and "isocurvature" at the pivot from the modes (P_S, P_S_error,
/// beta_iso, cos_delta, T_RS, C_RS, P_R_exit); with `[compare] freeze`, "frozen_comparison" (the one-field model's n_s,
/// r with errors, A_s, N_*, the frozen fields and values, the differences and whether they exceed the errors). The arrays against N and k are in run.h5 (/multifield, /isocurvature).
/// </summary>
internal static class MultiFieldJson
{
    public static void Write(Utf8JsonWriter w, Report.RunReport report)
    {
        if (report.Isocurvature is { } iso)
        {
            var p = iso.Pivot;
            w.WriteStartObject("isocurvature");
            Num(w, "P_S", p.Ps);
            Num(w, "P_S_error", p.PsError);
            Num(w, "beta_iso", p.BetaIso);
            Num(w, "cos_delta", p.CosDelta);
            Num(w, "T_RS", p.Trs);
            Num(w, "C_RS", p.Crs);
            Num(w, "P_R_exit", p.PrExit);
            w.WriteNumber("fields", iso.FieldCount);
            w.WriteEndObject();
        }
        Write(w, report.MultiField);
        if (report.Frozen is { } f)
        {
            // The one-field model with the [compare] freeze fields held at their values at the pivot's exit.
            w.WriteStartObject("frozen_comparison");
            w.WriteStartArray("frozen");
            foreach (var name in f.Frozen) w.WriteStringValue(name);
            w.WriteEndArray();
            Array(w, "values", f.Values);
            w.WriteString("held_at", "pivot-exit");
            w.WriteString("free", f.Free);
            Num(w, "n_s", f.Ns);
            Num(w, "n_s_error", f.NsError);
            Num(w, "r", f.R);
            Num(w, "r_error", f.RError);
            Num(w, "A_s", f.As);
            Num(w, "N_star", f.NStar);
            Num(w, "n_s_difference", report.Pivot.Ns - f.Ns);
            Num(w, "r_difference", report.Pivot.R - f.R);
            w.WriteBoolean("differs", f.Differs(report.Pivot));
            if (f.Note is null) w.WriteNull("note");
            else w.WriteString("note", f.Note);
            w.WriteEndObject();
        }
    }

    private static void Write(Utf8JsonWriter w, MultiFieldResults? m)
    {
        if (m is null) return;
        var d = m.DeltaN;
        Num(w, "f_NL_local", d?.FNL ?? double.NaN);
        Num(w, "f_NL_local_error", d?.FNLError ?? double.NaN);
        if (d is null)
        {
            w.WriteNull("delta_N");
            w.WriteString("delta_N_note", m.DeltaNNote ?? "");
        }
        else
        {
            w.WriteStartObject("delta_N");
            Num(w, "P_zeta", d.Pzeta);
            Num(w, "P_zeta_error", d.PzetaError);
            Num(w, "P_zeta_modes", d.ModesPzeta);
            Num(w, "relative_difference", d.RelativeDifference);
            Num(w, "allowance", d.Allowance);
            w.WriteBoolean("agrees", d.Agrees);
            Array(w, "N_I", d.Raw.Gradient);
            Array(w, "N_I_error", d.Raw.GradientError);
            Num(w, "N_exit", d.Raw.ExitN);
            Num(w, "N_remaining", d.Raw.NRemaining);
            w.WriteString("slice", SliceCode(d.Raw.Slice));
            w.WriteString("velocity", VelocityCode(d.Raw.Velocity));
            w.WriteNumber("backgrounds", d.Raw.Backgrounds);
            w.WriteEndObject();
        }

        var t = m.Trajectory;
        int maxTurn = t.LargestTurnIndex, minMass = t.SmallestEntropicMassIndex;
        w.WriteStartObject("trajectory");
        w.WriteStartArray("field_names");
        foreach (var f in t.FieldNames) w.WriteStringValue(f);
        w.WriteEndArray();
        Num(w, "max_eta_perp", maxTurn < 0 ? double.NaN : t.TurnRate[maxTurn]);
        Num(w, "N_max_eta_perp", maxTurn < 0 ? double.NaN : t.N[maxTurn]);
        Num(w, "min_m_s2_over_H2", minMass < 0 ? double.NaN : t.EntropicMass[minMass]);
        Num(w, "N_min_m_s2_over_H2", minMass < 0 ? double.NaN : t.N[minMass]);
        w.WriteEndObject();
    }

    /// <summary>File code of a delta N slice.</summary>
    public static string SliceCode(DeltaNSlice s) => s == DeltaNSlice.EndOfInflation ? "end-of-inflation" : "uniform-density";

    /// <summary>File code of a delta N start velocity.</summary>
    public static string VelocityCode(ExitVelocity v) => v switch
    {
        ExitVelocity.SlowRoll => "slow-roll",
        ExitVelocity.Background => "background",
        _ => "attractor",
    };

    private static void Array(Utf8JsonWriter w, string name, System.Collections.Immutable.ImmutableArray<double> a)
    {
        w.WriteStartArray(name);
        foreach (double x in a) SummaryJsonWriter.Num(w, x);
        w.WriteEndArray();
    }

    private static void Num(Utf8JsonWriter w, string name, double v) => SummaryJsonWriter.Num(w, name, v);
}
