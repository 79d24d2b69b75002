namespace ModeSolver.Decks;

/// <summary>
/// The numbers of a run's settings as given (or their schema default), each checked by its validator in
/// <see cref="SettingsSchema"/>: every plain number or whole-number setting with a validator or a default, by deck
/// path. A setting added to the schema is read from here by the stage that uses it.
/// </summary>
public sealed class SettingValues : IEquatable<SettingValues>
{
    private readonly Dictionary<string, double> _values;

    internal SettingValues(Dictionary<string, double> values) => _values = values;

    /// <summary>No values (settings made without the resolver).</summary>
    public static SettingValues Empty { get; } = new(new Dictionary<string, double>(StringComparer.Ordinal));

    /// <summary>The paths that hold a value.</summary>
    public IEnumerable<string> Paths => _values.Keys;

    /// <summary>The value at <paramref name="path"/>, or null when the setting was not given and has no default.</summary>
    public double? Number(string path) => _values.TryGetValue(path, out double v) ? v : null;

    /// <summary>Equal when both hold the same paths with the same values (so that equal settings compare equal).</summary>
    public bool Equals(SettingValues? other)
    {
        if (other is null || other._values.Count != _values.Count) return false;
        foreach (var (k, v) in _values)
            if (!other._values.TryGetValue(k, out double w) || !v.Equals(w)) return false;
        return true;
    }

    /// <inheritdoc />
    public override bool Equals(object? obj) => Equals(obj as SettingValues);

    /// <inheritdoc />
    public override int GetHashCode() => _values.Count;

    /// <summary>The values of <see cref="SettingsSchema.All"/> in <paramref name="input"/>, checked; throws the first one-line error.</summary>
    /// <exception cref="DeckException">a value its validator refuses.</exception>
    public static SettingValues From(RunInput input)
    {
        ArgumentNullException.ThrowIfNull(input);
        var values = new Dictionary<string, double>(StringComparer.Ordinal);
        foreach (var def in SettingsSchema.All)
        {
            if (!HoldsNumber(def)) continue;
            Located<double>? given = input.GetValue(def) switch
            {
                Located<double> d => d,
                Located<long> l => new Located<double>(l.Value, l.Key, l.File, l.Line),
                _ => null,
            };
            if (SettingsSchema.Checked(def, given) is double v) values[def.Path] = v;
        }
        return new SettingValues(values);
    }

    /// <summary>True when <see cref="From"/> keeps this setting: a plain number or whole number with a validator or a default.</summary>
    public static bool HoldsNumber(SettingDef def)
    {
        ArgumentNullException.ThrowIfNull(def);
        return def.Family == SettingFamily.Plain && def.FormOf is null && def.Kind is SettingKind.Number or SettingKind.Whole
            && (def.Check is not null || def.DefaultValue is not null);
    }
}
