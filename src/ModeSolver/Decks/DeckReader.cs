using System.Globalization;
using System.Text;
using Tomlyn;
using Tomlyn.Model;
using Tomlyn.Serialization;

namespace ModeSolver.Decks;

/// <summary>
/// Reads a run deck (TOML, our own schema; see notes/models.md) into a <see cref="RunInput"/>. Unknown sections and
/// keys are rejected with the valid ones listed; wrong types name the key, file and line.
/// </summary>
public static class DeckReader
{
    /// <summary>The numeric keys of the [flags] table (thresholds of the slow-roll disagreement flags).</summary>
    public static IReadOnlyList<string> FlagKeys => SettingsSchema.FlagKeys;

    /// <summary>Sections and their keys (from <see cref="SettingsSchema.All"/>).</summary>
    public static IReadOnlyDictionary<string, string[]> Schema => SettingsSchema.Sections;

    /// <summary>Converts ln(10^10 A_s), the form papers quote, to A_s.</summary>
    public static double AmplitudeFromLog(double ln1010As) => Math.Exp(ln1010As) * 1e-10;

    /// <summary>The largest deck accepted, 1 MiB: decks are short text files; anything larger is refused before it is read whole.</summary>
    public const int MaxDeckBytes = 1 << 20;

    /// <summary>Reads the deck at <paramref name="path"/>.</summary>
    /// <exception cref="DeckException">unreadable file, too large, not UTF-8, TOML syntax error, unknown key, wrong type.</exception>
    public static RunInput Read(string path)
    {
        var input = Parse(ReadText(path), path);
        input.DeckPath = path;
        return input;
    }

    /// <summary>
    /// The text of a deck file, at most <see cref="MaxDeckBytes"/> bytes of UTF-8 (a byte-order mark is skipped). Reads
    /// no more than one byte past the limit, so an endless source (a device, a pipe) is refused in one line.
    /// </summary>
    /// <exception cref="DeckException">unreadable, too large, or not UTF-8.</exception>
    public static string ReadText(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        byte[] buffer = new byte[MaxDeckBytes + 1];
        int length = 0;
        try
        {
            if (Directory.Exists(path)) throw new IOException("it is a directory");
            using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, 1, FileOptions.SequentialScan);
            int n;
            while (length < buffer.Length && (n = stream.Read(buffer, length, buffer.Length - length)) > 0) length += n;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or ArgumentException or NotSupportedException)
        {
            throw new DeckException(DeckErrors.OneLine($"{path}: cannot read the deck: {e.Message}"), null, path);
        }
        if (length > MaxDeckBytes)
            throw new DeckException($"{path}: the deck is larger than {MaxDeckBytes / (1 << 20)} MiB ({MaxDeckBytes} bytes); a deck is a short text file", null, path);
        int start = length >= 3 && buffer[0] == 0xEF && buffer[1] == 0xBB && buffer[2] == 0xBF ? 3 : 0;
        try
        {
            return new UTF8Encoding(false, throwOnInvalidBytes: true).GetString(buffer, start, length - start);
        }
        catch (DecoderFallbackException e)
        {
            string at = e.Index >= 0 ? $" at byte {e.Index + start}" : "";
            throw new DeckException($"{path}: the deck is not UTF-8 text{at}; decks are TOML, which is UTF-8", null, path);
        }
    }

    /// <summary>Parses deck text; <paramref name="sourceName"/> is used in messages.</summary>
    public static RunInput Parse(string text, string sourceName)
    {
        var store = new TomlMetadataStore();
        var options = new TomlSerializerOptions { SourceName = sourceName, MetadataStore = store, DuplicateKeyHandling = TomlDuplicateKeyHandling.Error };
        TomlTable root;
        try
        {
            // Strict syntax pass first, then the define-once rules the deserializer lets through (a key defined
            // twice, a table defined twice). Those are checked by DeckKeys, comparing the keys themselves: Tomlyn's
            // own validation compares them by hash and reports false duplicates in large decks.
            var syntax = Tomlyn.Parsing.SyntaxParser.ParseStrict(text, sourceName, validate: false);
            DeckKeys.Check(syntax, sourceName);
            root = DeckToml.Parse(text, options);
        }
        catch (TomlException e)
        {
            int? line = e.Span is { } s ? s.Start.Line + 1 : null;
            string msg = FirstLine(e.Message);
            throw new DeckException(DeckErrors.OneLine(line is int l ? $"{sourceName}:{l}: TOML syntax error: {msg}" : $"{sourceName}: TOML syntax error: {msg}"), null, sourceName, line, e);
        }
        var reader = new Walker(sourceName, store);
        var input = reader.Read(root);
        input.DeckPath = sourceName;
        return input;
    }

    private static string FirstLine(string s)
    {
        int i = s.IndexOf('\n');
        string line = (i < 0 ? s : s[..i]).Trim();
        // "deck.toml(4,7) : error : what" -> "column 7: what" (the file and line are already in front of the message).
        var m = System.Text.RegularExpressions.Regex.Match(line, @"^.*?\((\d+),(\d+)\)\s*:\s*error\s*:\s*(.*)$");
        if (m.Success) line = $"column {m.Groups[2].Value}: {m.Groups[3].Value}";
        return line.Replace("\u2424", "end of line");
    }

    private sealed class Walker(string file, TomlMetadataStore store)
    {
        private readonly RunInput _input = new();

        public RunInput Read(TomlTable root)
        {
            foreach (var (key, value) in root)
            {
                if (Schema.ContainsKey(key))
                {
                    if (value is not TomlTable table) throw Error(root, key, key, "must be a table ([" + key + "])");
                    ReadSection(key, table);
                }
                else if (SettingsSchema.Find(key) is { } def && def.Section.Length == 0)
                {
                    Value(def, root, key, value);
                }
                else
                {
                    throw Error(root, key, key, $"is not a deck section or key (valid: {string.Join(", ", SettingsSchema.TopLevelKeys.Concat(Schema.Keys.Select(k => "[" + k + "]")))})");
                }
            }
            return _input;
        }

        private void ReadSection(string section, TomlTable table)
        {
            string[] valid = Schema[section];
            foreach (var (key, value) in table)
            {
                string full = section + "." + key;
                if (!valid.Contains(key))
                    throw Error(table, key, full, $"is not a key of [{section}] (valid: {string.Join(", ", valid)})");
                Value(SettingsSchema.Get(full), table, key, value);
            }
        }

        // One value of a setting, checked for its TOML type and stored where the setting keeps it.
        private void Value(SettingDef def, TomlTable table, string key, object? value)
        {
            string full = def.Path;
            int? line = LineOf(table, key);
            if (def.FormOf is { } target)
            {
                var other = SettingsSchema.Get(target);
                if (table.ContainsKey(other.Name)) throw Error(table, key, full, $"cannot be combined with {other.Path}; {def.BothFormsHint}");
                _input.SetValue(other, new Located<double?>(def.ToTarget!(Number(table, key, full, value).Value), full, file, line));
                return;
            }
            if (def.Family == SettingFamily.Flag) { _input.FlagValues[def.Name] = Number(table, key, full, value); return; }
            if (def.Family == SettingFamily.Observable) { _input.ObservableValues[def.Name] = Observable(table, key, full, value); return; }
            switch (def.Kind)
            {
                case SettingKind.Text: _input.SetValue(def, new Located<string>(String(table, key, full, value), full, file, line)); break;
                case SettingKind.Number when def.PerField && value is TomlArray values:
                    var numbers = new List<double>();
                    foreach (var item in values)
                        numbers.Add(Number(table, key, full, item, "an array of numbers, one per field (e.g. [12.0, 0.5])").Value);
                    if (numbers.Count == 0) throw Error(table, key, full, "is an empty array; give one number per field");
                    _input.SetValue(def, new Located<IReadOnlyList<double>>(numbers, full, file, line));
                    break;
                case SettingKind.Number: _input.SetValue(def, Number(table, key, full, value, def.PerField ? "a number, or an array of numbers (one per field)" : "a number")); break;
                case SettingKind.Matrix:
                    _input.SetValue(def, new Located<string>(Matrix(table, key, full, value), full, file, line));
                    break;
                case SettingKind.Switch:
                    if (value is not bool b) throw Error(table, key, full, $"must be true or false (got {Describe(value)})");
                    _input.SetValue(def, new Located<bool>(b, full, file, line));
                    break;
                case SettingKind.Whole:
                    if (value is not long count) throw Error(table, key, full, $"must be a whole number (got {Describe(value)})");
                    _input.SetValue(def, new Located<long>(count, full, file, line));
                    break;
                case SettingKind.NumberOrNone:
                    if (value is string s && string.Equals(s.Trim(), "none", StringComparison.OrdinalIgnoreCase))
                        _input.SetValue(def, new Located<double?>(null, full, file, line));
                    else
                        _input.SetValue(def, new Located<double?>(Number(table, key, full, value, "a number or \"none\"").Value, full, file, line));
                    break;
                case SettingKind.Table:
                    if (value is not TomlTable pars) throw Error(table, key, full, $"must be a table ([{full}])");
                    foreach (var (name, pv) in pars)
                        _input.Parameters[name] = Number(pars, name, full + "." + name, pv);
                    break;
                case SettingKind.List:
                    if (value is not TomlArray arr) throw Error(table, key, full, $"must be an array of strings, e.g. [\"hdf5\", \"table\"] (got {Describe(value)})");
                    var list = new List<string>();
                    foreach (var item in arr)
                    {
                        if (item is not string f) throw Error(table, key, full, $"must be an array of strings (found {Describe(item)})");
                        list.Add(f);
                    }
                    _input.SetValue(def, new Located<IReadOnlyList<string>>(list, full, file, line));
                    break;
            }
        }

        private Located<double> Number(TomlTable table, string key, string full, object? value, string expected = "a number")
        {
            double x = value switch
            {
                long l => l,
                double d => d,
                _ => throw Error(table, key, full, $"must be {expected} (got {Describe(value)})"),
            };
            return new Located<double>(x, full, file, LineOf(table, key));
        }

        // A matrix of formulas: an array of arrays of strings (or the text form of FormulaMatrix), kept as text.
        private string Matrix(TomlTable table, string key, string full, object? value)
        {
            const string expected = "an array of rows of formulas, e.g. [[\"1\", \"0\"], [\"0\", \"exp(2*b*phi)\"]]";
            if (value is string text) return text;
            if (value is not TomlArray rows || rows.Count == 0) throw Error(table, key, full, $"must be {expected} (got {Describe(value)})");
            var list = new List<IReadOnlyList<string>>();
            foreach (var row in rows)
            {
                if (row is not TomlArray entries) throw Error(table, key, full, $"must be {expected} (found {Describe(row)} as a row)");
                var r = new List<string>();
                foreach (var e in entries)
                {
                    if (e is string f) r.Add(f);
                    else if (e is long or double) r.Add(Convert.ToString(e, CultureInfo.InvariantCulture)!);
                    else throw Error(table, key, full, $"must be {expected} (found {Describe(e)} as an entry)");
                }
                list.Add(r);
            }
            return FormulaMatrix.Format(list);
        }

        // An [observables] value checked for its TOML type and kept as text (the resolver checks its range).
        private Located<string> Observable(TomlTable table, string key, string full, object? value)
        {
            string text = ObservablesKeys.KindOf(key) switch
            {
                ObservableKeyKind.Switch => value is bool b ? (b ? "true" : "false") : throw Error(table, key, full, $"must be true or false (got {Describe(value)})"),
                ObservableKeyKind.Whole => value is long l ? l.ToString(CultureInfo.InvariantCulture) : throw Error(table, key, full, $"must be a whole number (got {Describe(value)})"),
                ObservableKeyKind.Word => String(table, key, full, value),
                _ => Number(table, key, full, value).Value.ToString("R", CultureInfo.InvariantCulture),
            };
            return new Located<string>(text, full, file, LineOf(table, key));
        }

        private string String(TomlTable table, string key, string full, object? value) =>
            value as string ?? throw Error(table, key, full, $"must be a string (got {Describe(value)})");

        private DeckException Error(TomlTable table, string key, string full, string problem) =>
            DeckErrors.At(full, file, LineOf(table, key), problem);

        private int? LineOf(TomlTable table, string key)
        {
            if (store.TryGetProperties(table, out var props) && props is not null && props.TryGetProperty(key, out var meta) && meta?.Span is { } span)
                return span.Start.Line + 1;
            return null;
        }

        private static string Describe(object? value) => value switch
        {
            null => "nothing",
            string s => $"the string \"{s}\"",
            bool b => b ? "true" : "false",
            long l => l.ToString(CultureInfo.InvariantCulture),
            double d => d.ToString("R", CultureInfo.InvariantCulture),
            TomlTable => "a table",
            TomlArray => "an array",
            _ => value.GetType().Name,
        };
    }
}
