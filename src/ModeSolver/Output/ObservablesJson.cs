using System.Text.Json;
using ModeSolver.Observables;

namespace ModeSolver.Output;

/// <summary>
/// The observables in summary.json, at top level: "data_distance", "peak", "induced_gw", "pbh" (each present when it was
/// requested; a part that could not be computed is null) and "observables_notes" (every choice and caution, one line each).
/// The tables themselves are in run.h5 (/observables).
/// </summary>
internal static class ObservablesJson
{
    public static void Write(Utf8JsonWriter w, ObservablesReport? o)
    {
        if (o is null) return;
        var s = o.Settings;
        if (s.Distance) Distance(w, o.Distance);
        if (s.Peak) Peak(w, o.Peak);
        if (s.InducedGw) InducedGw(w, o.InducedGw);
        if (s.Pbh) Pbh(w, o.Pbh);
        w.WriteStartArray("observables_notes");
        foreach (var n in o.Notes) w.WriteStringValue(n);
        w.WriteEndArray();
    }

    private static void Distance(Utf8JsonWriter w, DataDistanceResult? d)
    {
        if (d is null) { w.WriteNull("data_distance"); return; }
        w.WriteStartObject("data_distance");
        Num(w, "delta_chi2", d.DeltaChi2);
        Num(w, "sigmas", d.Sigmas);
        w.WriteNumber("degrees_of_freedom", d.DegreesOfFreedom);
        w.WriteString("approximation", "independent Gaussians in n_s, r (and alpha_s when used), correlations neglected; not the Planck/BICEP-Keck likelihood");
        Num(w, "data_n_s", d.Data.Ns);
        Num(w, "data_sigma_n_s", d.Data.SigmaNs);
        Num(w, "data_sigma_r", d.Data.SigmaR);
        w.WriteBoolean("data_use_alpha_s", d.Data.UseAlphaS);
        Num(w, "data_alpha_s", d.Data.AlphaS);
        Num(w, "data_sigma_alpha_s", d.Data.SigmaAlphaS);
        w.WriteEndObject();
    }

    private static void Peak(Utf8JsonWriter w, PeakSummary? p)
    {
        if (p is null) { w.WriteNull("peak"); return; }
        w.WriteStartObject("peak");
        w.WriteBoolean("found", p.Found);
        w.WriteString("reason", p.Reason);
        Num(w, "k_peak", p.KPeak);
        Num(w, "P_peak", p.PPeak);
        Num(w, "P_peak_over_A_s", p.RatioToAs);
        Num(w, "P_peak_rel_error", p.RelError);
        Num(w, "width_ln_k", p.WidthLnK);
        Num(w, "k_half_low", p.KHalfLow);
        Num(w, "k_half_high", p.KHalfHigh);
        Num(w, "steepest_growth", p.SteepestGrowth);
        Num(w, "k_steepest", p.KSteepest);
        Num(w, "N_exit", p.NExit);
        Num(w, "efolds_before_end", p.EfoldsBeforeEnd);
        w.WriteEndObject();
    }

    private static void InducedGw(Utf8JsonWriter w, InducedGwResult? g)
    {
        if (g is null) { w.WriteNull("induced_gw"); return; }
        w.WriteStartObject("induced_gw");
        Num(w, "peak_frequency_Hz", g.PeakFrequency);
        Num(w, "peak_Omega_GW_h2", g.PeakOmegaGwH2);
        int i = g.OmegaGwH2.IndexOf(g.PeakOmegaGwH2);
        Num(w, "peak_Omega_GW_h2_error", i >= 0 ? g.ErrorH2[i] : double.NaN);
        Num(w, "f_min_Hz", g.Frequency[0]);
        Num(w, "f_max_Hz", g.Frequency[^1]);
        w.WriteNumber("points", g.K.Length);
        w.WriteBoolean("converged", g.Converged);
        Num(w, "g_star", g.GStar);
        Num(w, "g_star_today", RadiationEra.EnergyDofToday);
        Num(w, "g_s_today", Physics.Constants.EntropyDofToday);
        Num(w, "c_g", g.Cg);
        Num(w, "Omega_r_h2", g.OmegaRadiationH2);
        w.WriteNumber("kernel_evaluations", g.Evaluations);
        w.WriteEndObject();
    }

    private static void Pbh(Utf8JsonWriter w, PbhResult? p)
    {
        if (p is null) { w.WriteNull("pbh"); return; }
        w.WriteStartObject("pbh");
        w.WriteString("caution", "estimates: beta depends exponentially on the threshold, the window and the statistics of zeta");
        Num(w, "f_PBH_total", p.FTotal);
        Num(w, "f_PBH_total_rel_error", p.FTotalRelError);
        Num(w, "dln_f_dln_delta_c", p.DlnFDlnDeltaC);
        Num(w, "M_at_max_solar", p.MassAtPeak);
        Num(w, "f_PBH_max", p.FAtPeak);
        double betaMax = 0;
        foreach (var b in p.Beta) betaMax = Math.Max(betaMax, b);
        Num(w, "beta_max", betaMax);
        Num(w, "M_min_solar", Math.Min(p.MassSolar[0], p.MassSolar[^1]));
        Num(w, "M_max_solar", Math.Max(p.MassSolar[0], p.MassSolar[^1]));
        w.WriteNumber("points", p.KHorizon.Length);
        Num(w, "delta_c", p.DeltaC);
        Num(w, "gamma", p.Gamma);
        w.WriteString("window", p.Window.Code());
        Num(w, "g_star", p.GStar);
        Num(w, "Omega_DM_h2", p.OmegaDmH2);
        w.WriteString("statistics", "Press-Schechter, Gaussian zeta");
        w.WriteEndObject();
    }

    private static void Num(Utf8JsonWriter w, string name, double v) => SummaryJsonWriter.Num(w, name, v);
}
