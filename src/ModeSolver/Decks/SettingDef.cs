namespace ModeSolver.Decks;

/// <summary>What a setting's value is, in a deck, on the command line and through the native library.</summary>
public enum SettingKind
{
    /// <summary>A number.</summary>
    Number,
    /// <summary>A whole number.</summary>
    Whole,
    /// <summary>Text: a formula, a name, a word from a list, a path.</summary>
    Text,
    /// <summary>true or false.</summary>
    Switch,
    /// <summary>A number, or the word "none".</summary>
    NumberOrNone,
    /// <summary>A list of words (a TOML array of strings; comma-separated on the command line).</summary>
    List,
    /// <summary>A table of NAME = number (the model parameters).</summary>
    Table,
    /// <summary>
    /// A square matrix of formulas (a TOML array of arrays of strings; on the command line rows separated by ';' and
    /// entries by ','), kept as its text form (<see cref="FormulaMatrix"/>).
    /// </summary>
    Matrix,
}

/// <summary>Where a setting's raw value is kept in <see cref="RunInput"/>.</summary>
public enum SettingFamily
{
    /// <summary>A value of its own.</summary>
    Plain,
    /// <summary>A threshold of the [flags] table, kept in <see cref="RunInput.FlagValues"/> by its name.</summary>
    Flag,
    /// <summary>A key of the [observables] table, kept as text in <see cref="RunInput.ObservableValues"/> by its name.</summary>
    Observable,
}

/// <summary>
/// One setting, declared once in <see cref="SettingsSchema"/>: from this entry the deck reader, the command-line
/// options, the sweep keys, the native library's keys, the merge of a deck with overrides, the settings list of the
/// outputs and the documentation's key table are made.
/// </summary>
public sealed record SettingDef
{
    /// <summary>Deck path: "section.key", or a top-level "key" ("title").</summary>
    public required string Path { get; init; }

    /// <summary>The command-line option, e.g. "--phi0".</summary>
    public required string Option { get; init; }

    /// <summary>The value's kind.</summary>
    public required SettingKind Kind { get; init; }

    /// <summary>One documentation line (deck table of the docs and --help).</summary>
    public required string Doc { get; init; }

    /// <summary>Unit of the value as the user gives it ("1/Mpc", "GeV", "M_Pl"); empty when dimensionless or not a number.</summary>
    public string Unit { get; init; } = "";

    /// <summary>The default as the documentation states it.</summary>
    public string Default { get; init; } = "—";

    /// <summary>The key a sweep axis uses for this setting, or null when it cannot be swept.</summary>
    public string? Sweep { get; init; }

    /// <summary>Position of <see cref="Sweep"/> in the list of sweep keys.</summary>
    public int SweepRank { get; init; }

    /// <summary>
    /// Paths of the settings whose value in the overrides (command line, sweep point, native key) removes this
    /// setting's deck value when the two are merged (a model source replaces the other; N_* replaces reheating ...).
    /// </summary>
    public IReadOnlyList<string> ReplacedBy { get; init; } = [];

    /// <summary>When set, this setting is another form of the setting at this path and is stored there (converted by <see cref="ToTarget"/>).</summary>
    public string? FormOf { get; init; }

    /// <summary>Converts a value of this form to the value of <see cref="FormOf"/>.</summary>
    public Func<double, double>? ToTarget { get; init; }

    /// <summary>What to tell the user when both forms are given ("give A_s in one form").</summary>
    public string? BothFormsHint { get; init; }

    /// <summary>
    /// True for a number that may also be given per field: an array of numbers in a deck (one per field, in field order),
    /// comma-separated on the command line; kept as a list of numbers when it is one.
    /// </summary>
    public bool PerField { get; init; }

    /// <summary>True when only the spectrum needs it (the background command refuses the option).</summary>
    public bool SpectrumOnly { get; init; }

    /// <summary>Where the raw value is kept.</summary>
    public SettingFamily Family { get; init; }

    /// <summary>
    /// Validator of a number: the problem as the message's tail ("must be a positive number (got 0)"), or null when
    /// the value is fine. Used by <see cref="SettingsResolver"/> through <see cref="SettingsSchema.Checked"/>.
    /// </summary>
    public Func<double, string?>? Check { get; init; }

    /// <summary>The default of a number that <see cref="SettingsSchema.Checked"/> falls back to.</summary>
    public double? DefaultValue { get; init; }

    /// <summary>
    /// The value as the outputs record it (null: not recorded for this run). When null, a number setting with a
    /// <see cref="ReportRank"/> is recorded from <see cref="RunSettings.Values"/>; otherwise it is not recorded on its own.
    /// </summary>
    public Func<RunSettings, string?>? Report { get; init; }

    /// <summary>True when the recorded value is a number (written as a number when it parses as one).</summary>
    public bool ReportNumber { get; init; }

    /// <summary>Position in the outputs' settings list (kept as files have always had it); 0 with no <see cref="Report"/>: not listed.</summary>
    public int ReportRank { get; init; }

    /// <summary>The deck section ("start"), or "" for a top-level key.</summary>
    public string Section => Path.Contains('.', StringComparison.Ordinal) ? Path[..Path.LastIndexOf('.')] : "";

    /// <summary>The key inside its section ("phi0").</summary>
    public string Name => Path[(Path.LastIndexOf('.') + 1)..];

    /// <summary>The path the raw value is stored under in <see cref="RunInput"/>.</summary>
    public string Slot => FormOf ?? Path;

    /// <summary>The deck key as the docs write it: "[start] phi0", or "title".</summary>
    public string DocKey => Section.Length == 0 ? Path : Kind == SettingKind.Table ? $"[{Path}] NAME" : $"[{Section}] {Name}";
}
