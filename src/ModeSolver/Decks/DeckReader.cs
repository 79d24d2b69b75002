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
    public static IReadOnlyList<string> FlagKeys { get; } =
        ["spectrum_threshold", "pivot_fraction", "sigma_n_s", "sigma_r", "sigma_alpha_s", "sigma_n_t", "epsilon_1_limit", "epsilon_2_limit"];

    /// <summary>Sections and their keys.</summary>
    public static IReadOnlyDictionary<string, string[]> Schema { get; } = new Dictionary<string, string[]>(StringComparer.Ordinal)
    {
        ["model"] = ["catalogue", "potential", "kinetic", "coupling", "palatini", "phi_end", "parameters"],
        ["start"] = ["phi0", "dphi0", "efolds"],
        ["pivot"] = ["k", "efolds"],
        ["reheating"] = ["w", "temperature_gev", "efolds", "dof"],
        ["normalisation"] = ["a_s", "ln_10_10_a_s", "solve_for"],
        ["modes"] = ["k_min", "k_max", "count", "tolerance"],
        ["output"] = ["dir", "formats", "table_h"],
        ["flags"] = [.. FlagKeys, "reference"],
        ["observables"] = [.. ObservablesKeys.Names],
    };

    /// <summary>Converts ln(10^10 A_s), the form papers quote, to A_s.</summary>
    public static double AmplitudeFromLog(double ln1010As) => Math.Exp(ln1010As) * 1e-10;

    private static readonly string[] TopLevelKeys = ["title"];

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
                else if (key == "title")
                {
                    _input.Title = new Located<string>(String(root, key, key, value), key, file, LineOf(root, key));
                }
                else
                {
                    throw Error(root, key, key, $"is not a deck section or key (valid: {string.Join(", ", TopLevelKeys.Concat(Schema.Keys.Select(k => "[" + k + "]")))})");
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
                int? line = LineOf(table, key);
                switch (full)
                {
                    case "model.catalogue": _input.ModelId = new(String(table, key, full, value), full, file, line); break;
                    case "model.potential": _input.Potential = new(String(table, key, full, value), full, file, line); break;
                    case "model.kinetic": _input.Kinetic = new(String(table, key, full, value), full, file, line); break;
                    case "model.coupling": _input.Coupling = new(String(table, key, full, value), full, file, line); break;
                    case "model.palatini":
                        if (value is not bool b) throw Error(table, key, full, $"must be true or false (got {Describe(value)})");
                        _input.Palatini = new(b, full, file, line);
                        break;
                    case "model.phi_end": _input.PhiEnd = Number(table, key, full, value); break;
                    case "model.parameters":
                        if (value is not TomlTable pars) throw Error(table, key, full, "must be a table ([model.parameters])");
                        foreach (var (name, pv) in pars)
                            _input.Parameters[name] = Number(pars, name, full + "." + name, pv);
                        break;
                    case "start.phi0": _input.Phi0 = Number(table, key, full, value); break;
                    case "start.dphi0": _input.DPhi0 = Number(table, key, full, value); break;
                    case "start.efolds": _input.StartEfolds = Number(table, key, full, value); break;
                    case "pivot.k": _input.KPivot = Number(table, key, full, value); break;
                    case "pivot.efolds": _input.Efolds = Number(table, key, full, value); break;
                    case "reheating.w": _input.ReheatW = Number(table, key, full, value); break;
                    case "reheating.temperature_gev": _input.ReheatTemperature = Number(table, key, full, value); break;
                    case "reheating.efolds": _input.ReheatEfolds = Number(table, key, full, value); break;
                    case "reheating.dof": _input.ReheatDof = Number(table, key, full, value); break;
                    case "normalisation.a_s":
                        if (value is string s && string.Equals(s.Trim(), "none", StringComparison.OrdinalIgnoreCase))
                            _input.Amplitude = new(null, full, file, line);
                        else
                        {
                            var n = Number(table, key, full, value, "a number or \"none\"");
                            _input.Amplitude = new(n.Value, full, file, line);
                        }
                        break;
                    case "normalisation.ln_10_10_a_s":
                        if (table.ContainsKey("a_s")) throw Error(table, key, full, "cannot be combined with normalisation.a_s; give A_s in one form");
                        _input.Amplitude = new(AmplitudeFromLog(Number(table, key, full, value).Value), full, file, line);
                        break;
                    case "normalisation.solve_for": _input.SolveFor = new(String(table, key, full, value), full, file, line); break;
                    case "output.table_h": _input.TableH = Number(table, key, full, value); break;
                    case "flags.reference": _input.FlagReference = new(String(table, key, full, value), full, file, line); break;
                    case "modes.k_min": _input.KMin = Number(table, key, full, value); break;
                    case "modes.k_max": _input.KMax = Number(table, key, full, value); break;
                    case "modes.count":
                        if (value is not long count) throw Error(table, key, full, $"must be a whole number (got {Describe(value)})");
                        _input.KCount = new(count, full, file, line);
                        break;
                    case "modes.tolerance": _input.Tolerance = Number(table, key, full, value); break;
                    case "output.dir": _input.OutDir = new(String(table, key, full, value), full, file, line); break;
                    case "output.formats":
                        if (value is not TomlArray arr) throw Error(table, key, full, $"must be an array of strings, e.g. [\"hdf5\", \"table\"] (got {Describe(value)})");
                        var list = new List<string>();
                        foreach (var item in arr)
                        {
                            if (item is not string f) throw Error(table, key, full, $"must be an array of strings (found {Describe(item)})");
                            list.Add(f);
                        }
                        _input.Formats = new(list, full, file, line);
                        break;
                    default:
                        if (section == "flags") _input.FlagValues[key] = Number(table, key, full, value);
                        else if (section == "observables") _input.ObservableValues[key] = Observable(table, key, full, value);
                        break;
                }
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
