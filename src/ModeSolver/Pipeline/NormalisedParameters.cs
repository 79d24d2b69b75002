using ModeSolver.Decks;
using ModeSolver.Formulas;

namespace ModeSolver.Pipeline;

/// <summary>
/// The model's parameters as they are after normalisation: when V was rescaled by s to reach A_s, the parameter that
/// sets V's overall amplitude (V proportional to p^q, found numerically, e.g. V0 or lambda with q = 1, m with q = 2)
/// takes the value p s^(1/q), so that the printed model with V scale 1 is the one that was run. With a coupling the
/// scaling applies to V_J (V = V_J / Omega^4 scales with it). Also gives the derived combination lambda/xi^2 of a
/// quartic potential with a non-minimal coupling xi phi^2 (the plateau height V -&gt; lambda/(4 xi^2)).
/// </summary>
public static class NormalisedParameters
{
    private static readonly double[] Probes = [0.37, 1.3, 4.1];

    /// <summary>
    /// The amplitude parameter of the potential and its power q (V proportional to p^q), or null when no single parameter
    /// scales V; a parameter that also appears in the kinetic function or the coupling never qualifies.
    /// </summary>
    public static (string Name, int Power)? AmplitudeParameter(ModelSpec model)
    {
        ArgumentNullException.ThrowIfNull(model);
        if (model.IsMultiField) return null; // the probes below are one-field values
        var others = new HashSet<string>(StringComparer.Ordinal);
        try
        {
            if (model.Kinetic is not null) others.UnionWith(Formula.ReferencedNames(model.Kinetic, model.Variable));
            if (model.Coupling is not null) others.UnionWith(Formula.ReferencedNames(model.Coupling, model.Variable));
            foreach (string name in Formula.ReferencedNames(model.Potential, model.Variable))
            {
                if (others.Contains(name) || !model.Parameters.TryGetValue(name, out double p) || p == 0) continue;
                foreach (int q in (int[])[1, 2, 4])
                    if (Scales(model, name, p, q)) return (name, q);
            }
        }
        catch (FormulaException)
        {
            return null;
        }
        return null;
    }

    /// <summary>The parameters with the amplitude parameter rescaled by <paramref name="vScale"/> (unchanged when there is none or s = 1).</summary>
    public static IReadOnlyDictionary<string, double> Apply(ModelSpec model, double vScale)
    {
        ArgumentNullException.ThrowIfNull(model);
        if (vScale == 1 || !double.IsFinite(vScale) || AmplitudeParameter(model) is not { } amp) return model.Parameters;
        var d = new Dictionary<string, double>(model.Parameters, StringComparer.Ordinal);
        d[amp.Name] = model.Parameters[amp.Name] * Math.Pow(vScale, 1.0 / amp.Power);
        return d;
    }

    /// <summary>lambda/xi^2 when the model is a quartic V_J with the coupling 1 + xi phi^2 (catalogue higgs-like models), else null.</summary>
    public static double? LambdaOverXiSquared(ModelSpec model, IReadOnlyDictionary<string, double> parameters)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(parameters);
        if (model.Coupling is null || !parameters.TryGetValue("lambda", out double l) || !parameters.TryGetValue("xi", out double xi) || xi == 0)
            return null;
        return l / (xi * xi);
    }

    private static bool Scales(ModelSpec model, string name, double p, int q)
    {
        var pars = new Dictionary<string, double>(model.Parameters, StringComparer.Ordinal);
        var f1 = Formula.Parse(model.Potential, pars, model.Variable);
        pars[name] = 2 * p;
        var f2 = Formula.Parse(model.Potential, pars, model.Variable);
        pars[name] = 3 * p;
        var f3 = Formula.Parse(model.Potential, pars, model.Variable);
        double r2 = Math.Pow(2, q), r3 = Math.Pow(3, q);
        int nonZero = 0;
        foreach (double phi in Probes)
        {
            double v1 = f1.Value(phi);
            if (!double.IsFinite(v1)) return false;
            if (v1 == 0) continue;
            nonZero++;
            if (Math.Abs(f2.Value(phi) / v1 - r2) > 1e-9 * r2 || Math.Abs(f3.Value(phi) / v1 - r3) > 1e-9 * r3) return false;
        }
        return nonZero > 0;
    }
}
