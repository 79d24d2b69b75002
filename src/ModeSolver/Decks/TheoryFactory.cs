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
        string x = spec.Variable;
        var potential = Formula.Parse(spec.Potential, pars, x);
        var kinetic = spec.Kinetic is null ? null : Formula.Parse(spec.Kinetic, pars, x);
        string description = spec.Describe();
        if (spec.Coupling is null)
            return new EinsteinFrameTheory(potential, kinetic, description);
        var coupling = Formula.Parse(spec.Coupling, pars, x);
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
        if (settings.Model.IsMultiField)
            throw new DeckException($"{settings.DeckPath ?? "command line"}: a model of {settings.Model.FieldCount} fields has no one-field theory here; it runs on the n-field theory (BuildFields)", "model.fields");
        var theory = Build(settings.Model, settings.Initial.Phi0);
        var range = theory.FindValidInterval(settings.Initial.Phi0);
        return theory switch
        {
            EinsteinFrameTheory e => e.WithValidRange(range),
            JordanFrameTheory j => j.WithValidRange(range),
            _ => theory,
        };
    }

    /// <summary>
    /// The n-field theory of a several-field model (<see cref="ModelSpec.IsMultiField"/>): a <see cref="FormulaFieldTheory"/>
    /// in the Einstein frame (V, G_IJ) or, with a coupling, mapped from the Jordan frame (V_J, Omega^2, K^J_IJ).
    /// </summary>
    /// <exception cref="FormulaException">a formula does not parse.</exception>
    /// <exception cref="TheoryException">the metric is not n x n or not symmetric.</exception>
    public static FormulaFieldTheory BuildFields(ModelSpec spec)
    {
        ArgumentNullException.ThrowIfNull(spec);
        var fields = spec.Fields ?? ["phi"];
        return spec.Coupling is null
            ? FormulaFieldTheory.Einstein(fields, spec.Potential, spec.Metric, spec.Parameters, spec.Describe())
            : FormulaFieldTheory.Jordan(fields, spec.Potential, spec.Coupling, spec.Metric, spec.Palatini, spec.Parameters, spec.Describe());
    }

    /// <summary>The end surface of a several-field model (inflation ends where the formula crosses zero), or null.</summary>
    /// <exception cref="FormulaException">the formula does not parse.</exception>
    public static FieldSurface? EndSurface(ModelSpec spec)
    {
        ArgumentNullException.ThrowIfNull(spec);
        if (spec.End is not string text) return null;
        var fields = spec.Fields ?? ["phi"];
        var g = Formula.Compile(text, fields, spec.Parameters);
        int n = fields.Count;
        return FieldSurface.FromFunction($"{text} = 0", phi => g.Value(phi[..n]));
    }

    /// <summary>A formula as an <see cref="IDerivativeFunction"/> (five derivatives, enough for the metric frame map).</summary>
    public static IDerivativeFunction Wrap(Formula formula) => DerivativeFunction.FromFormula(formula);
}
