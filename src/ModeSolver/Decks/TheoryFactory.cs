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
    public static IValidatedTheory Build(ModelSpec spec) => Build(spec, double.NaN);

    /// <summary>
    /// Largest round-off of the attractor slope V_phi/(K V) accepted from double evaluation of a Jordan-frame map
    /// (<see cref="JordanFrameTheory.SlopeRoundOff"/>); above it V and K are evaluated in double-double arithmetic. The
    /// background's relative tolerance is 1e-10, so slope noise of 1e-12 is invisible.
    /// </summary>
    public const double SlopeRoundOffLimit = 1e-12;

    /// <summary>
    /// As <see cref="Build(ModelSpec)"/>; a Jordan-frame theory whose slope at <paramref name="probePhi"/> (when finite)
    /// is lost to round-off beyond <see cref="SlopeRoundOffLimit"/> (a plateau flatter than double precision resolves,
    /// e.g. the Palatini map at xi phi^2 ~ 1e11) is evaluated in double-double arithmetic.
    /// </summary>
    public static IValidatedTheory Build(ModelSpec spec, double probePhi)
    {
        var theory = BuildPlain(spec);
        if (theory is JordanFrameTheory j && double.IsFinite(probePhi) && j.SlopeRoundOff(probePhi) > SlopeRoundOffLimit)
            return j.WithExtendedPrecision();
        return theory;
    }

    private static IValidatedTheory BuildPlain(ModelSpec spec)
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
        var theory = Build(settings.Model, settings.Initial.Phi0);
        var range = theory.FindValidInterval(settings.Initial.Phi0);
        return theory switch
        {
            EinsteinFrameTheory e => e.WithValidRange(range),
            JordanFrameTheory j => j.WithValidRange(range),
            _ => theory,
        };
    }

    /// <summary>A formula as an <see cref="IDerivativeFunction"/> (five derivatives, enough for the metric frame map).</summary>
    public static IDerivativeFunction Wrap(Formula formula) => DerivativeFunction.FromFormula(formula);
}
