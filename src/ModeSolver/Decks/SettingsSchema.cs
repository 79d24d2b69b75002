using System.Globalization;
using ModeSolver.Diagnostics;
using ModeSolver.Physics;

namespace ModeSolver.Decks;

/// <summary>
/// Every setting of a run, declared once, in deck order. The deck reader (<see cref="DeckReader.Schema"/>), the
/// command-line options, the sweep keys, the native library's keys, <see cref="RunInput.Merge"/>, the outputs'
/// settings list (<see cref="ReportEntries"/>) and the docs' key table (<see cref="MarkdownTable"/>) are made from
/// <see cref="All"/>; a test enumerates it and checks each of them covers every entry.
/// </summary>
public static class SettingsSchema
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    private static string F(double x) => x.ToString("R", Inv);

    private static string? Opt(double? x) => x is { } v ? F(v) : null;

    private static string? Positive(double v) => v > 0 && double.IsFinite(v) ? null : $"must be a positive number (got {v})";

    private static string? Finite(double v) => double.IsFinite(v) ? null : $"must be finite (got {v})";

    private static string? EfoldsBeforeEnd(double v) => v > 0 && v < 1000 ? null : $"must be a number of e-folds between 0 and 1000 (got {v})";

    /// <summary>The key of the [model.parameters] table.</summary>
    public static SettingDef Parameters { get; } = new()
    {
        Path = "model.parameters", Option = "--param", Kind = SettingKind.Table, Default = "catalogue",
        Doc = "formula parameters, NAME = value (the option is repeatable); override the catalogue defaults",
        Sweep = "param.NAME", SweepRank = 0, ReportRank = 80, ReportNumber = true,
    };

    /// <summary>The numeric keys of the [flags] table with their documentation line and default.</summary>
    private static readonly (string Key, string Doc, double Default)[] FlagThresholds =
    [
        ("spectrum_threshold", "flag k where |P_exact/P_SR - 1| exceeds this", FlagSettings.Default.SpectrumThreshold),
        ("pivot_fraction", "flag a pivot quantity when |exact - slow roll| exceeds this fraction of its sigma", FlagSettings.Default.PivotFraction),
        ("sigma_n_s", "sigma of n_s for the pivot flags", FlagSettings.Default.SigmaNs),
        ("sigma_r", "sigma of r for the pivot flags", FlagSettings.Default.SigmaR),
        ("sigma_alpha_s", "sigma of alpha_s for the pivot flags", FlagSettings.Default.SigmaAlphaS),
        ("sigma_n_t", "sigma of n_t for the pivot flags", FlagSettings.Default.SigmaNt),
        ("epsilon_1_limit", "flag background phases with epsilon_1 above this inside the observable window", FlagSettings.Default.Epsilon1Limit),
        ("epsilon_2_limit", "flag background phases with |epsilon_2| above this inside the observable window", FlagSettings.Default.Epsilon2Limit),
    ];

    /// <summary>Every setting, in deck order (the order of the deck's sections and of the keys listed in its messages).</summary>
    public static IReadOnlyList<SettingDef> All { get; } =
    [
        new() { Path = "title", Option = "--title", Kind = SettingKind.Text, Default = "\"\"", Doc = "free-text title of the run (written to the outputs)",
            ReportRank = 10, Report = s => s.Title.Length > 0 ? s.Title : null },

        new() { Path = "model.catalogue", Option = "--model", Kind = SettingKind.Text, Doc = "catalogue id (see `modesolver models`); cannot be combined with `potential`",
            ReplacedBy = ["model.potential"], Sweep = "model", SweepRank = 1, ReportRank = 30, Report = s => s.Model.CatalogueId },
        new() { Path = "model.fields", Option = "--fields", Kind = SettingKind.List, Default = "one field φ",
            Doc = "names of the fields of a several-field model, in field order (e.g. `[\"phi\", \"chi\"]`; comma-separated on the command line); the formulas use them as variables",
            ReplacedBy = ["model.catalogue"], ReportRank = 35, Report = s => s.Model.Fields is { } f ? string.Join(",", f) : null },
        new() { Path = "model.potential", Option = "--potential", Kind = SettingKind.Text, Default = "catalogue", Doc = "V(φ) as a formula (V_J(φ) when `coupling` is given)",
            ReplacedBy = ["model.catalogue"], ReportRank = 40, Report = s => s.Model.Potential },
        new() { Path = "model.metric", Option = "--metric", Kind = SettingKind.Matrix, Default = "identity",
            Doc = "field-space metric G_IJ of a several-field model: rows of formulas in the fields, symmetric, in field order (K^J_IJ when `coupling` is given); on the command line rows separated by `;` and entries by `,`",
            ReplacedBy = ["model.catalogue"], ReportRank = 45, Report = s => s.Model.Metric is { } m ? FormulaMatrix.Format(m) : null },
        new() { Path = "model.kinetic", Option = "--kinetic", Kind = SettingKind.Text, Default = "1", Doc = "non-canonical kinetic function K(φ) (K_J(φ) in the Jordan frame)",
            ReplacedBy = ["model.catalogue"], ReportRank = 50, Report = s => s.Model.Kinetic },
        new() { Path = "model.coupling", Option = "--coupling", Kind = SettingKind.Text, Default = "none", Doc = "Ω²(φ): the theory is then given in the Jordan frame",
            ReplacedBy = ["model.catalogue"], ReportRank = 60, Report = s => s.Model.Coupling },
        new() { Path = "model.palatini", Option = "--palatini", Kind = SettingKind.Switch, Default = "false", Doc = "Palatini instead of metric formulation (needs `coupling`)",
            ReplacedBy = ["model.catalogue"], ReportRank = 70, Report = s => s.Model.Coupling is null ? null : s.Model.Palatini ? "true" : "false" },
        new() { Path = "model.phi_end", Option = "--phi-end", Kind = SettingKind.Number, Unit = "M_Pl", Default = "catalogue / none",
            Doc = "end inflation abruptly at this φ; must lie ahead of φ0 in the roll direction", Check = Finite,
            Sweep = "phi_end", SweepRank = 9, ReportRank = 90, ReportNumber = true, Report = s => Opt(s.Model.PhiEnd) },
        new() { Path = "model.end", Option = "--end", Kind = SettingKind.Text, Default = "none",
            Doc = "end inflation where this formula in the fields crosses zero (e.g. `\"chi - 0.1\"`; several fields, `phi_end` for one)",
            ReportRank = 95, Report = s => s.Model.End },
        Parameters,

        new() { Path = "start.phi0", Option = "--phi0", Kind = SettingKind.Number, Unit = "M_Pl", Default = "catalogue: see `efolds`",
            Doc = "initial field value; for several fields an array, one value per field in field order (comma-separated on the command line)", PerField = true,
            Check = Finite, ReplacedBy = ["start.efolds"], Sweep = "phi0", SweepRank = 7, ReportRank = 100, ReportNumber = true,
            Report = s => s.Initial.Fields0 is { } f ? string.Join(",", f.Select(F)) : F(s.Initial.Phi0) },
        new() { Path = "start.dphi0", Option = "--dphi0", Kind = SettingKind.Number, Unit = "M_Pl", Default = "slow-roll attractor",
            Doc = "initial dφ/dN; for several fields an array, one per field (default −G^IJ V_J / V)", PerField = true,
            Check = Finite, ReportRank = 120, ReportNumber = true,
            Report = s => s.Initial.Velocity0 is { } u ? string.Join(",", u.Select(F)) : Opt(s.Initial.DPhi0) ?? "attractor" },
        new() { Path = "start.efolds", Option = "--start-efolds", Kind = SettingKind.Number, Default = "catalogue models: 75",
            Doc = "start this many e-folds before the end of inflation (0 < N < 1000): φ0 from slow roll, then Newton steps on the exact background until N_total matches to 1e-7; not with `phi0` or `dphi0`",
            Check = EfoldsBeforeEnd, ReplacedBy = ["start.phi0"], Sweep = "start.efolds", SweepRank = 8, ReportRank = 110, ReportNumber = true, Report = s => Opt(s.Initial.StartEfolds) },

        new() { Path = "pivot.k", Option = "--k-pivot", Kind = SettingKind.Number, Unit = "1/Mpc", Default = "0.05", Doc = "pivot wavenumber k_*",
            Check = Positive, DefaultValue = Constants.DefaultPivotK, Sweep = "k_pivot", SweepRank = 10, ReportRank = 130, ReportNumber = true, Report = s => F(s.Pivot.KPivot) },
        new() { Path = "pivot.efolds", Option = "--efolds", Kind = SettingKind.Number, Default = "from reheating",
            Doc = "N_*, the e-folds before the end of inflation at which k_* = aH, given directly; cannot be combined with `[reheating]` w/T/N",
            Check = EfoldsBeforeEnd, ReplacedBy = ["reheating.w", "reheating.temperature_gev", "reheating.efolds"],
            Sweep = "efolds", SweepRank = 2, ReportRank = 140, ReportNumber = true, Report = s => Opt(s.Pivot.Efolds) },

        new() { Path = "reheating.w", Option = "--reheat-w", Kind = SettingKind.Number, Default = "0", Doc = "equation of state while reheating, −1/3 < w ≤ 1",
            Check = v => v > -1.0 / 3.0 && v <= 1.0 ? null : $"must satisfy -1/3 < w <= 1 (got {v})",
            ReplacedBy = ["pivot.efolds"], Sweep = "reheat.w", SweepRank = 3, ReportRank = 160, ReportNumber = true,
            Report = s => s.Pivot.Efolds is null && s.Pivot.Reheating.Kind != ReheatingKind.Instantaneous ? F(s.Pivot.Reheating.W) : null },
        new() { Path = "reheating.temperature_gev", Option = "--reheat-T", Kind = SettingKind.Number, Unit = "GeV",
            Doc = $"T_reh, the reheating temperature (≥ {SettingsResolver.MinReheatingTemperatureGeV.ToString(Inv)} GeV)",
            Check = v => v >= SettingsResolver.MinReheatingTemperatureGeV && double.IsFinite(v) ? null : $"must be at least {SettingsResolver.MinReheatingTemperatureGeV} GeV (nucleosynthesis) and finite (got {v})",
            ReplacedBy = ["pivot.efolds", "reheating.efolds"], Sweep = "reheat.T", SweepRank = 4, ReportRank = 170, ReportNumber = true, Report = s => Opt(s.Pivot.Reheating.TemperatureGeV) },
        new() { Path = "reheating.efolds", Option = "--reheat-efolds", Kind = SettingKind.Number, Doc = "N_reh, the duration of reheating in e-folds (instead of `temperature_gev`)",
            Check = v => v >= 0 && v < 200 ? null : $"must be a number of e-folds between 0 and 200 (got {v})",
            ReplacedBy = ["pivot.efolds", "reheating.temperature_gev"], Sweep = "reheat.efolds", SweepRank = 5, ReportRank = 180, ReportNumber = true, Report = s => Opt(s.Pivot.Reheating.Efolds) },
        new() { Path = "reheating.dof", Option = "--dof", Kind = SettingKind.Number, Default = "106.75", Doc = "g_reh = g_s,reh, relativistic degrees of freedom at reheating",
            Check = Positive, DefaultValue = Constants.DefaultReheatingDof, Sweep = "reheat.dof", SweepRank = 6, ReportRank = 190, ReportNumber = true, Report = s => F(s.Pivot.Reheating.Dof) },

        new() { Path = "normalisation.a_s", Option = "--amplitude", Kind = SettingKind.NumberOrNone, Default = "2.099e-9",
            Doc = "A_s at the pivot, in [1e-300, 1), or `\"none\"` to keep V as given; with N_* from reheating at least about 1e-85 ([errors.md](errors.md#limits-of-the-pivot-matching))",
            Sweep = "amplitude", SweepRank = 11, ReportRank = 200, ReportNumber = true, Report = s => s.Amplitude.ScalarAmplitude is { } a ? F(a) : "none" },
        new() { Path = "normalisation.ln_10_10_a_s", Option = "--ln-amplitude", Kind = SettingKind.Number, Doc = "A_s given as ln(10^10 A_s), the form papers quote; not with `a_s`",
            FormOf = "normalisation.a_s", ToTarget = DeckReader.AmplitudeFromLog, BothFormsHint = "give A_s in one form" },
        new() { Path = "normalisation.solve_for", Option = "--normalise-by", Kind = SettingKind.Text, Default = "rescale V",
            Doc = "reach A_s by solving for this model parameter (e.g. `xi` at fixed `lambda`) instead of rescaling V; the solved value is printed and written",
            ReportRank = 210, Report = s => s.Amplitude.SolveFor },

        new() { Path = "modes.k_min", Option = "--k-min", Kind = SettingKind.Number, Unit = "1/Mpc", Default = "1e-6", Doc = "smallest wavenumber (log-spaced)", SpectrumOnly = true,
            Check = Positive, DefaultValue = KRangeSpec.Default.KMin, ReportRank = 220, ReportNumber = true, Report = s => F(s.KRange.KMin) },
        new() { Path = "modes.k_max", Option = "--k-max", Kind = SettingKind.Number, Unit = "1/Mpc", Default = "10", Doc = "largest wavenumber", SpectrumOnly = true,
            Check = Positive, DefaultValue = KRangeSpec.Default.KMax, ReportRank = 230, ReportNumber = true, Report = s => F(s.KRange.KMax) },
        new() { Path = "modes.count", Option = "--k-count", Kind = SettingKind.Whole, Default = "120", Doc = "number of wavenumbers, 1 to 1000000", SpectrumOnly = true,
            Check = v => v >= 1 && v <= 1_000_000 ? null : $"must be a whole number from 1 to 1000000 (got {v})", DefaultValue = KRangeSpec.Default.Count,
            ReportRank = 240, ReportNumber = true, Report = s => s.KRange.Count.ToString(Inv) },
        new() { Path = "modes.tolerance", Option = "--tolerance", Kind = SettingKind.Number, Default = "1e-6", Doc = "relative accuracy target of the spectra, in [1e-12, 0.1)",
            // Below MinTolerance the mode integrator's step tolerance (tolerance/6) nears the 1e-15 round-off floor
            // and the run fails after minutes instead of at once.
            Check = v => v >= SettingsResolver.MinTolerance && v < 0.1 ? null : $"must lie in (0, 0.1), at least {SettingsResolver.MinTolerance:G3} (the double-precision limit of the modes), e.g. 1e-5 (got {v})",
            DefaultValue = KRangeSpec.Default.Tolerance, ReportRank = 250, ReportNumber = true, Report = s => F(s.KRange.Tolerance) },

        new() { Path = "output.dir", Option = "--out", Kind = SettingKind.Text, Default = "`modesolver-out`", Doc = "output directory, relative to the current directory", SpectrumOnly = true,
            ReportRank = 260, Report = s => s.Output.Directory },
        new() { Path = "output.formats", Option = "--formats", Kind = SettingKind.List, Default = "all", Doc = "output formats, any of `hdf5`, `table`, `json`, `plots`", SpectrumOnly = true,
            ReportRank = 270, Report = s => string.Join(",", s.Output.Formats) },
        new() { Path = "output.table_h", Option = "--table-h", Kind = SettingKind.Number, Default = "k in 1/Mpc", SpectrumOnly = true,
            Doc = "the dimensionless Hubble parameter h in [0.2, 2]: the primordial table then gives k in h/Mpc",
            Check = v => v >= 0.2 && v <= 2 ? null : $"is the dimensionless Hubble parameter h and must lie in [0.2, 2] (got {v})",
            ReportRank = 280, ReportNumber = true, Report = s => Opt(s.Output.TableH) },

        new() { Path = "bispectrum.equilateral", Option = "--fnl-equilateral", Kind = SettingKind.Whole, Default = "0 (off)", SpectrumOnly = true,
            Doc = "points of the equilateral f_NL(k) curve across the k range, 0 to 2000; any bispectrum key turns on f_NL at the pivot (equilateral and squeezed)",
            Check = v => v >= 0 && v <= 2000 ? null : $"must be a whole number from 0 to 2000 (got {v})", ReportRank = 281 },
        new() { Path = "bispectrum.squeezed_ratio", Option = "--fnl-squeezed-ratio", Kind = SettingKind.Number, Default = "0.01", SpectrumOnly = true,
            Doc = "k3/k1 of the squeezed triangle (k_*, k_*, ratio k_*), in [0.001, 0.5]",
            Check = v => v >= 1e-3 && v <= 0.5 ? null : $"must lie in [0.001, 0.5] (got {v})", ReportRank = 282 },
        new() { Path = "bispectrum.shape_grid", Option = "--fnl-shape-grid", Kind = SettingKind.Whole, Default = "0 (off)", SpectrumOnly = true,
            Doc = "points per side of the f_NL shape grid over (k2/k1, k3/k1) at k1 = k_*, 0 or 3 to 60",
            Check = v => v == 0 || (v >= 3 && v <= 60) ? null : $"must be 0 or a whole number from 3 to 60 (got {v})", ReportRank = 283 },
        new() { Path = "bispectrum.flag_threshold", Option = "--fnl-flag-threshold", Kind = SettingKind.Number, Default = "0.05", SpectrumOnly = true,
            Doc = "flag f_NL values that leave slow roll by more than this (absolute, beyond their error estimate)",
            Check = v => v > 0 && double.IsFinite(v) ? null : $"must be a finite positive number (got {v})", ReportRank = 284 },
        new() { Path = "bispectrum.tolerance", Option = "--fnl-tolerance", Kind = SettingKind.Number, Default = "1e-7", SpectrumOnly = true,
            Doc = "relative accuracy of the mode histories of the in-in integral, in [1e-10, 1e-4]",
            Check = v => v >= 1e-10 && v <= 1e-4 ? null : $"must lie in [1e-10, 1e-4] (got {v})", ReportRank = 285 },
        new() { Path = "bispectrum.triangles", Option = "--fnl-triangles", Kind = SettingKind.List, Default = "none", SpectrumOnly = true,
            Doc = "f_NL at these triangles, each \"k1:k2:k3\" in 1/Mpc (e.g. [\"0.05:0.05:0.01\"]; comma-separated on the command line), at most 1000",
            ReportRank = 287, Report = s => s.BispectrumTriangles },
        new() { Path = "bispectrum.start_depth", Option = "--fnl-start-depth", Kind = SettingKind.Number, Default = "50", SpectrumOnly = true,
            Doc = "K/aH (K = k1 + k2 + k3) where the numerical in-in integral starts, in [10, 10000]; earlier times are the analytic kappa -> 0 limit of the damping exp(-kappa K/aH)",
            Check = v => v >= 10 && v <= 1e4 ? null : $"must lie in [10, 10000] (got {v})", ReportRank = 286 },
        new() { Path = "compare.freeze", Option = "--freeze", Kind = SettingKind.List, Default = "none", SpectrumOnly = true,
            Doc = "several fields: also run the one-field model with these fields held at their values at the pivot's horizon exit (every field but one, e.g. `[\"chi\"]`; comma-separated on the command line) and report its n_s, r, A_s beside the n-field ones",
            ReportRank = 289, Report = s => s.Freeze is { } f ? string.Join(",", f) : null },

        .. FlagThresholds.Select(f => new SettingDef
        {
            Path = "flags." + f.Key, Option = "--flag-" + f.Key.Replace('_', '-'), Kind = SettingKind.Number, Family = SettingFamily.Flag,
            Doc = $"threshold of the slow-roll flags: {f.Doc} (finite and positive; docs/outputs.md)", Default = f.Default.ToString("G6", Inv),
            Check = v => v > 0 && double.IsFinite(v) ? null : $"must be a finite positive number (got {v})",
        }),
        new() { Path = "flags.reference", Option = "--flag-reference", Kind = SettingKind.Text, Default = "`second_order`",
            Doc = "slow-roll estimate the flags compare with: `first_order`, `second_order` or `potential`" },

        .. ObservablesKeys.All.Select((k, i) => new SettingDef
        {
            Path = "observables." + k.Key, Option = "--obs-" + k.Key.Replace('_', '-'), Family = SettingFamily.Observable, SpectrumOnly = true,
            Kind = k.Kind switch { ObservableKeyKind.Switch => SettingKind.Switch, ObservableKeyKind.Whole => SettingKind.Whole, ObservableKeyKind.Word => SettingKind.Text, _ => SettingKind.Number },
            Doc = k.Description, Default = ObservableDefault(k.Description), ReportRank = 1000 + i,
        }),
    ];

    /// <summary>Rows of the outputs' settings list that are not settings (where they came from, what was derived), with their rank.</summary>
    private static readonly (string Key, int Rank, Func<RunSettings, string?> Value)[] DerivedReportRows =
    [
        ("deck", 20, s => s.DeckPath),
        ("reheating.kind", 150, s => s.Pivot.Efolds is null ? s.Pivot.Reheating.Kind.ToString().ToLowerInvariant() : null),
    ];

    private static readonly Dictionary<string, SettingDef> ByPath = All.ToDictionary(d => d.Path, StringComparer.Ordinal);

    private static readonly Dictionary<string, SettingDef> ByOption = All.ToDictionary(d => d.Option, StringComparer.Ordinal);

    private static readonly Dictionary<string, SettingDef> BySweep = All.Where(d => d.Sweep is not null).ToDictionary(d => d.Sweep!, StringComparer.Ordinal);

    /// <summary>The setting at a deck path ("start.phi0"), or null.</summary>
    public static SettingDef? Find(string path) => ByPath.GetValueOrDefault(path);

    /// <summary>The setting at a deck path; throws when there is none (a programming error).</summary>
    public static SettingDef Get(string path) => ByPath.TryGetValue(path, out var d) ? d : throw new ArgumentException($"no setting {path}", nameof(path));

    /// <summary>The setting of a command-line option ("--phi0"), or null.</summary>
    public static SettingDef? FindOption(string option) => ByOption.GetValueOrDefault(option);

    /// <summary>The setting of a sweep key ("reheat.T"), or null; "param.NAME" stands for <see cref="Parameters"/>.</summary>
    public static SettingDef? FindSweep(string key) => BySweep.GetValueOrDefault(key);

    /// <summary>The sweep keys in the order they are listed (<c>param.NAME</c> stands for any model parameter).</summary>
    public static IReadOnlyList<string> SweepKeys { get; } = [.. All.Where(d => d.Sweep is not null).OrderBy(d => d.SweepRank).Select(d => d.Sweep!)];

    /// <summary>The deck's sections and their keys, in deck order (top-level keys excluded).</summary>
    public static IReadOnlyDictionary<string, string[]> Sections { get; } = BuildSections();

    /// <summary>The deck's top-level keys.</summary>
    public static IReadOnlyList<string> TopLevelKeys { get; } = [.. All.Where(d => d.Section.Length == 0).Select(d => d.Path)];

    /// <summary>The names of the [flags] thresholds, in deck order.</summary>
    public static IReadOnlyList<string> FlagKeys { get; } = [.. FlagThresholds.Select(f => f.Key)];

    private static Dictionary<string, string[]> BuildSections()
    {
        var sections = new Dictionary<string, string[]>(StringComparer.Ordinal);
        foreach (var d in All)
        {
            if (d.Section.Length == 0) continue;
            // The table of model parameters is a key of [model] ("parameters"), as TOML reads it.
            string section = d.Kind == SettingKind.Table ? d.Path[..d.Path.LastIndexOf('.')] : d.Section;
            sections[section] = sections.TryGetValue(section, out var keys) ? [.. keys, d.Name] : [d.Name];
        }
        return sections;
    }

    /// <summary>
    /// The value of a number setting, checked by its validator: null when absent (<paramref name="value"/> null and
    /// no default), the default when absent, else the value or a one-line <see cref="DeckException"/> naming where it came from.
    /// </summary>
    public static double? Checked(SettingDef def, Located<double>? value)
    {
        ArgumentNullException.ThrowIfNull(def);
        if (value is not { } v) return def.DefaultValue;
        if (def.Check?.Invoke(v.Value) is string problem) throw v.Error(problem);
        return v.Value;
    }

    /// <summary>Every setting the run used, as the outputs record them (key, value, is a number), in the files' order.</summary>
    public static IReadOnlyList<(string Key, string Value, bool IsNumber)> ReportEntries(RunSettings s)
    {
        ArgumentNullException.ThrowIfNull(s);
        var rows = new List<(int Rank, int Order, string Key, string? Value, bool Number)>();
        int order = 0;
        foreach (var (key, rank, value) in DerivedReportRows) rows.Add((rank, order++, key, value(s), false));
        var observables = ObservablesKeys.Entries(s.Observables);
        foreach (var d in All)
        {
            if (d.Kind == SettingKind.Table)
            {
                foreach (var kv in s.Model.Parameters.OrderBy(kv => kv.Key, StringComparer.Ordinal))
                    rows.Add((d.ReportRank, order++, d.Path + "." + kv.Key, F(kv.Value), true));
            }
            else if (d.Family == SettingFamily.Observable)
            {
                foreach (var (key, value, number) in observables)
                    if ("observables." + key == d.Path) rows.Add((d.ReportRank, order++, d.Path, value, number));
            }
            else if (d.Report is { } report) rows.Add((d.ReportRank, order++, d.Path, report(s), d.ReportNumber));
            else if (d.ReportRank > 0 && SettingValues.HoldsNumber(d)) rows.Add((d.ReportRank, order++, d.Path, Opt(s.Values.Number(d.Path)), true));
        }
        rows.Sort((a, b) => a.Rank != b.Rank ? a.Rank.CompareTo(b.Rank) : a.Order.CompareTo(b.Order));
        var result = new List<(string, string, bool)>(rows.Count);
        foreach (var r in rows)
            if (r.Value is not null) result.Add((r.Key, r.Value, r.Number && IsNumeric(r.Value)));
        return result;
    }

    /// <summary>True when a setting is recorded in the outputs' settings list (possibly only for some runs).</summary>
    public static bool IsReported(SettingDef def) => def.Report is not null || def.Kind == SettingKind.Table || def.Family == SettingFamily.Observable
        || (def.ReportRank > 0 && SettingValues.HoldsNumber(def));

    // Settings whose text is a number (round-trip form) are written as numbers; formulas, paths and words stay text.
    private static bool IsNumeric(string value) =>
        double.TryParse(value, NumberStyles.Float, Inv, out double x) && double.IsFinite(x);

    /// <summary>
    /// The docs' key table (docs/models-and-decks.md, between its settings-table markers): one row per setting with
    /// its deck key, option, sweep key, unit, meaning and default. A test checks the docs hold exactly this text.
    /// </summary>
    public static string MarkdownTable()
    {
        var sb = new System.Text.StringBuilder();
        sb.Append("| deck key | option | sweep key | unit | meaning | default |\n");
        sb.Append("|---|---|---|---|---|---|\n");
        foreach (var d in All)
        {
            string option = d.Kind == SettingKind.Table ? $"`{d.Option} NAME=VALUE`" : $"`{d.Option}`";
            string sweep = d.Sweep is null ? "" : $"`{d.Sweep}`";
            sb.Append(Inv, $"| `{d.DocKey}` | {option} | {sweep} | {d.Unit} | {Cell(d.Doc)} | {Cell(d.Default)} |\n");
        }
        return sb.ToString();
    }

    // A table cell: a '|' of the text (|x|) written as "\|" so that it does not end the cell.
    private static string Cell(string text) => text.Replace("|", "\\|", StringComparison.Ordinal);

    private static string ObservableDefault(string description)
    {
        var m = System.Text.RegularExpressions.Regex.Match(description, @"\(default ([^)]*)\)");
        if (m.Success) return m.Groups[1].Value.Replace(" from T_0 with massless neutrinos, ", " from T_0: ", StringComparison.Ordinal);
        m = System.Text.RegularExpressions.Regex.Match(description, @"(\S+) \(default\)");
        return m.Success ? m.Groups[1].Value : "—";
    }
}
