using ModeSolver.Report;
namespace ModeSolver.Models;

/// <summary>Which way the field rolls from its default start: the sign of -V_phi there.</summary>
public enum RollDirection
{
    /// <summary>phi decreases (V_phi &gt; 0).</summary>
    Decreasing,

    /// <summary>phi increases (V_phi &lt; 0).</summary>
    Increasing,
}

/// <summary>
/// A named model parameter and its value (in the units of the model's formulas): the default of a catalogue entry,
/// or the value a run used (the report's model parameters). <see cref="Meaning"/> is the catalogue's one-line
/// description (empty in a report).
/// </summary>
public sealed record ModelParameter(string Name, double Value, string Meaning = "");

/// <summary>
/// One catalogue model. <see cref="Potential"/> is V(phi) (Einstein frame) or, when <see cref="Coupling"/> is set,
/// the Jordan-frame V_J(phi) with Omega^2(phi) = <see cref="Coupling"/>. Formulas are in the formula language
/// (variable phi, reduced Planck units); parameters are named in <see cref="Parameters"/>.
/// </summary>
public sealed record ModelEntry(
    string Id,
    string Name,
    string Potential,
    IReadOnlyList<ModelParameter> Parameters,
    double DefaultPhi0,
    RollDirection Roll,
    string Source)
{
    /// <summary>Omega^2(phi) for a Jordan-frame model, else null.</summary>
    public string? Coupling { get; init; }

    /// <summary>K(phi) (Einstein frame) or K_J(phi) (Jordan frame) when not canonical, else null.</summary>
    public string? Kinetic { get; init; }

    /// <summary>True for the Palatini formulation of a Jordan-frame model.</summary>
    public bool Palatini { get; init; }

    /// <summary>
    /// Field value where inflation is ended by hand for models that never end by themselves (epsilon_1 stays
    /// below 1): an abrupt end, e.g. a waterfall transition in a second field. Null when inflation ends by itself.
    /// </summary>
    public double? PhiEnd { get; init; }

    /// <summary>
    /// The default start in e-folds before the end of inflation (<see cref="ModelCatalogue.DefaultStartEfolds"/>): used
    /// when neither a field value nor a number of e-folds is given. <see cref="DefaultPhi0"/> then only tells on which side
    /// of the potential inflation happens.
    /// </summary>
    public double? DefaultStartEfolds { get; init; } = ModelCatalogue.DefaultStartEfolds;

    /// <summary>A short note (what is special, how defaults were chosen).</summary>
    public string Note { get; init; } = "";

    /// <summary>The field names of a several-field model in field order (null: one field, phi).</summary>
    public IReadOnlyList<string>? Fields { get; init; }

    /// <summary>The field-space metric G_IJ (K^J_IJ with a coupling) as rows of formulas; null for the identity.</summary>
    public IReadOnlyList<IReadOnlyList<string>>? Metric { get; init; }

    /// <summary>The default start of a several-field model, one value per field (null for one field: <see cref="DefaultPhi0"/>).</summary>
    public IReadOnlyList<double>? DefaultFields0 { get; init; }

    /// <summary>An end surface formula (inflation ends where it crosses zero), or null: the epsilon_1 = 1 crossing.</summary>
    public string? End { get; init; }

    /// <summary>
    /// The parameter that sets the number of fields (e.g. N of the equal-mass N-field model), or null. It appears in no
    /// formula: <see cref="Expand"/> writes the fields, the formulas and the start for its value.
    /// </summary>
    public string? CountParameter { get; init; }

    /// <summary>The entry for these parameter values (the fields and formulas of <see cref="CountParameter"/>), or null when fixed.</summary>
    public Func<IReadOnlyDictionary<string, double>, ModelEntry>? Expand { get; init; }

    /// <summary>The number of fields (of the default parameters for an entry with a <see cref="CountParameter"/>).</summary>
    public int FieldCount => Fields?.Count ?? 1;

    /// <summary>The default parameter values as a dictionary.</summary>
    public IReadOnlyDictionary<string, double> DefaultParameters
    {
        get
        {
            var d = new Dictionary<string, double>(StringComparer.Ordinal);
            foreach (var p in Parameters) d[p.Name] = p.Value;
            return d;
        }
    }
}

/// <summary>
/// The built-in models. Units: reduced Planck. Overall amplitudes (V0, lambda, Lambda, m) are placeholders:
/// the pipeline rescales V to the requested A_s. Default phi0 values give comfortably more than 60 e-folds by
/// the slow-roll estimate N = int K V / |V_phi| dphi (checked by the catalogue tests).
/// </summary>
public static partial class ModelCatalogue
{
    /// <summary>
    /// Catalogue models start this many e-folds before the end of inflation by default: enough for the pivot
    /// (N_* of 50 to 60) and for the default k_min = 1e-6 /Mpc, about 11 e-folds earlier, to start well inside the horizon.
    /// </summary>
    public const double DefaultStartEfolds = 75;

    private static readonly ModelEntry[] Entries =
    [
        new("monomial", "Monomial (chaotic) inflation", "V0 * phi^p",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("p", 2.0, "power of the field")],
            17.0, RollDirection.Decreasing, "Linde 1983, Phys. Lett. B 129, 177")
        {
            Note = "phi^p with non-integer p is undefined for phi < 0 (after inflation); default p = 2 gives about 72 e-folds from phi0 = 17.",
        },
        new("starobinsky", "Starobinsky R + R^2 (Einstein frame)", "V0 * (1 - exp(-sqrt(2/3) * phi))^2",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)")],
            5.8, RollDirection.Decreasing, "Starobinsky 1980, Phys. Lett. B 91, 99"),
        new("t-model", "alpha-attractor T-model", "V0 * tanh(phi / sqrt(6 * alpha))^2",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("alpha", 1.0, "attractor parameter (curvature of the field space)")],
            6.6, RollDirection.Decreasing, "Kallosh, Linde & Roest 2013, JHEP 11, 198"),
        new("e-model", "alpha-attractor E-model", "V0 * (1 - exp(-sqrt(2 / (3 * alpha)) * phi))^2",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("alpha", 1.0, "attractor parameter; alpha = 1 is the Starobinsky potential")],
            5.8, RollDirection.Decreasing, "Kallosh, Linde & Roest 2013, JHEP 11, 198"),
        new("higgs-like", "Quartic with non-minimal coupling (metric)", "lambda * phi^4 / 4",
            [new("lambda", 0.1, "quartic coupling (placeholder, rescaled to A_s)"), new("xi", 1000.0, "non-minimal coupling to R")],
            0.33, RollDirection.Decreasing, "Bezrukov & Shaposhnikov 2008, Phys. Lett. B 659, 703")
        {
            Coupling = "1 + xi * phi^2",
            Note = "Jordan-frame input (V_J, Omega^2); for xi >> 1 the Einstein-frame potential approaches the Starobinsky plateau.",
        },
        new("higgs-like-palatini", "Quartic with non-minimal coupling (Palatini)", "lambda * phi^4 / 4",
            [new("lambda", 0.1, "quartic coupling (placeholder, rescaled to A_s)"), new("xi", 1000.0, "non-minimal coupling to R")],
            25.0, RollDirection.Decreasing, "Bezrukov & Shaposhnikov 2008, Phys. Lett. B 659, 703")
        {
            Coupling = "1 + xi * phi^2",
            Palatini = true,
            Note = "Palatini: K = 1/Omega^2, slow-roll N ~ phi^2/8 independent of xi, very small r.",
        },
        new("natural", "Natural inflation", "Lambda4 * (1 + cos(phi / f))",
            [new("Lambda4", 1.0, "amplitude Lambda^4 (placeholder, rescaled to A_s)"), new("f", 7.0, "decay constant")],
            6.0, RollDirection.Increasing, "Freese, Frieman & Olinto 1990, Phys. Rev. Lett. 65, 3233")
        {
            Note = "Rolls from near the hilltop at phi = 0 towards the minimum at phi = pi f.",
        },
        new("hilltop", "Quartic hilltop (squared, with a minimum)", "V0 * (1 - (phi / mu)^p)^2",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("mu", 20.0, "field value of the minimum"), new("p", 4.0, "power of the hilltop")],
            9.0, RollDirection.Increasing, "Boubekeur & Lyth 2005, JCAP 07, 010")
        {
            Note = "The squared form V0 (1 - (phi/mu)^p)^2 keeps the hilltop shape near phi = 0 and adds a minimum at phi = mu.",
        },
        new("exponential", "Exponential (power-law inflation)", "V0 * exp(-lambda * phi)",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("lambda", 0.1, "slope; epsilon_1 = lambda^2/2 exactly")],
            0.0, RollDirection.Increasing, "Lucchin & Matarrese 1985, Phys. Rev. D 32, 1316")
        {
            PhiEnd = 7.5,
            Note = "Never ends by itself: inflation is ended abruptly at phi_end (e.g. a waterfall); N = (phi_end - phi0)/lambda on the attractor.",
        },
        new("step", "Quadratic with a tanh step", "0.5 * m^2 * phi^2 * (1 + c * tanh((phi - phi_s) / d))",
            [new("m", 1.0, "mass (placeholder, rescaled to A_s)"), new("c", 1e-3, "relative height of the step"),
             new("phi_s", 14.7, "field value of the step"), new("d", 0.02, "width of the step")],
            17.0, RollDirection.Decreasing, "Adams, Cresswell & Easther 2001, Phys. Rev. D 64, 123514")
        {
            Note = "The step sits about 54 e-folds before the end, so its oscillations fall near the pivot.",
        },
        new("broken-linear", "Linear with a change of slope", "piecewise(phi > phi_k, V0 + A_plus * (phi - phi_k), V0 + A_minus * (phi - phi_k))",
            [new("V0", 1.0, "height at the kink (dominant)"), new("A_plus", 2e-3, "slope above the kink"),
             new("A_minus", 2e-4, "slope below the kink"), new("phi_k", 0.0, "field value of the kink")],
            0.02, RollDirection.Decreasing, "Starobinsky 1992, JETP Lett. 55, 489")
        {
            PhiEnd = -0.013,
            Note = "V_phi jumps at phi_k (a non-smooth point). Never ends by itself: ended abruptly at phi_end; about 10 e-folds above the kink and 65 below.",
        },
        new("inflection", "Near-inflection point with ultra-slow roll", "V0 * (phi/v)^2 * (6 - 4 * a * (phi/v) + 3 * (phi/v)^2) / (1 + b * (phi/v)^2)^2",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("v", 0.35, "field scale of the inflection region"),
             new("a", 1.0, "cubic coefficient"), new("b", 1.4348, "tuning: near 1.43507 (a = 1) the inflection point becomes a stationary point")],
            4.0, RollDirection.Decreasing, "Garcia-Bellido & Ruiz Morales 2017, Phys. Dark Univ. 18, 47")
        {
            Note = "Ratio of polynomials: a plateau at large phi, a near-inflection point at phi ~ 0.43 giving ultra-slow roll " +
                   "(epsilon_2 < -3, down to about -4.7) some 30 e-folds before the end (our own background run), a minimum at 0.",
        },
    ];

    /// <summary>All one-field entries, in catalogue order (the several-field ones are <see cref="FieldModels"/>).</summary>
    public static IReadOnlyList<ModelEntry> All => Entries;

    /// <summary>The ids of the one-field entries, in catalogue order.</summary>
    public static IEnumerable<string> Ids => Entries.Select(e => e.Id);

    /// <summary>The entry with this id (case-insensitive), one-field or several-field, or null.</summary>
    public static ModelEntry? Find(string id)
    {
        foreach (var e in Entries)
            if (string.Equals(e.Id, id, StringComparison.OrdinalIgnoreCase)) return e;
        foreach (var e in FieldEntries)
            if (string.Equals(e.Id, id, StringComparison.OrdinalIgnoreCase)) return e;
        return null;
    }

    /// <summary>Every id, the one-field entries first, then the several-field ones.</summary>
    public static IEnumerable<string> AllIds => Entries.Concat(FieldEntries).Select(e => e.Id);

    /// <summary>The entry with this id; throws <see cref="TheoryException"/> (exit code 2) naming the valid ids otherwise.</summary>
    public static ModelEntry Get(string id) =>
        Find(id) ?? throw new TheoryException($"unknown model '{id}' (catalogue: {string.Join(", ", AllIds)})");
}
