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
/// Unvalidated run input gathered from a deck or from command-line options; every field is optional. Merge a deck
/// with command-line overrides by <see cref="Merge"/>, then turn it into <see cref="RunSettings"/> with
/// <see cref="SettingsResolver.Resolve(RunInput)"/>.
/// </summary>
public sealed class RunInput
{
    /// <summary>The deck file, when read from one.</summary>
    public string? DeckPath { get; set; }

    /// <summary>Free-text title.</summary>
    public Located<string>? Title { get; set; }

    /// <summary>Catalogue id.</summary>
    public Located<string>? ModelId { get; set; }

    /// <summary>V (or V_J with a coupling).</summary>
    public Located<string>? Potential { get; set; }

    /// <summary>K (or K_J with a coupling).</summary>
    public Located<string>? Kinetic { get; set; }

    /// <summary>Omega^2.</summary>
    public Located<string>? Coupling { get; set; }

    /// <summary>Palatini formulation flag.</summary>
    public Located<bool>? Palatini { get; set; }

    /// <summary>Parameter values by name.</summary>
    public Dictionary<string, Located<double>> Parameters { get; } = new(StringComparer.Ordinal);

    /// <summary>Where inflation is ended by hand.</summary>
    public Located<double>? PhiEnd { get; set; }

    /// <summary>Initial field value.</summary>
    public Located<double>? Phi0 { get; set; }

    /// <summary>Initial d phi / dN.</summary>
    public Located<double>? DPhi0 { get; set; }

    /// <summary>Start this many e-folds before the end of inflation (phi0 is solved for) instead of at a field value.</summary>
    public Located<double>? StartEfolds { get; set; }

    /// <summary>Pivot wavenumber, 1/Mpc.</summary>
    public Located<double>? KPivot { get; set; }

    /// <summary>N_* given directly.</summary>
    public Located<double>? Efolds { get; set; }

    /// <summary>Reheating equation of state.</summary>
    public Located<double>? ReheatW { get; set; }

    /// <summary>Reheating temperature, GeV.</summary>
    public Located<double>? ReheatTemperature { get; set; }

    /// <summary>Reheating duration in e-folds.</summary>
    public Located<double>? ReheatEfolds { get; set; }

    /// <summary>g_reh.</summary>
    public Located<double>? ReheatDof { get; set; }

    /// <summary>A_s, or a null value for "none".</summary>
    public Located<double?>? Amplitude { get; set; }

    /// <summary>Normalise by solving for this model parameter instead of rescaling V.</summary>
    public Located<string>? SolveFor { get; set; }

    /// <summary>Smallest k, 1/Mpc.</summary>
    public Located<double>? KMin { get; set; }

    /// <summary>Largest k, 1/Mpc.</summary>
    public Located<double>? KMax { get; set; }

    /// <summary>Number of k values.</summary>
    public Located<long>? KCount { get; set; }

    /// <summary>Relative accuracy target.</summary>
    public Located<double>? Tolerance { get; set; }

    /// <summary>Output directory.</summary>
    public Located<string>? OutDir { get; set; }

    /// <summary>Output formats.</summary>
    public Located<IReadOnlyList<string>>? Formats { get; set; }

    /// <summary>The dimensionless Hubble parameter h: the primordial table then gives k in h/Mpc.</summary>
    public Located<double>? TableH { get; set; }

    /// <summary>Flag thresholds by deck key under [flags] (e.g. "spectrum_threshold").</summary>
    public Dictionary<string, Located<double>> FlagValues { get; } = new(StringComparer.Ordinal);

    /// <summary>Slow-roll reference of the flags ("first_order", "second_order" or "potential").</summary>
    public Located<string>? FlagReference { get; set; }

    /// <summary>[observables] values by key (see <see cref="ObservablesKeys"/>), as text: "true"/"false", numbers, words.</summary>
    public Dictionary<string, Located<string>> ObservableValues { get; } = new(StringComparer.Ordinal);

    /// <summary>
    /// The deck overridden by the command line (the command line wins). Choosing a model source on the command line
    /// (--model, or --potential) replaces the deck's; choosing N_* directly (--efolds) replaces the deck's reheating
    /// and a reheating option replaces the deck's N_*. Parameters merge name by name.
    /// </summary>
    public static RunInput Merge(RunInput deck, RunInput overrides)
    {
        var r = new RunInput { DeckPath = deck.DeckPath ?? overrides.DeckPath };
        r.Title = overrides.Title ?? deck.Title;

        bool cliModel = overrides.ModelId is not null;
        bool cliFormula = overrides.Potential is not null;
        r.ModelId = overrides.ModelId ?? (cliFormula ? null : deck.ModelId);
        r.Potential = overrides.Potential ?? (cliModel ? null : deck.Potential);
        r.Kinetic = overrides.Kinetic ?? (cliModel ? null : deck.Kinetic);
        r.Coupling = overrides.Coupling ?? (cliModel ? null : deck.Coupling);
        r.Palatini = overrides.Palatini ?? (cliModel ? null : deck.Palatini);
        foreach (var (k, v) in deck.Parameters) r.Parameters[k] = v;
        foreach (var (k, v) in overrides.Parameters) r.Parameters[k] = v;
        r.PhiEnd = overrides.PhiEnd ?? deck.PhiEnd;
        // A start given on the command line (field value or e-folds) replaces the deck's start of either kind.
        bool cliStart = overrides.Phi0 is not null || overrides.StartEfolds is not null;
        r.Phi0 = overrides.Phi0 ?? (cliStart ? null : deck.Phi0);
        r.StartEfolds = overrides.StartEfolds ?? (cliStart ? null : deck.StartEfolds);
        r.DPhi0 = overrides.DPhi0 ?? deck.DPhi0;
        r.KPivot = overrides.KPivot ?? deck.KPivot;

        bool cliEfolds = overrides.Efolds is not null;
        bool cliReheat = overrides.ReheatW is not null || overrides.ReheatTemperature is not null || overrides.ReheatEfolds is not null;
        r.Efolds = overrides.Efolds ?? (cliReheat ? null : deck.Efolds);
        r.ReheatW = overrides.ReheatW ?? (cliEfolds ? null : deck.ReheatW);
        bool cliEnd = overrides.ReheatTemperature is not null || overrides.ReheatEfolds is not null;
        r.ReheatTemperature = overrides.ReheatTemperature ?? (cliEfolds || cliEnd ? null : deck.ReheatTemperature);
        r.ReheatEfolds = overrides.ReheatEfolds ?? (cliEfolds || cliEnd ? null : deck.ReheatEfolds);
        r.ReheatDof = overrides.ReheatDof ?? deck.ReheatDof;

        r.Amplitude = overrides.Amplitude ?? deck.Amplitude;
        r.SolveFor = overrides.SolveFor ?? deck.SolveFor;
        r.KMin = overrides.KMin ?? deck.KMin;
        r.KMax = overrides.KMax ?? deck.KMax;
        r.KCount = overrides.KCount ?? deck.KCount;
        r.Tolerance = overrides.Tolerance ?? deck.Tolerance;
        r.OutDir = overrides.OutDir ?? deck.OutDir;
        r.Formats = overrides.Formats ?? deck.Formats;
        r.TableH = overrides.TableH ?? deck.TableH;
        foreach (var (k, v) in deck.FlagValues) r.FlagValues[k] = v;
        foreach (var (k, v) in overrides.FlagValues) r.FlagValues[k] = v;
        r.FlagReference = overrides.FlagReference ?? deck.FlagReference;
        foreach (var (k, v) in deck.ObservableValues) r.ObservableValues[k] = v;
        foreach (var (k, v) in overrides.ObservableValues) r.ObservableValues[k] = v;
        return r;
    }
}
