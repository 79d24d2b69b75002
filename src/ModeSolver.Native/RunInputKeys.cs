using System.Globalization;
using ModeSolver.Decks;

namespace ModeSolver.Native;

/// <summary>
/// Deck keys ("start.phi0", "model.parameters.alpha", ...) set one at a time on a <see cref="RunInput"/>, with the
/// command line's override rules (<see cref="RunInput.Merge"/>): a value set here wins over the deck's, choosing a
/// model source replaces the deck's, N_* given directly replaces the deck's reheating and the other way round.
/// </summary>
internal static class RunInputKeys
{
    /// <summary>Keys that take a number.</summary>
    public static readonly string[] NumberKeys =
    [
        "model.phi_end", "model.parameters.NAME", "start.phi0", "start.dphi0", "start.efolds", "pivot.k", "pivot.efolds",
        "reheating.w", "reheating.temperature_gev", "reheating.efolds", "reheating.dof", "normalisation.a_s",
        "normalisation.ln_10_10_a_s", "modes.k_min", "modes.k_max", "modes.count", "modes.tolerance",
    ];

    /// <summary>Keys that take text.</summary>
    public static readonly string[] TextKeys =
        ["title", "model.catalogue", "model.potential", "model.kinetic", "model.coupling", "model.palatini", "normalisation.a_s",
         "normalisation.solve_for"];

    private const string ParameterPrefix = "model.parameters.";

    /// <summary><paramref name="input"/> with the number <paramref name="value"/> set at <paramref name="key"/>.</summary>
    /// <exception cref="DeckException">an unknown key, or a key that does not take a number.</exception>
    public static RunInput WithNumber(RunInput input, string key, double value)
    {
        var o = new RunInput();
        Located<double> v = new(value, key);
        if (key.StartsWith(ParameterPrefix, StringComparison.Ordinal) && key.Length > ParameterPrefix.Length)
            o.Parameters[key[ParameterPrefix.Length..]] = v;
        else
        {
            switch (key)
            {
                case "model.phi_end": o.PhiEnd = v; break;
                case "start.phi0": o.Phi0 = v; break;
                case "start.dphi0": o.DPhi0 = v; break;
                case "start.efolds": o.StartEfolds = v; break;
                case "pivot.k": o.KPivot = v; break;
                case "pivot.efolds": o.Efolds = v; break;
                case "reheating.w": o.ReheatW = v; break;
                case "reheating.temperature_gev": o.ReheatTemperature = v; break;
                case "reheating.efolds": o.ReheatEfolds = v; break;
                case "reheating.dof": o.ReheatDof = v; break;
                case "normalisation.a_s": o.Amplitude = new Located<double?>(value, key); break;
                case "normalisation.ln_10_10_a_s": o.Amplitude = new Located<double?>(DeckReader.AmplitudeFromLog(value), key); break;
                case "modes.k_min": o.KMin = v; break;
                case "modes.k_max": o.KMax = v; break;
                case "modes.tolerance": o.Tolerance = v; break;
                case "modes.count":
                    if (!(Math.Abs(value) < 1e15) || value != Math.Floor(value))
                        throw new Located<long>(0, key).Error($"must be a whole number (got {value.ToString("R", CultureInfo.InvariantCulture)})");
                    o.KCount = new Located<long>((long)value, key);
                    break;
                default: throw Unknown(key, NumberKeys, "a number");
            }
        }
        return RunInput.Merge(input, o);
    }

    /// <summary><paramref name="input"/> with the text <paramref name="value"/> set at <paramref name="key"/>.</summary>
    /// <exception cref="DeckException">an unknown key, or a key that does not take text.</exception>
    public static RunInput WithText(RunInput input, string key, string value)
    {
        var o = new RunInput();
        Located<string> v = new(value, key);
        switch (key)
        {
            case "title": o.Title = v; break;
            case "model.catalogue": o.ModelId = v; break;
            case "model.potential": o.Potential = v; break;
            case "model.kinetic": o.Kinetic = v; break;
            case "model.coupling": o.Coupling = v; break;
            case "model.palatini":
                o.Palatini = value.Trim().ToLowerInvariant() switch
                {
                    "true" => new Located<bool>(true, key),
                    "false" => new Located<bool>(false, key),
                    _ => throw v.Error($"must be true or false (got \"{value}\")"),
                };
                break;
            case "normalisation.solve_for": o.SolveFor = v; break;
            case "normalisation.a_s":
                if (!string.Equals(value.Trim(), "none", StringComparison.OrdinalIgnoreCase))
                    throw v.Error($"must be a number or \"none\" (got the string \"{value}\")");
                o.Amplitude = new Located<double?>(null, key);
                break;
            default: throw Unknown(key, TextKeys, "text");
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
        switch (key)
        {
            case "title": input.Title = null; break;
            case "model.catalogue": input.ModelId = null; break;
            case "model.potential": input.Potential = null; break;
            case "model.kinetic": input.Kinetic = null; break;
            case "model.coupling": input.Coupling = null; break;
            case "model.palatini": input.Palatini = null; break;
            case "model.phi_end": input.PhiEnd = null; break;
            case "start.phi0": input.Phi0 = null; break;
            case "start.dphi0": input.DPhi0 = null; break;
            case "start.efolds": input.StartEfolds = null; break;
            case "normalisation.solve_for": input.SolveFor = null; break;
            case "pivot.k": input.KPivot = null; break;
            case "pivot.efolds": input.Efolds = null; break;
            case "reheating.w": input.ReheatW = null; break;
            case "reheating.temperature_gev": input.ReheatTemperature = null; break;
            case "reheating.efolds": input.ReheatEfolds = null; break;
            case "reheating.dof": input.ReheatDof = null; break;
            case "normalisation.a_s" or "normalisation.ln_10_10_a_s": input.Amplitude = null; break;
            case "modes.k_min": input.KMin = null; break;
            case "modes.k_max": input.KMax = null; break;
            case "modes.count": input.KCount = null; break;
            case "modes.tolerance": input.Tolerance = null; break;
            default: throw Unknown(key, [.. TextKeys.Union(NumberKeys)], "a value");
        }
    }

    private static DeckException Unknown(string key, string[] valid, string kind) =>
        new($"{key} is not a deck key that takes {kind} here (valid: {string.Join(", ", valid)})", key);
}
