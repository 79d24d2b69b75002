using System.Collections.Immutable;
using ModeSolver.Diagnostics;
using PureHDF;
using ModeSolver.Report;
using ModeSolver.Results;

namespace ModeSolver.Output;

/// <summary>
/// Writes the run to an HDF5 file with PureHDF. Layout (all arrays 1-D float64 unless stated):
/// <list type="bullet">
/// <item>/ attributes: generator, amplitude_method, warnings (string array).</item>
/// <item>/model: attributes id, description, frame, V, K, Omega2; /model/parameters: one float64 attribute per parameter.</item>
/// <item>/settings: one string attribute per setting; /settings/flags: the flag thresholds.</item>
/// <item>/units: one string attribute per quantity.</item>
/// <item>/pivot: float64 attributes n_s, alpha_s, r, n_t, A_s, k_pivot, N_star, phi_star, H_star, H_star_GeV,
/// energy_scale_GeV, V_scale, N_total, N_reh, max_rel_error, rhs_evaluations_per_mode;
/// /pivot/slow_roll/{first_order,second_order,potential}: attributes A_s, n_s, r, alpha_s, n_t.</item>
/// <item>/background: N, phi, dphi_dN, H, epsilon_1, epsilon_2, epsilon_3, epsilon_1_crossings; attributes N_end,
/// N_star (= N_end - N_at_pivot_exit), N_at_pivot_exit, window_N_start, window_N_end.</item>
/// <item>/spectrum: k, P_s, P_t, r, n_s, n_t, alpha_s, rel_error.</item>
/// <item>/slow_roll_spectrum: k, P_s_first_order, P_t_first_order, P_s_second_order, P_t_second_order,
/// n_s_first_order, n_s_second_order.</item>
/// <item>/table: k, P_s, P_t (the dense primordial table).</item>
/// <item>/flags: kind, quantity, message, where (string arrays), lower, upper, exact, slow_roll, difference; attribute count.</item>
/// <item>/statistics: attributes wall_seconds, modes, rhs_evaluations, workers; datasets stage (strings) and stage_seconds.</item>
/// <item>/observables (when computed): data_distance, peak, induced_gw (Omega_GW h^2 against f), pbh (beta and f_PBH against M); see ObservablesHdf5.</item>
/// <item>/bispectrum (when computed): f_NL at the pivot as attributes, the equilateral curve and the shape grid; see BispectrumOutputs.</item>
/// <item>/multifield (n-field runs): trajectory (fields, velocities, eta_perp, m_s^2/H^2, R_fs against N) and delta_N;
/// /isocurvature: P_S, C_RS, cos_delta, beta_iso, T_RS against k and the spectra matrix; see MultiFieldHdf5.</item>
/// </list>
/// NaN stays NaN in HDF5 (it is a valid IEEE value there).
/// </summary>
public static class Hdf5Writer
{
    /// <summary>Default file name.</summary>
    public const string FileName = "run.h5";

    /// <summary>Builds the PureHDF object tree of a report.</summary>
    public static H5File Build(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var file = new H5File();
        file.Attributes["generator"] = report.Generator;
        file.Attributes["amplitude_method"] = report.AmplitudeMethod;
        file.Attributes["warnings"] = report.Warnings.ToArray();

        var m = report.Model;
        var model = new H5Group();
        model.Attributes["id"] = m.Id;
        model.Attributes["description"] = m.Description;
        model.Attributes["frame"] = m.Frame.Code();
        model.Attributes["V"] = m.Potential;
        model.Attributes["K"] = m.Kinetic;
        model.Attributes["Omega2"] = m.ConformalFactor ?? "";
        var parameters = new H5Group();
        foreach (var p in m.Parameters) parameters.Attributes[p.Name] = p.Value;
        model["parameters"] = parameters;
        file["model"] = model;

        var settings = new H5Group();
        foreach (var s in report.Settings.Entries)
        {
            if (s.IsNumber && double.TryParse(s.Value, System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out double x))
                settings.Attributes[s.Key] = x;
            else
                settings.Attributes[s.Key] = s.Value;
        }
        var fs = report.Settings.FlagSettings;
        var flagSettings = new H5Group();
        flagSettings.Attributes["spectrum_threshold"] = fs.SpectrumThreshold;
        flagSettings.Attributes["pivot_fraction"] = fs.PivotFraction;
        flagSettings.Attributes["sigma_n_s"] = fs.SigmaNs;
        flagSettings.Attributes["sigma_r"] = fs.SigmaR;
        flagSettings.Attributes["sigma_alpha_s"] = fs.SigmaAlphaS;
        flagSettings.Attributes["sigma_n_t"] = fs.SigmaNt;
        flagSettings.Attributes["epsilon_1_limit"] = fs.Epsilon1Limit;
        flagSettings.Attributes["epsilon_2_limit"] = fs.Epsilon2Limit;
        flagSettings.Attributes["reference"] = SummaryJsonWriter.ReferenceCode(fs.Reference);
        settings["flags"] = flagSettings;
        file["settings"] = settings;

        var units = new H5Group();
        foreach (var u in OutputUnits.All) units.Attributes[u.Key] = u.Value;
        file["units"] = units;

        var pv = report.Pivot;
        var pivot = new H5Group();
        pivot.Attributes["n_s"] = pv.Ns;
        pivot.Attributes["alpha_s"] = pv.AlphaS;
        pivot.Attributes["r"] = pv.R;
        pivot.Attributes["n_t"] = pv.Nt;
        pivot.Attributes["A_s"] = pv.As;
        pivot.Attributes["k_pivot"] = pv.KPivot;
        pivot.Attributes["N_star"] = pv.NStar;
        pivot.Attributes["phi_star"] = pv.PhiStar;
        pivot.Attributes["H_star"] = pv.HStar;
        pivot.Attributes["H_star_GeV"] = pv.HStarGeV;
        pivot.Attributes["energy_scale_GeV"] = pv.EnergyScaleGeV;
        pivot.Attributes["V_scale"] = pv.VScale;
        pivot.Attributes["N_total"] = pv.NTotal;
        pivot.Attributes["N_reh"] = pv.NReh;
        pivot.Attributes["max_rel_error"] = pv.MaxRelError;
        pivot.Attributes["rhs_evaluations_per_mode"] = pv.RhsEvaluationsPerMode;
        if (report.Derived is { } d)
        {
            pivot.Attributes["T_reh_GeV"] = d.TRehGeV;
            pivot.Attributes["rho_end_quarter_GeV"] = d.RhoEndQuarterGeV;
            pivot.Attributes["r_002"] = d.R002;
            pivot.Attributes["r_002_source"] = d.R002Source;
        }
        var sr = new H5Group
        {
            ["first_order"] = Estimate(report.SlowRoll.FirstOrder),
            ["second_order"] = Estimate(report.SlowRoll.SecondOrder),
            ["potential"] = Estimate(report.SlowRoll.Potential),
        };
        pivot["slow_roll"] = sr;
        file["pivot"] = pivot;

        var b = report.Background;
        var background = new H5Group
        {
            ["N"] = Arr(b.N),
            ["phi"] = Arr(b.Phi),
            ["dphi_dN"] = Arr(b.DPhi),
            ["H"] = Arr(b.H),
            ["epsilon_1"] = Arr(b.Epsilon1),
            ["epsilon_2"] = Arr(b.Epsilon2),
            ["epsilon_3"] = Arr(b.Epsilon3),
            ["epsilon_1_crossings"] = Arr(b.Epsilon1Crossings),
        };
        background.Attributes["N_end"] = b.NEnd;
        background.Attributes["N_star"] = b.NEnd - b.NPivot;
        background.Attributes["N_at_pivot_exit"] = b.NPivot;
        background.Attributes["window_N_start"] = b.WindowStart;
        background.Attributes["window_N_end"] = b.WindowEnd;
        file["background"] = background;

        var s2 = report.Spectrum;
        file["spectrum"] = new H5Group
        {
            ["k"] = Arr(s2.K),
            ["P_s"] = Arr(s2.Ps),
            ["P_t"] = Arr(s2.Pt),
            ["r"] = Arr(s2.R),
            ["n_s"] = Arr(s2.Ns),
            ["n_t"] = Arr(s2.Nt),
            ["alpha_s"] = Arr(s2.AlphaS),
            ["rel_error"] = Arr(s2.RelError),
        };

        var srs = report.SlowRollSpectra;
        file["slow_roll_spectrum"] = new H5Group
        {
            ["k"] = Arr(srs.K),
            ["P_s_first_order"] = Arr(srs.PsFirstOrder),
            ["P_t_first_order"] = Arr(srs.PtFirstOrder),
            ["P_s_second_order"] = Arr(srs.PsSecondOrder),
            ["P_t_second_order"] = Arr(srs.PtSecondOrder),
            ["n_s_first_order"] = Arr(srs.NsFirstOrder),
            ["n_s_second_order"] = Arr(srs.NsSecondOrder),
        };

        file["table"] = new H5Group
        {
            ["k"] = Arr(report.Table.K),
            ["P_s"] = Arr(report.Table.Ps),
            ["P_t"] = Arr(report.Table.Pt),
        };

        var fl = report.Flags;
        var flags = new H5Group
        {
            ["kind"] = Strings(fl, f => f.Kind),
            ["quantity"] = Strings(fl, f => f.Quantity),
            ["message"] = Strings(fl, f => f.Message),
            ["where"] = Strings(fl, f => f.Where),
            ["lower"] = Numbers(fl, f => f.Lower),
            ["upper"] = Numbers(fl, f => f.Upper),
            ["exact"] = Numbers(fl, f => f.Exact),
            ["slow_roll"] = Numbers(fl, f => f.SlowRoll),
            ["difference"] = Numbers(fl, f => f.Difference),
        };
        flags.Attributes["count"] = fl.Length;
        file["flags"] = flags;

        var st = report.Statistics;
        var stats = new H5Group
        {
            ["stage"] = st.Stages.Select(t => t.Stage).ToArray(),
            ["stage_seconds"] = st.Stages.Select(t => t.Seconds).ToArray(),
        };
        stats.Attributes["wall_seconds"] = st.WallSeconds;
        stats.Attributes["modes"] = st.ModeCount;
        stats.Attributes["rhs_evaluations"] = st.RhsEvaluations;
        stats.Attributes["workers"] = st.Workers;
        file["statistics"] = stats;
        ObservablesHdf5.Add(file, report.Observables);
        BispectrumOutputs.AddHdf5(file, report.Bispectrum);
        MultiFieldHdf5.Add(file, report);
        return file;
    }

    /// <summary>Writes the report to an HDF5 file (overwriting).</summary>
    public static void Write(RunReport report, string path) => Build(report).Write(path);

    private static H5Group Estimate(Estimates.SlowRollPrediction e)
    {
        var g = new H5Group();
        g.Attributes["A_s"] = e.Ps;
        g.Attributes["n_s"] = e.Ns;
        g.Attributes["r"] = e.R;
        g.Attributes["alpha_s"] = e.AlphaS;
        g.Attributes["n_t"] = e.Nt;
        return g;
    }

    internal static double[] Arr(ImmutableArray<double> a) => a.IsDefault ? [] : a.ToArray();

    private static string[] Strings(ImmutableArray<Flag> flags, Func<Flag, string> pick)
    {
        var s = new string[flags.Length];
        for (int i = 0; i < s.Length; i++) s[i] = pick(flags[i]);
        return s;
    }

    private static double[] Numbers(ImmutableArray<Flag> flags, Func<Flag, double> pick)
    {
        var s = new double[flags.Length];
        for (int i = 0; i < s.Length; i++) s[i] = pick(flags[i]);
        return s;
    }
}
