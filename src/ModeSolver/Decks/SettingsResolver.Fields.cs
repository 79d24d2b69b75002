using System.Globalization;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Decks;

/// <summary>The several-field part of the resolver: field names, the metric, the end surface and the start per field.</summary>
public static partial class SettingsResolver
{
    /// <summary>The most fields a model may have.</summary>
    public const int MaxFields = 20;

    private static string Values(IReadOnlyList<double> v) => "[" + string.Join(", ", v.Select(x => x.ToString("G6", CultureInfo.InvariantCulture))) + "]";

    // The field names: given (checked: names of the formula language, distinct, at most MaxFields), the catalogue's, or null.
    private static IReadOnlyList<string>? ResolveFields(RunInput input, ModelEntry? entry)
    {
        if (input.Fields is not { } given) return entry?.Fields;
        var names = given.Value;
        if (names.Count == 0) throw given.Error("is empty; name at least one field, e.g. [\"phi\", \"chi\"]");
        if (names.Count > MaxFields) throw given.Error($"names {names.Count} fields; at most {MaxFields} are supported");
        for (int i = 0; i < names.Count; i++)
        {
            string name = names[i].Trim();
            try
            {
                // The formula stage checks the name (a name of the language that is not a function or constant).
                _ = Formula.Compile("0", [name]);
            }
            catch (FormulaException)
            {
                throw given.Error($"has '{names[i]}', which cannot name a field (letters, digits and '_', not starting with a digit, not a function or constant name)");
            }
            for (int j = 0; j < i; j++)
                if (names[j].Trim() == name) throw given.Error($"names the field '{name}' twice");
        }
        return [.. names.Select(n => n.Trim())];
    }

    // The metric rows: given (checked n x n, no empty entry), the catalogue's, or null for the identity.
    private static IReadOnlyList<IReadOnlyList<string>>? ResolveMetric(RunInput input, ModelEntry? entry, IReadOnlyList<string>? fields)
    {
        if (input.Metric is not { } given) return entry?.Metric;
        var rows = FormulaMatrix.Parse(given.Value);
        var names = fields ?? ["phi"];
        int n = names.Count;
        string list = string.Join(", ", names);
        if (rows.Count != n)
            throw given.Error($"has {rows.Count} row(s) but the model has {n} field(s) ({list}); give {n} rows of {n} formulas{(fields is null && rows.Count > 1 ? " and name the fields with model.fields" : "")}");
        for (int i = 0; i < n; i++)
        {
            if (rows[i].Count != n)
                throw given.Error($"row {i + 1} ({names[i]}) has {rows[i].Count} entries but the model has {n} field(s) ({list}); give {n} formulas per row");
            for (int j = 0; j < n; j++)
                if (string.IsNullOrWhiteSpace(rows[i][j])) throw given.Error($"has an empty entry [{names[i]}][{names[j]}]");
        }
        return rows;
    }

    // A per-field value given once (or as a list of one) for a one-field model.
    private static Located<double>? OneValue(Located<IReadOnlyList<double>>? values, string variable)
    {
        if (values is not { } v) return null;
        if (v.Value.Count != 1)
            throw v.Error($"gives {v.Value.Count} values but the model has one field ({variable}); give one number, or name the fields with model.fields");
        return new Located<double>(v.Value[0], v.Key, v.File, v.Line);
    }

    // The start of a several-field model: one value per field (given or the catalogue's), optional velocities.
    private static InitialConditions ResolveFieldStart(RunInput input, ModelEntry? entry, IReadOnlyList<string> fields,
        Located<IReadOnlyList<double>>? phi0, Located<IReadOnlyList<double>>? dphi0, string where)
    {
        int n = fields.Count;
        string list = string.Join(", ", fields);
        if (input.StartEfolds is { } se)
            throw se.Error($"starts a one-field model a number of e-folds before the end; a model of {n} fields starts at start.phi0 = [one value per field: {list}]");
        IReadOnlyList<double> start;
        if (phi0 is { } given)
        {
            if (given.Value.Count != n)
                throw given.Error($"gives {given.Value.Count} value(s) but the model has {n} fields ({list}); give one per field, e.g. [{string.Join(", ", Enumerable.Repeat("1.0", n))}]");
            foreach (double x in given.Value)
                if (!double.IsFinite(x)) throw given.Error($"must be finite numbers (got {Values(given.Value)})");
            start = given.Value;
        }
        else if (entry?.DefaultFields0 is { } catalogue) start = catalogue;
        else throw new DeckException($"{where}: start.phi0 (or --phi0), one value per field ({list}), is required when the model is given by formulas", "start.phi0");
        IReadOnlyList<double>? velocity = null;
        if (dphi0 is { } d)
        {
            if (d.Value.Count != n)
                throw d.Error($"gives {d.Value.Count} value(s) but the model has {n} fields ({list}); give one dphi/dN per field");
            foreach (double x in d.Value)
                if (!double.IsFinite(x)) throw d.Error($"must be finite numbers (got {Values(d.Value)})");
            velocity = d.Value;
        }
        return new InitialConditions(start[0], null) { Fields0 = start, Velocity0 = velocity };
    }

    // The several-field theory must build (metric n x n and symmetric) and be usable at the start: Omega^2 > 0, the metric
    // positive definite, V > 0, and the start off the end surface.
    private static void CheckFieldTheory(RunSettings settings, RunInput input, ModelEntry? entry, Located<IReadOnlyList<double>>? phi0Given)
    {
        var start = settings.Initial.Fields0!;
        var key = phi0Given ?? new Located<IReadOnlyList<double>>(start, entry is null ? "start.phi0" : $"start.phi0 (catalogue default for {entry.Id})");
        FormulaFieldTheory theory;
        try
        {
            theory = TheoryFactory.BuildFields(settings.Model);
        }
        catch (TheoryException e)
        {
            if (input.Metric is { } m) throw m.Error(e.Message.StartsWith("the ", StringComparison.Ordinal) ? "is wrong: " + e.Message : e.Message);
            throw new DeckException(DeckErrors.OneLine($"model: {e.Message}"), "model");
        }
        catch (FormulaException e)
        {
            throw new DeckException(DeckErrors.OneLine($"model: {e.Message}"), "model");
        }
        var phi = start.ToArray();
        int n = phi.Length;
        string at = Values(start);
        if (theory.IsJordanFrame && !(theory.OmegaSquared(phi) > 0))
            throw key.Error($"= {at} gives Omega^2 = {theory.OmegaSquared(phi):G6}; the Jordan-frame map needs Omega^2 > 0");
        var g = new double[n * n];
        var scratch = new double[n * n];
        theory.Metric(phi, g);
        double pivot = FieldGeometry.SmallestPivot(g, n, scratch);
        if (!(pivot > 0))
            throw key.Error($"= {at}: the field-space metric G_IJ is not positive definite there (smallest Cholesky pivot {pivot:G4}); start where it is");
        double v = theory.Potential(phi);
        if (!(v > 0) || !double.IsFinite(v)) throw key.Error($"= {at} gives V = {v:G6}; inflation needs V > 0");
        if (v < Matching.PivotLimits.MinPotential)
            throw key.Error($"= {at} gives V = {v:G3} (reduced Planck units), below {Matching.PivotLimits.MinPotential:G1}: too close to the double-precision underflow; scale the potential up");
        if (TheoryFactory.EndSurface(settings.Model) is { } surface && surface.Value(phi) == 0)
            throw input.End is { } endKey ? endKey.Error($"is zero at the start {at}; the end surface must lie ahead of the start")
                : key.Error($"= {at} lies on the end surface {settings.Model.End} = 0; start ahead of it");
    }
}
