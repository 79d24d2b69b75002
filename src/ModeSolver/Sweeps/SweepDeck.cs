using System.Text;
using Tomlyn;
using Tomlyn.Model;
using Tomlyn.Parsing;
using Tomlyn.Syntax;

namespace ModeSolver.Sweeps;

/// <summary>
/// Reads the <c>[sweep]</c> table of a deck (and only that table) and separates it from the ordinary run deck.
/// Deck form:
/// <code>
/// [sweep]
/// families = "param.alpha"   # the plot joins points along this key (optional)
/// markers  = "efolds"        # marker shape per value of this key (optional)
/// log_r    = true            # plot r on a logarithmic axis (optional, plot only)
/// spectra  = false           # also store k, P_s, P_t per point (optional)
/// zip      = ["reheat.w", "reheat.T"]   # keys that move together (optional; or a list of such lists)
/// [[sweep.axis]]
/// key = "param.alpha"
/// log = [0.01, 100.0, 9]     # or linear = [start, stop, count], or values = [..] (numbers, or names for key "model")
/// </code>
/// </summary>
public static class SweepDeck
{
    /// <summary>The name of the deck table read here.</summary>
    public const string TableName = "sweep";

    private static readonly string[] SweepKeys = ["axis", "zip", "families", "markers", "spectra", "log_r"];
    private static readonly string[] AxisKeys = ["key", "linear", "log", "values"];

    /// <summary>
    /// The text of a sweep deck, or of the deck copy in a sweep directory, with the limits of every deck
    /// (<see cref="Decks.DeckReader.ReadText"/>: at most 1 MiB of UTF-8, an endless device or pipe refused).
    /// </summary>
    /// <exception cref="SweepException">unreadable, too large, or not UTF-8 (one line).</exception>
    public static string ReadText(string path)
    {
        try { return Decks.DeckReader.ReadText(path); }
        catch (Decks.DeckException e) { throw new SweepException(e.Message); }
    }

    /// <summary>Parses the TOML text of a deck and reads its sweep table. <paramref name="source"/> names the deck in errors.</summary>
    public static SweepSpec ParseSpec(string deckText, string source = "deck")
    {
        TomlTable root;
        try { root = Decks.DeckToml.Parse(deckText); }
        catch (TomlException e) { throw new SweepException($"{source}: invalid TOML: {OneLine(e.Message)}"); }
        return ParseSpec(root, source);
    }

    /// <summary>Reads the sweep table of a parsed deck; the other tables are not looked at.</summary>
    public static SweepSpec ParseSpec(TomlTable deck, string source = "deck")
    {
        if (!deck.TryGetValue(TableName, out var raw))
            throw new SweepException($"{source}: no [sweep] table (a sweep deck needs [sweep] with at least one [[sweep.axis]])");
        if (raw is not TomlTable sweep) throw new SweepException($"{source}: 'sweep' must be a table");
        foreach (var kv in sweep)
            if (Array.IndexOf(SweepKeys, kv.Key) < 0)
                throw new SweepException($"{source}: unknown key 'sweep.{kv.Key}' (allowed: {string.Join(", ", SweepKeys)})");
        if (!sweep.TryGetValue("axis", out var axesRaw))
            throw new SweepException($"{source}: 'sweep.axis' is missing: add at least one [[sweep.axis]] table");
        if (axesRaw is not TomlTableArray axesArray)
            throw new SweepException($"{source}: 'sweep.axis' must be an array of tables ([[sweep.axis]])");
        var axes = new List<SweepAxis>();
        int n = 0;
        foreach (var t in axesArray)
        {
            n++;
            axes.Add(ParseAxis(t, $"{source}: [[sweep.axis]] #{n}"));
        }
        List<IReadOnlyList<string>>? zip = null;
        if (sweep.TryGetValue("zip", out var zipRaw))
        {
            if (zipRaw is not TomlArray za || za.Count == 0)
                throw new SweepException($"{source}: 'sweep.zip' must be a list of keys or a list of lists of keys");
            zip = [];
            if (za.All(x => x is string)) zip.Add(za.Cast<string>().ToArray());
            else
            {
                foreach (var g in za)
                {
                    if (g is not TomlArray ga || !ga.All(x => x is string))
                        throw new SweepException($"{source}: 'sweep.zip' must be a list of keys or a list of lists of keys");
                    zip.Add(ga.Cast<string>().ToArray());
                }
            }
        }
        string? families = OptionalString(sweep, "families", source);
        string? markers = OptionalString(sweep, "markers", source);
        bool spectra = false;
        if (sweep.TryGetValue("spectra", out var sp))
        {
            if (sp is not bool b) throw new SweepException($"{source}: 'sweep.spectra' must be true or false");
            spectra = b;
        }
        bool logR = false;
        if (sweep.TryGetValue("log_r", out var lr))
        {
            if (lr is not bool b) throw new SweepException($"{source}: 'sweep.log_r' must be true or false");
            logR = b;
        }
        try { return new SweepSpec(axes, zip, families, markers, spectra) { LogR = logR }; }
        catch (SweepException e) { throw new SweepException($"{source}: {e.Message}"); }
    }

    private static SweepAxis ParseAxis(TomlTable t, string where)
    {
        foreach (var kv in t)
            if (Array.IndexOf(AxisKeys, kv.Key) < 0)
                throw new SweepException($"{where}: unknown key '{kv.Key}' (allowed: {string.Join(", ", AxisKeys)})");
        if (!t.TryGetValue("key", out var k) || k is not string key || key.Trim().Length == 0)
            throw new SweepException($"{where}: 'key' (the setting to sweep, a non-empty string) is missing");
        where = $"{where.Split(':')[0]}: sweep axis '{key}'";
        int given = (t.ContainsKey("linear") ? 1 : 0) + (t.ContainsKey("log") ? 1 : 0) + (t.ContainsKey("values") ? 1 : 0);
        if (given != 1) throw new SweepException($"{where}: give exactly one of 'linear', 'log' or 'values'");
        if (t.TryGetValue("values", out var vr))
        {
            if (vr is not TomlArray va || va.Count == 0) throw new SweepException($"{where}: 'values' must be a non-empty list of numbers");
            if (va.All(x => x is string))
            {
                try { return SweepAxis.Named(key, [.. va.Cast<string>()]); }
                catch (SweepException e) { throw new SweepException($"{where.Split(':')[0]}: {e.Message}"); }
            }
            var vals = new double[va.Count];
            for (int i = 0; i < va.Count; i++) vals[i] = Number(va[i], $"{where}: 'values' item {i + 1}");
            try { return SweepAxis.List(key, vals); }
            catch (SweepException e) { throw new SweepException($"{where.Split(':')[0]}: {e.Message}"); }
        }
        string name = t.ContainsKey("linear") ? "linear" : "log";
        if (t[name] is not TomlArray ra || ra.Count != 3)
            throw new SweepException($"{where}: '{name}' must be [start, stop, count]");
        double a = Number(ra[0], $"{where}: '{name}' start"), b = Number(ra[1], $"{where}: '{name}' stop");
        if (ra[2] is not long cnt || cnt < 1 || cnt > int.MaxValue)
            throw new SweepException($"{where}: '{name}' count must be a positive integer");
        try { return name == "linear" ? SweepAxis.Linear(key, a, b, (int)cnt) : SweepAxis.Log(key, a, b, (int)cnt); }
        catch (SweepException e) { throw new SweepException($"{where.Split(':')[0]}: {e.Message}"); }
    }

    private static double Number(object? o, string where) => o switch
    {
        long l => l,
        double d when double.IsFinite(d) => d,
        _ => throw new SweepException($"{where} must be a finite number"),
    };

    private static string? OptionalString(TomlTable t, string key, string source)
    {
        if (!t.TryGetValue(key, out var v)) return null;
        if (v is not string s || s.Length == 0) throw new SweepException($"{source}: 'sweep.{key}' must be a key name (a string)");
        return s;
    }

    /// <summary>A shallow copy of the parsed deck without its sweep table: the ordinary run deck.</summary>
    public static TomlTable WithoutSweep(TomlTable deck)
    {
        var copy = new TomlTable();
        foreach (var kv in deck)
            if (kv.Key != TableName) copy[kv.Key] = kv.Value;
        return copy;
    }

    /// <summary>
    /// The deck text with the sweep table removed (the <c>[sweep]</c> table, every <c>[sweep.*]</c> and
    /// <c>[[sweep.*]]</c> table and any top-level <c>sweep...</c> key); everything else is kept byte for byte.
    /// </summary>
    public static string RemoveSweep(string deckText, string source = "deck") => CutSweep(deckText, source, keepLines: false);

    /// <summary>
    /// Like <see cref="RemoveSweep"/>, but every removed line break is kept, so the remaining keys stay on their line
    /// numbers (for error messages that cite the deck's lines).
    /// </summary>
    public static string BlankSweep(string deckText, string source = "deck") => CutSweep(deckText, source, keepLines: true);

    private static string CutSweep(string deckText, string source, bool keepLines)
    {
        var doc = SyntaxParser.Parse(deckText, source, false);
        if (doc.HasErrors)
        {
            var first = doc.Diagnostics.FirstOrDefault();
            throw new SweepException($"{source}: invalid TOML: {OneLine(first?.ToString() ?? "parse error")}");
        }
        var cut = new List<(int Start, int Length)>();
        foreach (var kv in doc.KeyValues)
            if (kv.Key is not null && FirstSegment(kv.Key) == TableName) cut.Add((kv.Span.Offset, kv.Span.Length));
        foreach (var table in doc.Tables)
            if (table.Name is not null && FirstSegment(table.Name) == TableName) cut.Add((table.Span.Offset, table.Span.Length));
        if (cut.Count == 0) return deckText;
        cut.Sort((x, y) => x.Start.CompareTo(y.Start));
        var sb = new StringBuilder(deckText.Length);
        int pos = 0;
        foreach (var (start, length) in cut)
        {
            if (start < pos) continue;
            sb.Append(deckText, pos, start - pos);
            if (keepLines)
                for (int i = start; i < start + length; i++)
                    if (deckText[i] == '\n') sb.Append('\n');
            pos = start + length;
        }
        sb.Append(deckText, pos, deckText.Length - pos);
        return sb.ToString();
    }

    private static string FirstSegment(KeySyntax key)
    {
        string s = key.Key?.ToString()?.Trim() ?? "";
        if (s.Length >= 2 && (s[0] == '"' || s[0] == '\'') && s[^1] == s[0]) s = s[1..^1];
        return s;
    }

    internal static string OneLine(string s)
    {
        s = s.Replace("\r\n", " ").Replace('\n', ' ').Replace('\r', ' ').Trim();
        return s.Length > 300 ? s[..300] + "..." : s;
    }
}
