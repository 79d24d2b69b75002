using System.Globalization;
using System.Text;

namespace ModeSolver.Models;

/// <summary>The several-field entries of the catalogue (physics.md section 7).</summary>
public static partial class ModelCatalogue
{
    /// <summary>The largest number of fields of the equal-mass N-field entry.</summary>
    public const int MaxCatalogueFields = 10;

    private static readonly ModelEntry[] FieldEntries =
    [
        new("double-quadratic", "Double quadratic (two massive fields)", "m^2 * (phi^2 + R^2 * chi^2) / 2",
            [new("m", 1.0, "mass of phi (placeholder, rescaled to A_s)"), new("R", 4.0, "mass ratio m_chi / m_phi")],
            12.0, RollDirection.Decreasing, "Polarski & Starobinsky 1992, Nucl. Phys. B 385, 623 (double inflation)")
        {
            Fields = ["phi", "chi"],
            DefaultFields0 = [12.0, 12.0],
            DefaultStartEfolds = null,
            Note = "The heavy field chi rolls first, then the trajectory turns onto phi; about 72 e-folds from (12, 12) by slow roll (phi^2 + chi^2)/4.",
        },
        EqualMass(3),
        new("disk-alpha", "alpha-attractor on the hyperbolic disk with an angular dependence", "V0 * tanh(phi / sqrt(6 * alpha))^2 * (1 + A * cos(theta))",
            [new("V0", 1.0, "amplitude (placeholder, rescaled to A_s)"), new("alpha", 1.0, "curvature of the disk: R_fs = -4/(3 alpha)"),
             new("A", 0.3, "relative size of the angular dependence")],
            6.4, RollDirection.Decreasing, "Achucarro, Kallosh, Linde, Wang & Welling 2018, JCAP 04, 028")
        {
            Fields = ["phi", "theta"],
            Metric = [["1", "0"], ["0", "1.5 * alpha * sinh(sqrt(2 / (3 * alpha)) * phi)^2"]],
            DefaultFields0 = [6.4, 1.0],
            DefaultStartEfolds = null,
            Note = "Polar coordinates on the disk of Kahler potential -3 alpha ln(1 - Z Zbar), Z = tanh(phi/sqrt(6 alpha)) e^(i theta) (physics.md section 7); " +
                   "the radial factor is the T-model's, the angular factor (1 + A cos theta) is our choice of an angular dependence. phi = 0 is the centre of the disk (a coordinate singularity).",
        },
        new("two-field-nonminimal", "Two fields with non-minimal couplings (metric)", "lambda_phi * phi^4 / 4 + g * phi^2 * chi^2 / 2 + lambda_chi * chi^4 / 4",
            [new("lambda_phi", 0.01, "quartic coupling of phi (placeholder, rescaled to A_s)"), new("lambda_chi", 0.0125, "quartic coupling of chi"),
             new("g", 0.0105, "cross coupling"), new("xi_phi", 1000.0, "non-minimal coupling of phi"), new("xi_chi", 1000.0, "non-minimal coupling of chi")],
            0.33, RollDirection.Decreasing, "Kaiser & Sfakianakis 2014, Phys. Rev. Lett. 112, 011302")
        {
            Fields = ["phi", "chi"],
            Coupling = "1 + xi_phi * phi^2 + xi_chi * chi^2",
            DefaultFields0 = [0.33, 0.001],
            DefaultStartEfolds = null,
            Note = "Jordan-frame input (V_J, Omega^2, K^J_IJ = identity), mapped exactly to G_IJ and V; with chi = 0 it is the higgs-like model " +
                   "(lambda = lambda_phi, xi = xi_phi). The default couplings are placeholders of ours: for large xi_I the trajectory follows a valley of V " +
                   "(the single-field attractor of the source).",
        },
    ];

    /// <summary>The several-field entries, in catalogue order.</summary>
    public static IReadOnlyList<ModelEntry> FieldModels => FieldEntries;

    // Equal masses, V = m^2 sum_i phi_i^2 / 2, N fields started on the diagonal (17/sqrt(N) each: radius 17, about 72
    // e-folds). Every gradient-flow trajectory of this V is radial, so it is the single-field quadratic in the radius.
    private static ModelEntry EqualMass(int count)
    {
        var names = new string[count];
        var start = new double[count];
        var v = new StringBuilder("m^2 * (");
        for (int i = 0; i < count; i++)
        {
            names[i] = "phi" + (i + 1).ToString(CultureInfo.InvariantCulture);
            start[i] = 17.0 / Math.Sqrt(count);
            v.Append(i == 0 ? "" : " + ").Append(names[i]).Append("^2");
        }
        v.Append(") / 2");
        return new ModelEntry("n-quadratic", "Equal-mass N-field quadratic", v.ToString(),
            [new("m", 1.0, "common mass (placeholder, rescaled to A_s)"),
             new("N", count, string.Create(CultureInfo.InvariantCulture, $"number of fields, a whole number from 1 to {MaxCatalogueFields} (fields phi1 ... phiN)"))],
            start[0], RollDirection.Decreasing, "Dimopoulos, Kachru, McGreevy & Wacker 2008, JCAP 08, 003 (N-flation; equal masses)")
        {
            Fields = names,
            DefaultFields0 = start,
            DefaultStartEfolds = null,
            CountParameter = "N",
            Expand = ExpandEqualMass,
            Note = "Equal masses: every trajectory is radial, exactly the single-field quadratic in the radius (physics.md section 7 oracle); starts on the diagonal at radius 17.",
        };
    }

    private static ModelEntry ExpandEqualMass(IReadOnlyDictionary<string, double> parameters)
    {
        double n = parameters.TryGetValue("N", out double given) ? given : 3;
        if (!(n >= 1 && n <= MaxCatalogueFields && n == Math.Floor(n)))
            throw new TheoryException(string.Create(CultureInfo.InvariantCulture, $"the number of fields N must be a whole number from 1 to {MaxCatalogueFields} (got {n})"));
        return EqualMass((int)n);
    }
}
