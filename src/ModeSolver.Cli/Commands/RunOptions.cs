using System.CommandLine;
using System.Globalization;
using ModeSolver.Decks;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// The shared run options (the one-line form of a deck) and the optional positional DECK path. Any deck value can be
/// overridden on the command line; the command line wins. With --coupling the theory is in the Jordan frame and
/// --potential is V_J. Without --efolds or reheating options, reheating is instantaneous.
/// Values are taken as text and checked here so that every mistake gives one line naming the option.
/// </summary>
public sealed class RunOptions
{
    /// <summary>Optional deck path.</summary>
    public Argument<string?> Deck { get; } = new("DECK") { Description = "Run deck (TOML); options given on the command line override it.", Arity = ArgumentArity.ZeroOrOne };

    /// <summary>--potential EXPR.</summary>
    public Option<string?> Potential { get; } = Opt("--potential", "V(phi) as a formula (V_J with --coupling), reduced Planck units.");

    /// <summary>--kinetic EXPR.</summary>
    public Option<string?> Kinetic { get; } = Opt("--kinetic", "Non-canonical kinetic function K(phi) (K_J with --coupling).");

    /// <summary>--coupling EXPR.</summary>
    public Option<string?> Coupling { get; } = Opt("--coupling", "Omega^2(phi): the theory is then given in the Jordan frame.");

    /// <summary>--palatini.</summary>
    public Option<bool> Palatini { get; } = new("--palatini") { Description = "Palatini formulation of the Jordan-frame theory (default: metric)." };

    /// <summary>--param NAME=VALUE (repeatable).</summary>
    public Option<string[]> Param { get; } = new("--param") { Description = "A formula parameter, NAME=VALUE; repeat for several.", AllowMultipleArgumentsPerToken = false, Arity = ArgumentArity.ZeroOrMore };

    /// <summary>--model ID.</summary>
    public Option<string?> Model { get; } = Opt("--model", "A catalogue model id (see `modesolver models`).");

    /// <summary>--phi0 X.</summary>
    public Option<string?> Phi0 { get; } = Opt("--phi0", "Initial field value (default: the catalogue's).");

    /// <summary>--dphi0 Y.</summary>
    public Option<string?> DPhi0 { get; } = Opt("--dphi0", "Initial d phi / dN (default: slow-roll attractor).");

    /// <summary>--efolds N.</summary>
    public Option<string?> Efolds { get; } = Opt("--efolds", "N_*: e-folds before the end of inflation at which k_pivot = aH.");

    /// <summary>--reheat-w W.</summary>
    public Option<string?> ReheatW { get; } = Opt("--reheat-w", "Equation of state during reheating, -1/3 < w <= 1 (default 0 with --reheat-T).");

    /// <summary>--reheat-T GEV.</summary>
    public Option<string?> ReheatT { get; } = Opt("--reheat-T", "Reheating temperature in GeV.");

    /// <summary>--k-pivot K.</summary>
    public Option<string?> KPivot { get; } = Opt("--k-pivot", "Pivot wavenumber in 1/Mpc (default 0.05).");

    /// <summary>--amplitude A_S or none.</summary>
    public Option<string?> Amplitude { get; } = Opt("--amplitude", "Scalar amplitude A_s at the pivot (default 2.099e-9), or 'none'.");

    /// <summary>--k-min K.</summary>
    public Option<string?> KMin { get; } = Opt("--k-min", "Smallest wavenumber, 1/Mpc.");

    /// <summary>--k-max K.</summary>
    public Option<string?> KMax { get; } = Opt("--k-max", "Largest wavenumber, 1/Mpc.");

    /// <summary>--k-count N.</summary>
    public Option<string?> KCount { get; } = Opt("--k-count", "Number of log-spaced wavenumbers.");

    /// <summary>--tolerance T.</summary>
    public Option<string?> Tolerance { get; } = Opt("--tolerance", "Relative accuracy target of the spectra.");

    /// <summary>--out DIR.</summary>
    public Option<string?> Out { get; } = Opt("--out", "Output directory.");

    /// <summary>--title TEXT.</summary>
    public Option<string?> Title { get; } = Opt("--title", "Free-text title of the run (written to the outputs).");

    /// <summary>--phi-end X.</summary>
    public Option<string?> PhiEnd { get; } = Opt("--phi-end", "End inflation abruptly when the field reaches this value.");

    /// <summary>--start-efolds N.</summary>
    public Option<string?> StartEfolds { get; } = Opt("--start-efolds", "Start this many e-folds before the end of inflation (phi0 is solved for; instead of --phi0).");

    /// <summary>--reheat-efolds N.</summary>
    public Option<string?> ReheatEfolds { get; } = Opt("--reheat-efolds", "Duration of reheating in e-folds, N_reh (instead of --reheat-T).");

    /// <summary>--dof G.</summary>
    public Option<string?> Dof { get; } = Opt("--dof", "Relativistic degrees of freedom at reheating, g_reh (default 106.75).");

    /// <summary>--ln-amplitude X.</summary>
    public Option<string?> LnAmplitude { get; } = Opt("--ln-amplitude", "The amplitude as ln(10^10 A_s), the form papers quote (instead of --amplitude).");

    /// <summary>--normalise-by NAME.</summary>
    public Option<string?> NormaliseBy { get; } = Opt("--normalise-by", "Reach A_s by solving for this model parameter (e.g. xi) instead of rescaling V; prints the solved value.");

    /// <summary>--formats LIST.</summary>
    public Option<string?> Formats { get; } = Opt("--formats", "Output formats, comma-separated: hdf5, table, json, plots (default: all).");

    /// <summary>--table-h H.</summary>
    public Option<string?> TableH { get; } = Opt("--table-h", "Write the primordial table's k in h/Mpc with this h (e.g. 0.674).");

    /// <summary>--flag-reference ORDER.</summary>
    public Option<string?> FlagReference { get; } = Opt("--flag-reference", "Slow-roll estimate the flags compare against: first_order, second_order (default) or potential.");

    /// <summary>--flag-KEY X for each numeric key of the deck's [flags] table, in <see cref="DeckReader.FlagKeys"/> order.</summary>
    public IReadOnlyList<Option<string?>> FlagThresholds { get; } =
        [.. DeckReader.FlagKeys.Select(k => Opt(FlagOption(k), $"Flag threshold {k} (deck [flags] {k}; see docs/outputs.md)."))];

    /// <summary>--obs-KEY for each key of the deck's [observables] table, in <see cref="ObservablesKeys.All"/> order.</summary>
    public IReadOnlyList<Option<string?>> ObservableOptions { get; } =
        [.. ObservablesKeys.All.Select(k => Opt(ObservableOption(k.Key), $"{k.Description} Deck [observables] {k.Key}{(k.Kind == ObservableKeyKind.Switch ? "; without a value: true" : "")}."))];

    /// <summary>The option of an [observables] key: "--obs-" and the key with '_' as '-'.</summary>
    public static string ObservableOption(string key) => "--obs-" + key.Replace('_', '-');

    /// <summary>The option of a [flags] key: "--flag-" and the key with '_' as '-'.</summary>
    public static string FlagOption(string key) => "--flag-" + key.Replace('_', '-');

    /// <summary>
    /// Every deck key and the option that sets it: the one list that ties the two together (a test checks it against
    /// <see cref="DeckReader.Schema"/> and the commands, so a new deck key cannot miss its option).
    /// </summary>
    public static IReadOnlyList<(string DeckKey, string Option)> DeckKeyOptions { get; } =
    [
        ("title", "--title"),
        ("model.catalogue", "--model"), ("model.potential", "--potential"), ("model.kinetic", "--kinetic"),
        ("model.coupling", "--coupling"), ("model.palatini", "--palatini"), ("model.phi_end", "--phi-end"), ("model.parameters", "--param"),
        ("start.phi0", "--phi0"), ("start.dphi0", "--dphi0"), ("start.efolds", "--start-efolds"),
        ("pivot.k", "--k-pivot"), ("pivot.efolds", "--efolds"),
        ("reheating.w", "--reheat-w"), ("reheating.temperature_gev", "--reheat-T"), ("reheating.efolds", "--reheat-efolds"), ("reheating.dof", "--dof"),
        ("normalisation.a_s", "--amplitude"), ("normalisation.ln_10_10_a_s", "--ln-amplitude"), ("normalisation.solve_for", "--normalise-by"),
        ("modes.k_min", "--k-min"), ("modes.k_max", "--k-max"), ("modes.count", "--k-count"), ("modes.tolerance", "--tolerance"),
        ("output.dir", "--out"), ("output.formats", "--formats"), ("output.table_h", "--table-h"),
        .. DeckReader.FlagKeys.Select(k => ("flags." + k, FlagOption(k))),
        ("flags.reference", "--flag-reference"),
        .. ObservablesKeys.Names.Select(k => ("observables." + k, ObservableOption(k))),
    ];

    /// <summary>Options `background` refuses: it computes no spectrum and writes no files.</summary>
    public static IReadOnlyList<string> SpectrumOnlyOptions { get; } =
        ["--out", "--k-min", "--k-max", "--k-count", "--formats", "--table-h", .. ObservablesKeys.Names.Select(ObservableOption)];

    /// <summary>
    /// A text-valued option whose value may be missing at parse time, so that a missing value becomes our own one-line
    /// error (exit 2) instead of the parser's error-and-help output.
    /// </summary>
    public static Option<string?> Opt(string name, string description) =>
        new(name) { Description = description, Arity = ArgumentArity.ZeroOrOne };

    /// <summary>The option's text, null when absent; throws a one-line <see cref="DeckException"/> when given without a value.</summary>
    public static string? Value(ParseResult parse, Option<string?> option)
    {
        if (parse.GetResult(option) is { } r && r.Tokens.Count == 0)
            throw new DeckException($"{option.Name} needs a value", option.Name);
        return parse.GetValue(option);
    }

    /// <summary>Model options only (for commands that need a theory but no run: frame).</summary>
    public static RunOptions AddModelOptions(Command cmd)
    {
        var o = new RunOptions();
        foreach (var opt in o.ModelOptions()) cmd.Options.Add(opt);
        cmd.Options.Add(o.Phi0);
        return o;
    }

    /// <summary>
    /// Adds the DECK argument and every run option to <paramref name="cmd"/>; with <paramref name="spectrum"/> false the
    /// options of <see cref="SpectrumOnlyOptions"/> are left out (the command refuses them).
    /// </summary>
    public static RunOptions Add(Command cmd, bool spectrum = true)
    {
        ArgumentNullException.ThrowIfNull(cmd);
        var o = new RunOptions();
        cmd.Arguments.Add(o.Deck);
        foreach (var opt in o.ModelOptions()) cmd.Options.Add(opt);
        foreach (Option opt in new Option[] { o.PhiEnd, o.Phi0, o.DPhi0, o.StartEfolds, o.Efolds, o.ReheatW, o.ReheatT, o.ReheatEfolds, o.Dof,
                     o.KPivot, o.Amplitude, o.LnAmplitude, o.NormaliseBy, o.KMin, o.KMax, o.KCount, o.Tolerance, o.Out, o.Formats, o.TableH, o.Title, o.FlagReference })
            if (spectrum || !SpectrumOnlyOptions.Contains(opt.Name)) cmd.Options.Add(opt);
        foreach (var opt in o.FlagThresholds) cmd.Options.Add(opt);
        foreach (var opt in o.ObservableOptions)
            if (spectrum) cmd.Options.Add(opt);
        return o;
    }

    private IEnumerable<Option> ModelOptions() => [Model, Potential, Kinetic, Coupling, Palatini, Param];

    /// <summary>The deck (if given) overridden by the options, resolved and validated.</summary>
    /// <exception cref="DeckException">bad deck or option, one line.</exception>
    public RunSettings Resolve(ParseResult parse)
    {
        ArgumentNullException.ThrowIfNull(parse);
        string? deck = parse.GetValue(Deck);
        if (deck is not null && deck.StartsWith('-'))
            throw new DeckException($"unknown option '{deck}' (see --help)", deck);
        var overrides = Overrides(parse);
        if (parse.UnmatchedTokens.Count > 0)
            throw new DeckException($"unknown option or extra argument '{parse.UnmatchedTokens[0]}' (see --help)", parse.UnmatchedTokens[0]);
        return SettingsResolver.Load(deck, overrides);
    }

    /// <summary>The command-line values as a <see cref="RunInput"/> (unvalidated beyond number syntax).</summary>
    public RunInput Overrides(ParseResult parse)
    {
        var r = new RunInput();
        r.ModelId = Text(parse, Model);
        r.Potential = Text(parse, Potential);
        r.Kinetic = Text(parse, Kinetic);
        r.Coupling = Text(parse, Coupling);
        if (parse.GetValue(Palatini)) r.Palatini = new(true, "--palatini");
        if (parse.GetResult(Param) is { } pr && pr.Tokens.Count == 0)
            throw new DeckException("--param needs a value NAME=VALUE", "--param");
        foreach (string item in parse.GetValue(Param) ?? [])
        {
            int eq = item.IndexOf('=');
            if (eq <= 0) throw new DeckException($"--param expects NAME=VALUE (got '{item}')", "--param");
            string name = item[..eq].Trim();
            string value = item[(eq + 1)..].Trim();
            if (name.Length == 0 || !(char.IsLetter(name[0]) || name[0] == '_'))
                throw new DeckException($"--param {item}: '{name}' is not a parameter name", "--param");
            r.Parameters[name] = new(ParseNumber(value, $"--param {name}"), $"--param {name}");
        }
        r.Phi0 = Number(parse, Phi0);
        r.DPhi0 = Number(parse, DPhi0);
        r.Efolds = Number(parse, Efolds);
        r.ReheatW = Number(parse, ReheatW);
        r.ReheatTemperature = Number(parse, ReheatT);
        r.KPivot = Number(parse, KPivot);
        if (Value(parse, Amplitude) is string a)
        {
            r.Amplitude = string.Equals(a.Trim(), "none", StringComparison.OrdinalIgnoreCase)
                ? new Located<double?>(null, "--amplitude")
                : new Located<double?>(ParseNumber(a, "--amplitude", "a number or 'none'"), "--amplitude");
        }
        r.KMin = Number(parse, KMin);
        r.KMax = Number(parse, KMax);
        if (Value(parse, KCount) is string kc)
        {
            if (!long.TryParse(kc.Trim(), NumberStyles.Integer, CultureInfo.InvariantCulture, out long n))
                throw new DeckException($"--k-count expects a whole number (got '{kc}')", "--k-count");
            r.KCount = new(n, "--k-count");
        }
        r.Tolerance = Number(parse, Tolerance);
        r.OutDir = Text(parse, Out);
        r.Title = Text(parse, Title);
        r.PhiEnd = Number(parse, PhiEnd);
        r.StartEfolds = Number(parse, StartEfolds);
        r.ReheatEfolds = Number(parse, ReheatEfolds);
        r.ReheatDof = Number(parse, Dof);
        if (Number(parse, LnAmplitude) is { } ln)
        {
            if (r.Amplitude is not null) throw new DeckException("--ln-amplitude cannot be combined with --amplitude; give A_s in one form", "--ln-amplitude");
            r.Amplitude = new Located<double?>(DeckReader.AmplitudeFromLog(ln.Value), ln.Key);
        }
        r.SolveFor = Text(parse, NormaliseBy);
        if (Value(parse, Formats) is string formats)
            r.Formats = new Located<IReadOnlyList<string>>([.. formats.Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries)], "--formats");
        r.TableH = Number(parse, TableH);
        r.FlagReference = Text(parse, FlagReference);
        for (int i = 0; i < FlagThresholds.Count; i++)
            if (Number(parse, FlagThresholds[i]) is { } f) r.FlagValues[DeckReader.FlagKeys[i]] = f;
        for (int i = 0; i < ObservableOptions.Count; i++)
        {
            var key = ObservablesKeys.All[i];
            var option = ObservableOptions[i];
            if (parse.GetResult(option) is not { } result) continue;
            if (result.Tokens.Count == 0 && key.Kind == ObservableKeyKind.Switch) r.ObservableValues[key.Key] = new("true", option.Name);
            else if (Text(parse, option) is { } v) r.ObservableValues[key.Key] = v;
        }
        return r;
    }

    private static Located<string>? Text(ParseResult parse, Option<string?> option) =>
        Value(parse, option) is string s ? new Located<string>(s, option.Name) : null;

    private static Located<double>? Number(ParseResult parse, Option<string?> option) =>
        Value(parse, option) is string s ? new Located<double>(ParseNumber(s, option.Name), option.Name) : null;

    /// <summary>Parses a number in the invariant culture; throws a one-line <see cref="DeckException"/> naming <paramref name="key"/>.</summary>
    public static double ParseNumber(string text, string key, string expected = "a number")
    {
        if (double.TryParse(text.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture, out double x)) return x;
        throw new DeckException($"{key} expects {expected} (got '{text}')", key);
    }
}
