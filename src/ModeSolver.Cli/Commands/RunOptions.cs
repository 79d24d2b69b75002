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

    /// <summary>Adds the DECK argument and every run option to <paramref name="cmd"/>.</summary>
    public static RunOptions Add(Command cmd)
    {
        ArgumentNullException.ThrowIfNull(cmd);
        var o = new RunOptions();
        cmd.Arguments.Add(o.Deck);
        foreach (var opt in o.ModelOptions()) cmd.Options.Add(opt);
        foreach (Option opt in new Option[] { o.Phi0, o.DPhi0, o.Efolds, o.ReheatW, o.ReheatT, o.KPivot, o.Amplitude, o.KMin, o.KMax, o.KCount, o.Tolerance, o.Out })
            cmd.Options.Add(opt);
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
