namespace ModeSolver.Decks;

/// <summary>A raw input value with where it came from: a deck key with file and line, or a command-line option.</summary>
/// <param name="Value">The value.</param>
/// <param name="Key">Deck key ("start.phi0") or option ("--phi0").</param>
/// <param name="File">Deck file, or null for the command line.</param>
/// <param name="Line">1-based line in the deck, when known.</param>
public readonly record struct Located<T>(T Value, string Key, string? File = null, int? Line = null)
{
    /// <summary>A <see cref="DeckException"/> whose one-line message is "file:line: key problem".</summary>
    public DeckException Error(string problem) => DeckErrors.At(Key, File, Line, problem);
}

internal static class DeckErrors
{
    public static DeckException At(string key, string? file, int? line, string problem)
    {
        string where = file is null ? "" : line is int l ? $"{file}:{l}: " : $"{file}: ";
        return new DeckException(OneLine($"{where}{key} {problem}"), key, file, line);
    }

    public static string OneLine(string s) => s.Replace("\r", " ").Replace("\n", " ");
}

/// <summary>
/// Unvalidated run input gathered from a deck, command-line options, sweep points or native keys; every setting is
/// optional. The raw values are kept by the setting's path (<see cref="SettingsSchema"/>); the typed properties are
/// views of that store. Merge a deck with overrides by <see cref="Merge"/>, then turn it into <see cref="RunSettings"/>
/// with <see cref="SettingsResolver.Resolve(RunInput)"/>.
/// </summary>
public sealed class RunInput
{
    // Values of the plain settings by path: boxed Located<T> of the kind's type (see ValueType).
    private readonly Dictionary<string, object> _values = new(StringComparer.Ordinal);

    /// <summary>The deck file, when read from one.</summary>
    public string? DeckPath { get; set; }

    /// <summary>Free-text title.</summary>
    public Located<string>? Title { get => Get<string>("title"); set => Put("title", value); }

    /// <summary>Catalogue id.</summary>
    public Located<string>? ModelId { get => Get<string>("model.catalogue"); set => Put("model.catalogue", value); }

    /// <summary>V (or V_J with a coupling).</summary>
    public Located<string>? Potential { get => Get<string>("model.potential"); set => Put("model.potential", value); }

    /// <summary>K (or K_J with a coupling).</summary>
    public Located<string>? Kinetic { get => Get<string>("model.kinetic"); set => Put("model.kinetic", value); }

    /// <summary>Omega^2.</summary>
    public Located<string>? Coupling { get => Get<string>("model.coupling"); set => Put("model.coupling", value); }

    /// <summary>Palatini formulation flag.</summary>
    public Located<bool>? Palatini { get => Get<bool>("model.palatini"); set => Put("model.palatini", value); }

    /// <summary>Where inflation is ended by hand.</summary>
    public Located<double>? PhiEnd { get => Get<double>("model.phi_end"); set => Put("model.phi_end", value); }

    /// <summary>Initial field value.</summary>
    public Located<double>? Phi0 { get => Get<double>("start.phi0"); set => Put("start.phi0", value); }

    /// <summary>Initial d phi / dN.</summary>
    public Located<double>? DPhi0 { get => Get<double>("start.dphi0"); set => Put("start.dphi0", value); }

    /// <summary>Start this many e-folds before the end of inflation (phi0 is solved for) instead of at a field value.</summary>
    public Located<double>? StartEfolds { get => Get<double>("start.efolds"); set => Put("start.efolds", value); }

    /// <summary>Pivot wavenumber, 1/Mpc.</summary>
    public Located<double>? KPivot { get => Get<double>("pivot.k"); set => Put("pivot.k", value); }

    /// <summary>N_* given directly.</summary>
    public Located<double>? Efolds { get => Get<double>("pivot.efolds"); set => Put("pivot.efolds", value); }

    /// <summary>Reheating equation of state.</summary>
    public Located<double>? ReheatW { get => Get<double>("reheating.w"); set => Put("reheating.w", value); }

    /// <summary>Reheating temperature, GeV.</summary>
    public Located<double>? ReheatTemperature { get => Get<double>("reheating.temperature_gev"); set => Put("reheating.temperature_gev", value); }

    /// <summary>Reheating duration in e-folds.</summary>
    public Located<double>? ReheatEfolds { get => Get<double>("reheating.efolds"); set => Put("reheating.efolds", value); }

    /// <summary>g_reh.</summary>
    public Located<double>? ReheatDof { get => Get<double>("reheating.dof"); set => Put("reheating.dof", value); }

    /// <summary>A_s, or a null value for "none".</summary>
    public Located<double?>? Amplitude { get => Get<double?>("normalisation.a_s"); set => Put("normalisation.a_s", value); }

    /// <summary>Normalise by solving for this model parameter instead of rescaling V.</summary>
    public Located<string>? SolveFor { get => Get<string>("normalisation.solve_for"); set => Put("normalisation.solve_for", value); }

    /// <summary>Smallest k, 1/Mpc.</summary>
    public Located<double>? KMin { get => Get<double>("modes.k_min"); set => Put("modes.k_min", value); }

    /// <summary>Largest k, 1/Mpc.</summary>
    public Located<double>? KMax { get => Get<double>("modes.k_max"); set => Put("modes.k_max", value); }

    /// <summary>Number of k values.</summary>
    public Located<long>? KCount { get => Get<long>("modes.count"); set => Put("modes.count", value); }

    /// <summary>Relative accuracy target.</summary>
    public Located<double>? Tolerance { get => Get<double>("modes.tolerance"); set => Put("modes.tolerance", value); }

    /// <summary>Output directory.</summary>
    public Located<string>? OutDir { get => Get<string>("output.dir"); set => Put("output.dir", value); }

    /// <summary>Output formats.</summary>
    public Located<IReadOnlyList<string>>? Formats { get => Get<IReadOnlyList<string>>("output.formats"); set => Put("output.formats", value); }

    /// <summary>The dimensionless Hubble parameter h: the primordial table then gives k in h/Mpc.</summary>
    public Located<double>? TableH { get => Get<double>("output.table_h"); set => Put("output.table_h", value); }

    /// <summary>Slow-roll reference of the flags ("first_order", "second_order" or "potential").</summary>
    public Located<string>? FlagReference { get => Get<string>("flags.reference"); set => Put("flags.reference", value); }

    /// <summary>Parameter values by name.</summary>
    public Dictionary<string, Located<double>> Parameters { get; } = new(StringComparer.Ordinal);

    /// <summary>Flag thresholds by deck key under [flags] (e.g. "spectrum_threshold").</summary>
    public Dictionary<string, Located<double>> FlagValues { get; } = new(StringComparer.Ordinal);

    /// <summary>[observables] values by key (see <see cref="ObservablesKeys"/>), as text: "true"/"false", numbers, words.</summary>
    public Dictionary<string, Located<string>> ObservableValues { get; } = new(StringComparer.Ordinal);

    /// <summary>
    /// The type of a setting's raw value: <see cref="Located{T}"/> of double (Number; Flag family), long (Whole),
    /// string (Text, Matrix; Observable family), bool (Switch), double? (NumberOrNone), IReadOnlyList&lt;string&gt; (List);
    /// a <see cref="SettingDef.PerField"/> number may also hold IReadOnlyList&lt;double&gt;.
    /// </summary>
    public static Type ValueType(SettingDef def)
    {
        ArgumentNullException.ThrowIfNull(def);
        if (def.FormOf is not null) return ValueType(SettingsSchema.Get(def.FormOf));
        return def.Family switch
        {
            SettingFamily.Flag => typeof(Located<double>),
            SettingFamily.Observable => typeof(Located<string>),
            _ => def.Kind switch
            {
                SettingKind.Number => typeof(Located<double>),
                SettingKind.Whole => typeof(Located<long>),
                SettingKind.Switch => typeof(Located<bool>),
                SettingKind.NumberOrNone => typeof(Located<double?>),
                SettingKind.List => typeof(Located<IReadOnlyList<string>>),
                SettingKind.Table => typeof(Dictionary<string, Located<double>>),
                _ => typeof(Located<string>),
            },
        };
    }

    /// <summary>The raw value of a setting (a boxed <see cref="Located{T}"/> of <see cref="ValueType"/>), or null when not given; the parameters table when it has entries.</summary>
    public object? GetValue(SettingDef def)
    {
        ArgumentNullException.ThrowIfNull(def);
        return def.Family switch
        {
            SettingFamily.Flag => FlagValues.TryGetValue(def.Name, out var f) ? f : null,
            SettingFamily.Observable => ObservableValues.TryGetValue(def.Name, out var o) ? o : null,
            _ when def.Kind == SettingKind.Table => Parameters.Count > 0 ? Parameters : null,
            _ => _values.GetValueOrDefault(def.Slot),
        };
    }

    /// <summary>Sets (or with null removes) the raw value of a setting; the value must be a <see cref="ValueType"/>.</summary>
    public void SetValue(SettingDef def, object? value)
    {
        ArgumentNullException.ThrowIfNull(def);
        if (value is not null && value.GetType() != ValueType(def) && !(def.PerField && value is Located<IReadOnlyList<double>>))
            throw new ArgumentException($"{def.Path} holds a {ValueType(def).Name}, not a {value.GetType().Name}", nameof(value));
        switch (def.Family)
        {
            case SettingFamily.Flag:
                if (value is Located<double> f) FlagValues[def.Name] = f; else FlagValues.Remove(def.Name);
                break;
            case SettingFamily.Observable:
                if (value is Located<string> o) ObservableValues[def.Name] = o; else ObservableValues.Remove(def.Name);
                break;
            default:
                if (def.Kind == SettingKind.Table)
                {
                    Parameters.Clear();
                    if (value is Dictionary<string, Located<double>> pars) foreach (var (k, v) in pars) Parameters[k] = v;
                }
                else if (value is null) _values.Remove(def.Slot);
                else _values[def.Slot] = value;
                break;
        }
    }

    private Located<T>? Get<T>(string path) => _values.TryGetValue(path, out var o) && o is Located<T> v ? v : null;

    /// <summary>
    /// The value of a <see cref="SettingDef.PerField"/> setting as a list (one number per field), whether it was given as
    /// one number or as several; null when not given.
    /// </summary>
    public Located<IReadOnlyList<double>>? PerFieldValues(SettingDef def)
    {
        ArgumentNullException.ThrowIfNull(def);
        return _values.GetValueOrDefault(def.Slot) switch
        {
            Located<IReadOnlyList<double>> list => list,
            Located<double> one => new Located<IReadOnlyList<double>>([one.Value], one.Key, one.File, one.Line),
            _ => null,
        };
    }

    /// <summary>Field names of a several-field model.</summary>
    public Located<IReadOnlyList<string>>? Fields { get => Get<IReadOnlyList<string>>("model.fields"); set => Put("model.fields", value); }

    /// <summary>The field-space metric (or K^J_IJ with a coupling), in the text form of <see cref="FormulaMatrix"/>.</summary>
    public Located<string>? Metric { get => Get<string>("model.metric"); set => Put("model.metric", value); }

    /// <summary>The end surface: a formula in the fields; inflation ends where it crosses zero.</summary>
    public Located<string>? End { get => Get<string>("model.end"); set => Put("model.end", value); }

    private void Put<T>(string path, Located<T>? value)
    {
        if (value is { } v) _values[path] = v;
        else _values.Remove(path);
    }

    /// <summary>
    /// The deck overridden by <paramref name="overrides"/> (the command line, a sweep point, native keys): a setting
    /// given in the overrides wins; a deck value is dropped when a setting of its <see cref="SettingDef.ReplacedBy"/>
    /// is given in the overrides (a model source replaces the other, N_* given directly replaces the deck's reheating
    /// and a reheating value the deck's N_*, a start of either kind the other). Parameters merge name by name.
    /// </summary>
    public static RunInput Merge(RunInput deck, RunInput overrides)
    {
        ArgumentNullException.ThrowIfNull(deck);
        ArgumentNullException.ThrowIfNull(overrides);
        var r = new RunInput { DeckPath = deck.DeckPath ?? overrides.DeckPath };
        foreach (var def in SettingsSchema.All)
        {
            if (def.FormOf is not null) continue; // stored under the setting it is a form of
            if (def.Kind == SettingKind.Table)
            {
                foreach (var (k, v) in deck.Parameters) r.Parameters[k] = v;
                foreach (var (k, v) in overrides.Parameters) r.Parameters[k] = v;
                continue;
            }
            object? value = overrides.GetValue(def);
            if (value is null && !Replaced(def, overrides)) value = deck.GetValue(def);
            if (value is not null) r.SetValue(def, value);
        }
        return r;
    }

    private static bool Replaced(SettingDef def, RunInput overrides)
    {
        foreach (string path in def.ReplacedBy)
            if (overrides.GetValue(SettingsSchema.Get(path)) is not null) return true;
        return false;
    }
}
