using System.Collections.Immutable;
using System.Globalization;

namespace ModeSolver.Observables;

/// <summary>What the observables stage hands to the writers. A part is null when it was not requested.</summary>
/// <param name="Settings">The choices used.</param>
/// <param name="Distance">Distance of the pivot values to the data.</param>
/// <param name="Peak">Peak summary.</param>
/// <param name="InducedGw">Induced gravitational waves.</param>
/// <param name="Pbh">Primordial black holes.</param>
/// <param name="Notes">Every choice and caution, one line each (printed and written).</param>
public sealed record ObservablesReport(
    ObservablesSettings Settings,
    DataDistanceResult? Distance,
    PeakSummary? Peak,
    InducedGwResult? InducedGw,
    PbhResult? Pbh,
    ImmutableArray<string> Notes);

/// <summary>
/// The observables stage: pure computation from the spectrum samples and the pivot results (<see cref="ObservablesSource"/>)
/// to an <see cref="ObservablesReport"/>.
/// </summary>
public static class ObservablesStage
{
    /// <summary>k at matter-radiation equality, 0.0104 /Mpc (Planck 2018 VI, from memory): below ~10 k_eq radiation-era formulas do not hold.</summary>
    public const double KEquality = 0.0104;

    /// <summary>How far below the peak (factor in k) the GW and PBH tables start.</summary>
    public const double DecadesBelowPeak = 3;

    /// <summary>Computes the requested observables.</summary>
    public static ObservablesReport Compute(ObservablesSource source, ObservablesSettings settings)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(settings);
        source.Validate();
        var inv = CultureInfo.InvariantCulture;
        var notes = ImmutableArray.CreateBuilder<string>();
        void Note(FormattableString s) => notes.Add(s.ToString(inv));

        DataDistanceResult? distance = null;
        if (settings.Distance)
        {
            var p = source.Pivot;
            distance = DataDistance.Evaluate(p.Ns, p.R, p.AlphaS, settings.Data);
            var d = settings.Data;
            Note($"distance: Gaussian approximation of Planck 2018 + BICEP/Keck 2021, not their likelihood: n_s = {d.Ns} +- {d.SigmaNs}, r = 0 +- {d.SigmaR} (half the 95% bound){(d.UseAlphaS ? FormattableString.Invariant($", alpha_s = {d.AlphaS} +- {d.SigmaAlphaS}") : "")}, correlations neglected, {distance.DegreesOfFreedom} degrees of freedom");
        }

        if (source.Count < 2)
        {
            if (settings.Peak || settings.InducedGw || settings.Pbh)
                Note($"peak, induced GWs and black holes: not computed: they need a spectrum of at least two wavenumbers (this run has {source.Count})");
            return new ObservablesReport(settings, distance, null, null, null, notes.ToImmutable());
        }

        PeakSummary? peak = null;
        if (settings.Peak || settings.InducedGw || settings.Pbh)
            peak = PeakFinder.Find(source, settings.PeakMinRatio);
        double kPeak = peak is { Found: true } ? peak.KPeak : double.NaN;
        if (settings.Peak && peak is { Found: true, SteepestGrowth: > 4.5 })
            Note($"peak: the steepest local slope d ln P_s / d ln k = {peak.SteepestGrowth:G3} (at k = {peak.KSteepest:G3} /Mpc) includes the climb out of a dip where P_s is small; the limit of about k^4 (Byrnes, Cole & Patil 2019) concerns the envelope of the growth");

        (double Low, double High)? Range(double highEnd)
        {
            double lo = double.IsFinite(kPeak) ? Math.Max(source.KMin, kPeak / Math.Pow(10, DecadesBelowPeak)) : Math.Max(source.KMin, 10 * KEquality);
            return highEnd > lo ? (lo, highEnd) : null;
        }

        InducedGwResult? gw = null;
        if (settings.InducedGw)
        {
            if (Range(2 * source.KMax) is { } r)
            {
                gw = InducedGravitationalWaves.Compute(source, settings, r.Low, r.High, kPeak);
                Note($"induced GWs: radiation-era kernel (Kohri & Terada 2018; Espinosa, Racco & Riotto 2018), Gaussian zeta, P_s = 0 outside the computed [{source.KMin:G4}, {source.KMax:G4}] /Mpc");
                Note($"induced GWs: today Omega_GW,0 h^2 = c_g Omega_r,0 h^2 Omega_GW with g_* = g_*s = {gw.GStar:G5} at re-entry, g_*0 = {RadiationEra.EnergyDofToday:G4}, g_s0 = {Physics.Constants.EntropyDofToday:G4}, c_g = {gw.Cg:G4}, Omega_r,0 h^2 = {gw.OmegaRadiationH2:G4}; f = c k / (2 pi)");
                Note($"induced GWs: valid for modes re-entering in radiation domination (k >> k_eq = {KEquality} /Mpc, and after reheating); g_* = {gw.GStar:G5} assumes re-entry above ~100 GeV (re-entry here spans {gw.ReentryTemperatureGeV[0]:G3} to {gw.ReentryTemperatureGeV[^1]:G3} GeV)");
                Note($"induced GWs: error = quadrature estimate + 2 x the spectrum's largest relative error ({2 * source.MaxRelError:G2}); it omits the interpolation between spectrum samples and the truncation at the ends of the k range");
                if (!gw.Converged) Note($"induced GWs: WARNING some quadratures did not reach the tolerance {settings.GwTolerance:G2}; their error estimates are larger");
            }
            else Note($"induced GWs: not computed: the k range ends below 10 k_eq = {10 * KEquality} /Mpc (radiation era)");
        }

        PbhResult? pbh = null;
        if (settings.Pbh)
        {
            if (Range(source.KMax) is { } r)
            {
                pbh = PrimordialBlackHoles.Compute(source, settings, r.Low, r.High, kPeak);
                Note($"black holes: Press-Schechter, Gaussian zeta, beta = erfc(delta_c / (sqrt 2 sigma)), delta = (4/9)(k/aH)^2 zeta on comoving slices, R = 1/k_H");
                Note($"black holes: delta_c = {settings.DeltaC:G4} (default 0.41: Harada, Yoo & Kohri 2013; Musco 2019 finds 0.41-0.66 with the profile), gamma = {settings.Gamma:G3} (M = gamma M_H, common practice), window {settings.Window.Formula()}{(settings.Window == PbhWindow.TopHat ? " with the radiation transfer 3(sin y - y cos y)/y^3, y = kR/sqrt 3" : "")}, g_* = {settings.GStar:G5}, Omega_DM h^2 = {settings.OmegaDmH2:G4}");
                Note($"black holes: CAUTION these are estimates: beta depends exponentially on delta_c, the window and the statistics (d ln f_PBH / d ln delta_c = {pbh.DlnFDlnDeltaC:G3}); non-Gaussianity, peak theory, the non-linear delta-zeta relation and critical collapse change f_PBH by orders of magnitude");
                Note($"black holes: the stated errors cover only the spectrum's error and the quadrature, not these choices");
            }
            else Note($"black holes: not computed: the k range ends below 10 k_eq = {10 * KEquality} /Mpc (radiation era)");
        }
        if (peak is { Found: false } && (settings.InducedGw || settings.Pbh))
            Note($"no small-scale peak ({peak.Reason}); the tables start at 10 k_eq");
        return new ObservablesReport(settings, distance, settings.Peak ? peak : null, gw, pbh, notes.ToImmutable());
    }
}
