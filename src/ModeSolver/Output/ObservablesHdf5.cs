using System.Collections.Immutable;
using ModeSolver.Observables;
using PureHDF;

namespace ModeSolver.Output;

/// <summary>
/// The /observables group of run.h5 (present when the run computed observables): attribute notes (string array);
/// /observables/data_distance: attributes delta_chi2, sigmas, degrees_of_freedom and the data used;
/// /observables/peak: attributes found, reason, k_peak, P_peak, width_ln_k, steepest_growth, N_exit, efolds_before_end, ...;
/// /observables/induced_gw: datasets k, f_Hz, Omega_GW_h2, Omega_GW_h2_error, Omega_GW_radiation, T_reentry_GeV with
/// attributes g_star, c_g, Omega_r_h2, converged; /observables/pbh: datasets k_H, M_solar, sigma, beta, beta_rel_error,
/// f_PBH with attributes f_PBH_total, delta_c, gamma, window, g_star, Omega_DM_h2.
/// </summary>
internal static class ObservablesHdf5
{
    public static void Add(H5File file, ObservablesReport? o)
    {
        if (o is null) return;
        var group = new H5Group();
        group.Attributes["notes"] = o.Notes.ToArray();
        if (o.Distance is { } d)
        {
            var g = new H5Group();
            g.Attributes["delta_chi2"] = d.DeltaChi2;
            g.Attributes["sigmas"] = d.Sigmas;
            g.Attributes["degrees_of_freedom"] = d.DegreesOfFreedom;
            g.Attributes["data_n_s"] = d.Data.Ns;
            g.Attributes["data_sigma_n_s"] = d.Data.SigmaNs;
            g.Attributes["data_sigma_r"] = d.Data.SigmaR;
            g.Attributes["data_use_alpha_s"] = d.Data.UseAlphaS ? 1 : 0;
            g.Attributes["data_alpha_s"] = d.Data.AlphaS;
            g.Attributes["data_sigma_alpha_s"] = d.Data.SigmaAlphaS;
            group["data_distance"] = g;
        }
        if (o.Peak is { } p)
        {
            var g = new H5Group();
            g.Attributes["found"] = p.Found ? 1 : 0;
            g.Attributes["reason"] = p.Reason;
            g.Attributes["k_peak"] = p.KPeak;
            g.Attributes["P_peak"] = p.PPeak;
            g.Attributes["P_peak_over_A_s"] = p.RatioToAs;
            g.Attributes["P_peak_rel_error"] = p.RelError;
            g.Attributes["width_ln_k"] = p.WidthLnK;
            g.Attributes["k_half_low"] = p.KHalfLow;
            g.Attributes["k_half_high"] = p.KHalfHigh;
            g.Attributes["steepest_growth"] = p.SteepestGrowth;
            g.Attributes["k_steepest"] = p.KSteepest;
            g.Attributes["N_exit"] = p.NExit;
            g.Attributes["efolds_before_end"] = p.EfoldsBeforeEnd;
            group["peak"] = g;
        }
        if (o.InducedGw is { } gw)
        {
            var g = new H5Group
            {
                ["k"] = Arr(gw.K),
                ["f_Hz"] = Arr(gw.Frequency),
                ["Omega_GW_h2"] = Arr(gw.OmegaGwH2),
                ["Omega_GW_h2_error"] = Arr(gw.ErrorH2),
                ["Omega_GW_radiation"] = Arr(gw.OmegaGwRadiation),
                ["T_reentry_GeV"] = Arr(gw.ReentryTemperatureGeV),
            };
            g.Attributes["g_star"] = gw.GStar;
            g.Attributes["c_g"] = gw.Cg;
            g.Attributes["Omega_r_h2"] = gw.OmegaRadiationH2;
            g.Attributes["converged"] = gw.Converged ? 1 : 0;
            g.Attributes["peak_frequency_Hz"] = gw.PeakFrequency;
            g.Attributes["peak_Omega_GW_h2"] = gw.PeakOmegaGwH2;
            group["induced_gw"] = g;
        }
        if (o.Pbh is { } b)
        {
            var g = new H5Group
            {
                ["k_H"] = Arr(b.KHorizon),
                ["M_solar"] = Arr(b.MassSolar),
                ["sigma"] = Arr(b.Sigma),
                ["beta"] = Arr(b.Beta),
                ["beta_rel_error"] = Arr(b.BetaRelError),
                ["f_PBH"] = Arr(b.FPbh),
            };
            g.Attributes["f_PBH_total"] = b.FTotal;
            g.Attributes["f_PBH_total_rel_error"] = b.FTotalRelError;
            g.Attributes["dln_f_dln_delta_c"] = b.DlnFDlnDeltaC;
            g.Attributes["delta_c"] = b.DeltaC;
            g.Attributes["gamma"] = b.Gamma;
            g.Attributes["window"] = b.Window.Code();
            g.Attributes["g_star"] = b.GStar;
            g.Attributes["Omega_DM_h2"] = b.OmegaDmH2;
            g.Attributes["caution"] = "estimates: beta depends exponentially on the threshold, the window and the statistics of zeta";
            group["pbh"] = g;
        }
        file["observables"] = group;
    }

    private static double[] Arr(ImmutableArray<double> a) => Hdf5Writer.Arr(a);
}
