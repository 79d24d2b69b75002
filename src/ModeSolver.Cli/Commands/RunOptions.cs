using System.CommandLine;
using System.Globalization;
using ModeSolver.Decks;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// The shared run options (the one-line form of a deck), one per setting of <see cref="SettingsSchema.All"/>, and the
/// optional positional DECK path. Any deck value can be overridden on the command line; the command line wins. With
/// --coupling the theory is in the Jordan frame and --potential is V_J. Without --efolds or reheating options,
/// reheating is instantaneous. Values are taken as text and checked here so that every mistake gives one line naming
/// the option.
/// </summary>
public sealed class RunOptions
{
    private readonly List<(SettingDef Def, Option Option)> _options = [];

    /// <summary>Optional deck path.</summary>
    public Argument<string?> Deck { get; } = new("DECK") { Description = "Run deck (TOML); options given on the command line override it.", Arity = ArgumentArity.ZeroOrOne };

    private RunOptions()
    {
        foreach (var def in SettingsSchema.All) _options.Add((def, Create(def)));
    }

    /// <summary>The option of a setting.</summary>
    public Option OptionOf(string deckPath)
    {
        foreach (var (def, option) in _options)
            if (def.Path == deckPath) return option;
        throw new ArgumentException($"no setting {deckPath}", nameof(deckPath));
    }

    // The option of one setting: a switch of a plain setting is a flag (--palatini); the model parameters a repeatable
    // NAME=VALUE; everything else a text-valued option, checked by Overrides.
    private static Option Create(SettingDef def)
    {
        string doc = HelpText(def);
        string deckKey = def.Section.Length == 0 ? def.Path : $"{def.DocKey.Replace("NAME", "", StringComparison.Ordinal).TrimEnd()}";
        if (def.Kind == SettingKind.Table)
            return new Option<string[]>(def.Option) { Description = $"{doc}. Deck {deckKey}.", AllowMultipleArgumentsPerToken = false, Arity = ArgumentArity.ZeroOrMore };
        if (def.Kind == SettingKind.Switch && def.Family == SettingFamily.Plain)
            return new Option<bool>(def.Option) { Description = $"{doc}. Deck {deckKey}." };
        string tail = def.Kind == SettingKind.Switch ? "; without a value: true" : "";
        return Opt(def.Option, $"{doc}. Deck {deckKey}{tail}.");
    }

    // The schema's documentation line as help text: capitalised (unless it starts with a symbol such as g_reh), with
    // the unit and the default, without the markdown of the docs (links, code quotes).
    private static string HelpText(SettingDef def)
    {
        string doc = System.Text.RegularExpressions.Regex.Replace(def.Doc, @"\[([^\[\]]+)\]\([^)]+\)", "$1").Replace("`", "", StringComparison.Ordinal).TrimEnd('.');
        string first = doc.Split(' ')[0];
        if (first.All(c => char.IsLetter(c) || c == '-')) doc = char.ToUpperInvariant(doc[0]) + doc[1..];
        if (def.Unit.Length > 0 && !doc.Contains(def.Unit, StringComparison.Ordinal)) doc += $" ({def.Unit})";
        if (def.Default != "—" && def.Family != SettingFamily.Observable) doc += $"; default {def.Default.Replace("`", "", StringComparison.Ordinal)}";
        return doc;
    }

    /// <summary>The option of an [observables] key: "--obs-" and the key with '_' as '-'.</summary>
    public static string ObservableOption(string key) => SettingsSchema.Get("observables." + key).Option;

    /// <summary>The option of a [flags] key: "--flag-" and the key with '_' as '-'.</summary>
    public static string FlagOption(string key) => SettingsSchema.Get("flags." + key).Option;

    /// <summary>Every deck key and the option that sets it, from <see cref="SettingsSchema.All"/>.</summary>
    public static IReadOnlyList<(string DeckKey, string Option)> DeckKeyOptions { get; } = [.. SettingsSchema.All.Select(d => (d.Path, d.Option))];

    /// <summary>Options `background` refuses: it computes no spectrum and writes no files.</summary>
    public static IReadOnlyList<string> SpectrumOnlyOptions { get; } = [.. SettingsSchema.All.Where(d => d.SpectrumOnly).Select(d => d.Option)];

    // The model source and formulas, and the start: what `frame` takes.
    private static bool IsModelOption(SettingDef def) => def.Section == "model" && def.Path != "model.phi_end";

    /// <summary>
    /// A text-valued option whose value may be missing at parse time, so that a missing value becomes our own one-line
    /// error (exit 2) instead of the parser's error-and-help output.
    /// </summary>
    public static Option<string?> Opt(string name, string description) =>
        new(name) { Description = description, Arity = ArgumentArity.ZeroOrOne };

    /// <summary>The option's text, null when absent; throws a one-line <see cref="DeckException"/> when given without a value.</summary>
    public static string? Value(ParseResult parse, Option<string?> option)
    {
        ArgumentNullException.ThrowIfNull(parse);
        ArgumentNullException.ThrowIfNull(option);
        if (parse.GetResult(option) is { } r && r.Tokens.Count == 0)
            throw new DeckException($"{option.Name} needs a value", option.Name);
        return parse.GetValue(option);
    }

    /// <summary>Model options only (for commands that need a theory but no run: frame).</summary>
    public static RunOptions AddModelOptions(Command cmd)
    {
        ArgumentNullException.ThrowIfNull(cmd);
        var o = new RunOptions();
        foreach (var (def, option) in o._options)
            if (IsModelOption(def)) cmd.Options.Add(option);
        cmd.Options.Add(o.OptionOf("start.phi0"));
        return o;
    }

    /// <summary>
    /// Adds the DECK argument and every run option to <paramref name="cmd"/> (the model options first, then the
    /// others in deck order); with <paramref name="spectrum"/> false the options of <see cref="SpectrumOnlyOptions"/>
    /// are left out (the command refuses them).
    /// </summary>
    public static RunOptions Add(Command cmd, bool spectrum = true)
    {
        ArgumentNullException.ThrowIfNull(cmd);
        var o = new RunOptions();
        cmd.Arguments.Add(o.Deck);
        foreach (var (def, option) in o._options)
            if (IsModelOption(def)) cmd.Options.Add(option);
        foreach (var (def, option) in o._options)
            if (!IsModelOption(def) && (spectrum || !def.SpectrumOnly)) cmd.Options.Add(option);
        return o;
    }

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

    /// <summary>The command-line values as a <see cref="RunInput"/> (unvalidated beyond number syntax), setting by setting in deck order.</summary>
    public RunInput Overrides(ParseResult parse)
    {
        ArgumentNullException.ThrowIfNull(parse);
        var r = new RunInput();
        foreach (var (def, option) in _options)
        {
            switch (option)
            {
                case Option<bool> flag:
                    if (parse.GetValue(flag)) r.SetValue(def, new Located<bool>(true, flag.Name));
                    break;
                case Option<string[]> table:
                    Parameters(parse, table, r);
                    break;
                case Option<string?> text:
                    if (def.Kind == SettingKind.Switch && parse.GetResult(text) is { Tokens.Count: 0 })
                        r.SetValue(def, new Located<string>("true", text.Name));
                    else if (Value(parse, text) is string value)
                        Set(r, def, text.Name, value);
                    break;
            }
        }
        return r;
    }

    // One option's text as the setting's raw value.
    private static void Set(RunInput r, SettingDef def, string name, string value)
    {
        if (def.FormOf is { } target)
        {
            var other = SettingsSchema.Get(target);
            if (r.GetValue(other) is not null) throw new DeckException($"{name} cannot be combined with {other.Option}; {def.BothFormsHint}", name);
            r.SetValue(other, new Located<double?>(def.ToTarget!(ParseNumber(value, name)), name));
            return;
        }
        if (def.Family == SettingFamily.Observable) { r.SetValue(def, new Located<string>(value, name)); return; }
        object raw = def.Kind switch
        {
            SettingKind.Number when def.PerField && value.Contains(',', StringComparison.Ordinal) =>
                new Located<IReadOnlyList<double>>([.. value.Split(',').Select(v => ParseNumber(v, name, "numbers separated by commas, one per field"))], name),
            SettingKind.Number => new Located<double>(ParseNumber(value, name), name),
            SettingKind.Whole => long.TryParse(value.Trim(), NumberStyles.Integer, CultureInfo.InvariantCulture, out long n)
                ? new Located<long>(n, name)
                : throw new DeckException($"{name} expects a whole number (got '{value}')", name),
            SettingKind.NumberOrNone => string.Equals(value.Trim(), "none", StringComparison.OrdinalIgnoreCase)
                ? new Located<double?>(null, name)
                : new Located<double?>(ParseNumber(value, name, "a number or 'none'"), name),
            SettingKind.List => new Located<IReadOnlyList<string>>([.. value.Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries)], name),
            _ => new Located<string>(value, name),
        };
        r.SetValue(def, raw);
    }

    // --param NAME=VALUE, repeatable.
    private static void Parameters(ParseResult parse, Option<string[]> option, RunInput r)
    {
        string opt = option.Name;
        if (parse.GetResult(option) is { } pr && pr.Tokens.Count == 0)
            throw new DeckException($"{opt} needs a value NAME=VALUE", opt);
        foreach (string item in parse.GetValue(option) ?? [])
        {
            int eq = item.IndexOf('=');
            if (eq <= 0) throw new DeckException($"{opt} expects NAME=VALUE (got '{item}')", opt);
            string name = item[..eq].Trim();
            string value = item[(eq + 1)..].Trim();
            if (name.Length == 0 || !(char.IsLetter(name[0]) || name[0] == '_'))
                throw new DeckException($"{opt} {item}: '{name}' is not a parameter name", opt);
            r.Parameters[name] = new(ParseNumber(value, $"{opt} {name}"), $"{opt} {name}");
        }
    }

    /// <summary>Parses a number in the invariant culture; throws a one-line <see cref="DeckException"/> naming <paramref name="key"/>.</summary>
    public static double ParseNumber(string text, string key, string expected = "a number")
    {
        if (double.TryParse(text.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture, out double x)) return x;
        throw new DeckException($"{key} expects {expected} (got '{text}')", key);
    }
}
