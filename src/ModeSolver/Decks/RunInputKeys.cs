using System.Globalization;
namespace ModeSolver.Decks;

/// <summary>
/// Deck keys ("start.phi0", "model.parameters.alpha", ...) of <see cref="SettingsSchema.All"/> set one at a time on a
/// <see cref="RunInput"/>, with the command line's override rules (<see cref="RunInput.Merge"/>): a value set here wins
/// over the deck's, choosing a model source replaces the deck's, N_* given directly replaces the deck's reheating and
/// the other way round. The native library's ms_run_set_number, ms_run_set_text and ms_run_unset use these.
/// </summary>
public static class RunInputKeys
{
    private const string ParameterPrefix = "model.parameters.";

    /// <summary>True when the setting takes a number through ms_run_set_number.</summary>
    public static bool TakesNumber(SettingDef def) =>
        def.Kind is SettingKind.Number or SettingKind.Whole or SettingKind.NumberOrNone or SettingKind.Table;

    /// <summary>True when the setting takes text through ms_run_set_text.</summary>
    public static bool TakesText(SettingDef def) =>
        def.Kind is SettingKind.Text or SettingKind.Switch or SettingKind.NumberOrNone or SettingKind.List or SettingKind.Matrix
        || def.PerField || def.Family == SettingFamily.Observable;

    /// <summary>Keys that take a number (the parameters as "model.parameters.NAME").</summary>
    public static IReadOnlyList<string> NumberKeys { get; } =
        [.. SettingsSchema.All.Where(TakesNumber).Select(d => d.Kind == SettingKind.Table ? ParameterPrefix + "NAME" : d.Path)];

    /// <summary>Keys that take text ("normalisation.a_s" takes "none"; "output.formats" a comma-separated list).</summary>
    public static IReadOnlyList<string> TextKeys { get; } = [.. SettingsSchema.All.Where(TakesText).Select(d => d.Path)];

    /// <summary><paramref name="input"/> with the number <paramref name="value"/> set at <paramref name="key"/>.</summary>
    /// <exception cref="DeckException">an unknown key, or a key that does not take a number.</exception>
    public static RunInput WithNumber(RunInput input, string key, double value)
    {
        var o = new RunInput();
        if (key.StartsWith(ParameterPrefix, StringComparison.Ordinal) && key.Length > ParameterPrefix.Length)
        {
            o.Parameters[key[ParameterPrefix.Length..]] = new(value, key);
            return RunInput.Merge(input, o);
        }
        if (SettingsSchema.Find(key) is not { } def || !TakesNumber(def) || def.Kind == SettingKind.Table) throw Unknown(key, NumberKeys, "a number");
        string text = value.ToString("R", CultureInfo.InvariantCulture);
        if (def.FormOf is { } target) o.SetValue(SettingsSchema.Get(target), new Located<double?>(def.ToTarget!(value), key));
        else if (def.Kind == SettingKind.Whole)
        {
            if (!(Math.Abs(value) < 1e15) || value != Math.Floor(value))
                throw new Located<long>(0, key).Error($"must be a whole number (got {text})");
            o.SetValue(def, def.Family == SettingFamily.Observable ? new Located<string>(text, key) : new Located<long>((long)value, key));
        }
        else if (def.Family == SettingFamily.Observable) o.SetValue(def, new Located<string>(text, key));
        else if (def.Kind == SettingKind.NumberOrNone) o.SetValue(def, new Located<double?>(value, key));
        else o.SetValue(def, new Located<double>(value, key));
        return RunInput.Merge(input, o);
    }

    /// <summary><paramref name="input"/> with the text <paramref name="value"/> set at <paramref name="key"/>.</summary>
    /// <exception cref="DeckException">an unknown key, or a key that does not take text.</exception>
    public static RunInput WithText(RunInput input, string key, string value)
    {
        var o = new RunInput();
        Located<string> v = new(value, key);
        if (SettingsSchema.Find(key) is not { } def || !TakesText(def)) throw Unknown(key, TextKeys, "text");
        if (def.Family == SettingFamily.Observable) o.SetValue(def, v);
        else switch (def.Kind)
        {
            case SettingKind.Switch:
                o.SetValue(def, value.Trim().ToLowerInvariant() switch
                {
                    "true" => new Located<bool>(true, key),
                    "false" => new Located<bool>(false, key),
                    _ => throw v.Error($"must be true or false (got \"{value}\")"),
                });
                break;
            case SettingKind.NumberOrNone:
                if (!string.Equals(value.Trim(), "none", StringComparison.OrdinalIgnoreCase))
                    throw v.Error($"must be a number or \"none\" (got the string \"{value}\")");
                o.SetValue(def, new Located<double?>(null, key));
                break;
            case SettingKind.List:
                o.SetValue(def, new Located<IReadOnlyList<string>>([.. value.Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries)], key));
                break;
            case SettingKind.Number when def.PerField:
                var numbers = new List<double>();
                foreach (string item in value.Split(','))
                {
                    if (!double.TryParse(item.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture, out double x))
                        throw v.Error($"must be numbers separated by commas, one per field (got \"{value}\")");
                    numbers.Add(x);
                }
                o.SetValue(def, new Located<IReadOnlyList<double>>(numbers, key));
                break;
            default: o.SetValue(def, v); break;
        }
        return RunInput.Merge(input, o);
    }

    /// <summary>Removes the value at <paramref name="key"/> (the default applies again).</summary>
    /// <exception cref="DeckException">an unknown key.</exception>
    public static void Unset(RunInput input, string key)
    {
        if (key.StartsWith(ParameterPrefix, StringComparison.Ordinal) && key.Length > ParameterPrefix.Length)
        {
            input.Parameters.Remove(key[ParameterPrefix.Length..]);
            return;
        }
        if (SettingsSchema.Find(key) is not { Kind: not SettingKind.Table } def)
            throw Unknown(key, [.. TextKeys.Union(NumberKeys)], "a value");
        input.SetValue(def.FormOf is { } target ? SettingsSchema.Get(target) : def, null);
    }

    private static DeckException Unknown(string key, IEnumerable<string> valid, string kind) =>
        new($"{key} is not a deck key that takes {kind} here (valid: {string.Join(", ", valid)})", key);
}
