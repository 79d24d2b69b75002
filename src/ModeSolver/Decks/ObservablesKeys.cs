using System.Globalization;
using ModeSolver.Observables;

namespace ModeSolver.Decks;

/// <summary>What a key of the deck's [observables] table holds.</summary>
public enum ObservableKeyKind
{
    /// <summary>true or false (an option given without a value means true).</summary>
    Switch,
    /// <summary>A number.</summary>
    Number,
    /// <summary>A whole number.</summary>
    Whole,
    /// <summary>A word from a fixed list.</summary>
    Word,
}

/// <summary>One key of the [observables] table.</summary>
/// <param name="Key">Deck key under [observables].</param>
/// <param name="Kind">Value type.</param>
/// <param name="Description">One line for --help and the docs.</param>
public sealed record ObservableKey(string Key, ObservableKeyKind Kind, string Description);

/// <summary>
/// The keys of the deck's [observables] table, read into <see cref="ObservablesSettings"/>: the one list from which the
/// deck schema, the command-line options (--obs-KEY) and the settings written to the outputs are made.
/// </summary>
public static class ObservablesKeys
{
    /// <summary>Every key, in the order printed.</summary>
    public static IReadOnlyList<ObservableKey> All { get; } =
    [
        new("distance", ObservableKeyKind.Switch, "Delta chi^2 and sigma of the pivot (n_s, r) against the Gaussian approximation of the data (default on)."),
        new("peak", ObservableKeyKind.Switch, "Summary of a small-scale peak of P_s (default on)."),
        new("induced_gw", ObservableKeyKind.Switch, "Scalar-induced gravitational waves, Omega_GW h^2(f) (default off)."),
        new("pbh", ObservableKeyKind.Switch, "Primordial black holes, beta(M) and f_PBH(M) (default off)."),
        new("peak_min_ratio", ObservableKeyKind.Number, "A maximum counts as a peak when P_peak / A_s is at least this (default 10)."),
        new("g_star", ObservableKeyKind.Number, "g_* = g_*s at re-entry (default 106.75)."),
        new("omega_r_h2", ObservableKeyKind.Number, "Omega_r,0 h^2 today (default from T_0 with massless neutrinos, 4.16e-5)."),
        new("gw_per_decade", ObservableKeyKind.Whole, "Wavenumbers per decade of the Omega_GW table (default 8)."),
        new("gw_tolerance", ObservableKeyKind.Number, "Relative tolerance of the Omega_GW quadrature (default 1e-4)."),
        new("threshold", ObservableKeyKind.Number, "Collapse threshold delta_c of the comoving density contrast (default 0.41)."),
        new("gamma", ObservableKeyKind.Number, "Black-hole mass over the horizon mass at re-entry (default 0.2)."),
        new("window", ObservableKeyKind.Word, "Smoothing window: gaussian (default) or top-hat."),
        new("omega_dm_h2", ObservableKeyKind.Number, "Omega_DM h^2 for f_PBH (default 0.120)."),
        new("pbh_per_decade", ObservableKeyKind.Whole, "Horizon scales per decade of the beta(M), f_PBH(M) table (default 10)."),
        new("data_n_s", ObservableKeyKind.Number, "Central n_s of the data (default 0.9649)."),
        new("data_sigma_n_s", ObservableKeyKind.Number, "sigma of n_s (default 0.0042)."),
        new("data_sigma_r", ObservableKeyKind.Number, "sigma of r, centred on 0 (default 0.018)."),
        new("data_use_alpha_s", ObservableKeyKind.Switch, "Include alpha_s in the distance (default off)."),
        new("data_alpha_s", ObservableKeyKind.Number, "Central alpha_s (default -0.0045)."),
        new("data_sigma_alpha_s", ObservableKeyKind.Number, "sigma of alpha_s (default 0.0067)."),
    ];

    /// <summary>The key names, in <see cref="All"/> order.</summary>
    public static IReadOnlyList<string> Names { get; } = [.. All.Select(k => k.Key)];

    /// <summary>The kind of a key; null when it is not one.</summary>
    public static ObservableKeyKind? KindOf(string key)
    {
        foreach (var k in All) if (k.Key == key) return k.Kind;
        return null;
    }

    /// <summary>The [observables] values (deck merged with command line, as text) over the defaults, checked one by one.</summary>
    /// <exception cref="DeckException">a value of the wrong type or out of range, naming the key or option.</exception>
    public static ObservablesSettings Resolve(IReadOnlyDictionary<string, Located<string>> values)
    {
        ArgumentNullException.ThrowIfNull(values);
        var s = ObservablesSettings.Default;
        var d = s.Data;
        foreach (var key in All)
        {
            if (!values.TryGetValue(key.Key, out var v)) continue;
            switch (key.Key)
            {
                case "distance": s = s with { Distance = Switch(v) }; break;
                case "peak": s = s with { Peak = Switch(v) }; break;
                case "induced_gw": s = s with { InducedGw = Switch(v) }; break;
                case "pbh": s = s with { Pbh = Switch(v) }; break;
                case "peak_min_ratio": s = s with { PeakMinRatio = Range(v, 1, 1e30, "a ratio above 1, e.g. 10", open: true) }; break;
                case "g_star": s = s with { GStar = Range(v, RadiationEra.EnergyDofToday, 1e4, $"at least g_*0 = {RadiationEra.EnergyDofToday:G4} (e.g. 106.75)") }; break;
                case "omega_r_h2": s = s with { OmegaRadiationH2 = Range(v, 0, 1e-3, "a positive number below 1e-3 (e.g. 4.2e-5)", open: true) }; break;
                case "gw_per_decade": s = s with { GwPointsPerDecade = Whole(v, 1, 200) }; break;
                case "gw_tolerance": s = s with { GwTolerance = Range(v, 1e-10, 0.1, "a relative tolerance from 1e-10 to 0.1") }; break;
                case "threshold": s = s with { DeltaC = Range(v, 0, 2, "a density contrast between 0 and 2 (published values 0.4 to 0.67)", open: true) }; break;
                case "gamma": s = s with { Gamma = Range(v, 0, 1, "a fraction in (0, 1] (common practice 0.2)", open: true) }; break;
                case "window":
                    s = s with { Window = PbhWindowText.Parse(v.Value) ?? throw v.Error($"must be gaussian or top-hat (got '{v.Value}')") };
                    break;
                case "omega_dm_h2": s = s with { OmegaDmH2 = Range(v, 0, 1, "a positive number below 1 (e.g. 0.120)", open: true) }; break;
                case "pbh_per_decade": s = s with { PbhPointsPerDecade = Whole(v, 1, 200) }; break;
                case "data_n_s": d = d with { Ns = Range(v, 0.5, 1.5, "a spectral index between 0.5 and 1.5") }; break;
                case "data_sigma_n_s": d = d with { SigmaNs = Range(v, 0, 1, "a positive number below 1", open: true) }; break;
                case "data_sigma_r": d = d with { SigmaR = Range(v, 0, 1, "a positive number below 1", open: true) }; break;
                case "data_use_alpha_s": d = d with { UseAlphaS = Switch(v) }; break;
                case "data_alpha_s": d = d with { AlphaS = Range(v, -1, 1, "a running between -1 and 1") }; break;
                case "data_sigma_alpha_s": d = d with { SigmaAlphaS = Range(v, 0, 1, "a positive number below 1", open: true) }; break;
            }
        }
        foreach (var (key, v) in values)
            if (KindOf(key) is null) throw v.Error($"is not a key of [observables] (valid: {string.Join(", ", Names)})");
        return s with { Data = d };
    }

    /// <summary>Every choice as (key under [observables], value as text, is a number): what the outputs record.</summary>
    public static IReadOnlyList<(string Key, string Value, bool IsNumber)> Entries(ObservablesSettings s)
    {
        ArgumentNullException.ThrowIfNull(s);
        var inv = CultureInfo.InvariantCulture;
        string F(double x) => x.ToString("R", inv);
        string B(bool b) => b ? "true" : "false";
        return
        [
            ("distance", B(s.Distance), false), ("peak", B(s.Peak), false), ("induced_gw", B(s.InducedGw), false), ("pbh", B(s.Pbh), false),
            ("peak_min_ratio", F(s.PeakMinRatio), true), ("g_star", F(s.GStar), true),
            ("omega_r_h2", F(s.OmegaRadiationH2 ?? RadiationEra.RadiationDensityH2), true),
            ("gw_per_decade", s.GwPointsPerDecade.ToString(inv), true), ("gw_tolerance", F(s.GwTolerance), true),
            ("threshold", F(s.DeltaC), true), ("gamma", F(s.Gamma), true), ("window", s.Window.Code(), false),
            ("omega_dm_h2", F(s.OmegaDmH2), true), ("pbh_per_decade", s.PbhPointsPerDecade.ToString(inv), true),
            ("data_n_s", F(s.Data.Ns), true), ("data_sigma_n_s", F(s.Data.SigmaNs), true), ("data_sigma_r", F(s.Data.SigmaR), true),
            ("data_use_alpha_s", B(s.Data.UseAlphaS), false), ("data_alpha_s", F(s.Data.AlphaS), true),
            ("data_sigma_alpha_s", F(s.Data.SigmaAlphaS), true),
        ];
    }

    private static bool Switch(Located<string> v) => v.Value.Trim().ToLowerInvariant() switch
    {
        "true" or "on" or "yes" => true,
        "false" or "off" or "no" => false,
        _ => throw v.Error($"must be true or false (got '{v.Value}')"),
    };

    private static double Range(Located<string> v, double lo, double hi, string expected, bool open = false)
    {
        if (!double.TryParse(v.Value.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture, out double x))
            throw v.Error($"must be a number (got '{v.Value}')");
        bool ok = (open ? x > lo : x >= lo) && x <= hi && double.IsFinite(x);
        if (!ok) throw v.Error($"must be {expected} (got {v.Value.Trim()})");
        return x;
    }

    private static int Whole(Located<string> v, int lo, int hi)
    {
        if (!int.TryParse(v.Value.Trim(), NumberStyles.Integer, CultureInfo.InvariantCulture, out int n) || n < lo || n > hi)
            throw v.Error($"must be a whole number from {lo} to {hi} (got '{v.Value}')");
        return n;
    }
}
