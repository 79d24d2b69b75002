using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Decks;

/// <summary>Builds the Einstein-frame theory of a <see cref="ModelSpec"/> (parsing its formulas).</summary>
public static class TheoryFactory
{
    /// <summary>
    /// The theory for <paramref name="spec"/>: an <see cref="EinsteinFrameTheory"/>, or a <see cref="JordanFrameTheory"/>
    /// when a coupling is given. The valid range is left unrestricted; see <see cref="Build(RunSettings)"/>.
    /// </summary>
    /// <exception cref="FormulaException">a formula does not parse (the caller maps it to the key concerned).</exception>
    public static IValidatedTheory Build(ModelSpec spec)
    {
        ArgumentNullException.ThrowIfNull(spec);
        var pars = spec.Parameters;
        var potential = Formula.Parse(spec.Potential, pars);
        var kinetic = spec.Kinetic is null ? null : Formula.Parse(spec.Kinetic, pars);
        string description = spec.Describe();
        if (spec.Coupling is null)
            return new EinsteinFrameTheory(potential, kinetic, description);
        var coupling = Formula.Parse(spec.Coupling, pars);
        return JordanFrameTheory.FromFormulas(coupling, kinetic, potential, spec.Palatini, description);
    }

    /// <summary>
    /// The theory of a run, with its valid range set to the interval around phi0 where it is valid
    /// (Omega^2 &gt; 0, K &gt; 0, V finite; searched out to |phi| = 1e3).
    /// </summary>
    /// <exception cref="TheoryException">the theory is not valid at phi0.</exception>
    public static IValidatedTheory Build(RunSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var theory = Build(settings.Model);
        var range = theory.FindValidInterval(settings.Initial.Phi0);
        return theory switch
        {
            EinsteinFrameTheory e => e.WithValidRange(range),
            JordanFrameTheory j => j.WithValidRange(range),
            _ => theory,
        };
    }

    /// <summary>A formula as an <see cref="IDerivativeFunction"/> (five derivatives, enough for the metric frame map).</summary>
    public static IDerivativeFunction Wrap(Formula formula)
    {
        ArgumentNullException.ThrowIfNull(formula);
        return new DerivativeFunction(formula.EvaluateDerivatives, Math.Min(Formula.MaxOrder, 6), formula.NonSmoothPoints, formula.Text);
    }
}
