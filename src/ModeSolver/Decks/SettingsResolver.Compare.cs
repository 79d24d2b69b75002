namespace ModeSolver.Decks;

public static partial class SettingsResolver
{
    /// <summary>
    /// `[compare] freeze`: the fields to hold fixed for the one-field comparison, checked against the model (several
    /// fields, each named once, every field but one, no end surface); returned in field order, or null when not given.
    /// </summary>
    private static IReadOnlyList<string>? FreezeList(RunInput input, ModelSpec model)
    {
        if (input.GetValue(SettingsSchema.Get("compare.freeze")) is not Located<IReadOnlyList<string>> given) return null;
        if (!model.IsMultiField)
            throw given.Error("compares a several-field model with its one-field reduction; this model has one field (name the fields with model.fields)");
        var fields = model.Fields!;
        var names = new HashSet<string>(StringComparer.Ordinal);
        foreach (string name in given.Value)
        {
            if (!fields.Contains(name))
                throw given.Error($"names '{name}', which is not a field of the model (the fields are {string.Join(", ", fields)})");
            if (!names.Add(name)) throw given.Error($"names '{name}' twice");
        }
        if (names.Count != fields.Count - 1)
            throw given.Error($"must name every field but one (the model has {fields.Count}: {string.Join(", ", fields)}; got {names.Count}), leaving one field to roll");
        if (model.End is not null)
            throw given.Error($"cannot freeze a model that ends on the surface model.end = \"{model.End}\": the one-field model ends where epsilon_1 = 1");
        if (model.Parameters.Keys.FirstOrDefault(names.Contains) is { } clash)
            throw given.Error($"names '{clash}', which is also a model parameter");
        return fields.Where(names.Contains).ToArray();
    }
}
