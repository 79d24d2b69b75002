using System.Globalization;
using ModeSolver.Physics;

namespace ModeSolver.Decks;

/// <summary>
/// Everything one run needs, resolved from a deck and/or the command line and validated: a plain immutable tree.
/// Units: reduced Planck for field values, 1/Mpc for wavenumbers, GeV for temperatures.
/// </summary>
/// <param name="Model">The theory to use.</param>
/// <param name="Initial">Where the field starts.</param>
/// <param name="Pivot">Pivot scale and how N_* is fixed (directly or from reheating).</param>
/// <param name="Amplitude">Normalisation of the scalar spectrum at the pivot.</param>
/// <param name="KRange">Wavenumbers to compute and the accuracy target.</param>
/// <param name="Output">Where results go and in which formats.</param>
public sealed record RunSettings(ModelSpec Model, InitialConditions Initial, PivotSpec Pivot, AmplitudeSpec Amplitude, KRangeSpec KRange, OutputSpec Output)
{
    /// <summary>Free-text title from the deck (may be empty).</summary>
    public string Title { get; init; } = "";

    /// <summary>The deck file these settings came from, if any.</summary>
    public string? DeckPath { get; init; }

    /// <summary>Non-fatal remarks found while resolving (unused parameters, ...), one line each.</summary>
    public IReadOnlyList<string> Warnings { get; init; } = [];

    /// <summary>The numbers of the settings as given or defaulted, checked by the schema's validators (<see cref="SettingValues"/>).</summary>
    public SettingValues Values { get; init; } = SettingValues.Empty;

    /// <summary>The `[bispectrum] triangles` in canonical text "k1:k2:k3,..." (1/Mpc; <see cref="TriangleList"/>), or null.</summary>
    public string? BispectrumTriangles { get; init; }

    /// <summary>
    /// The `[compare] freeze` fields of a several-field model (every field but one, in field order), or null: the run also
    /// solves the one-field model with them held at their values at the pivot's horizon exit.
    /// </summary>
    public IReadOnlyList<string>? Freeze { get; init; }

    /// <summary>Thresholds of the slow-roll disagreement flags (deck table [flags]).</summary>
    public Diagnostics.FlagSettings Flags { get; init; } = Diagnostics.FlagSettings.Default;

    /// <summary>Which observables to compute from the spectrum and every choice they use (deck table [observables]).</summary>
    public ModeSolver.Observables.ObservablesSettings Observables { get; init; } = ModeSolver.Observables.ObservablesSettings.Default;

    /// <summary>A one-paragraph human summary of the resolved settings; without <paramref name="spectrum"/> (the
    /// background command) the modes, outputs and observables, which that command does not use, are left out.</summary>
    public string Summary(bool spectrum = true)
    {
        var c = CultureInfo.InvariantCulture;
        var parts = new List<string>();
        parts.Add($"Model: {Model.Describe()}.");
        parts.Add(Initial.Fields0 is { } f0 && Model.Fields is { } names
            ? string.Create(c, $"Start at ({string.Join(", ", names)}) = ({string.Join(", ", f0.Select(x => x.ToString("G6", c)))}) ")
              + (Initial.Velocity0 is { } u ? string.Create(c, $"with dphi/dN = ({string.Join(", ", u.Select(x => x.ToString("G6", c)))}).") : "on the slow-roll attractor direction.")
            : Initial.StartEfolds is double ne
            ? string.Create(c, $"Start {ne:G6} e-folds before the end of inflation (slow-roll first guess phi0 = {Initial.Phi0:G6}, solved exactly in the run) on the slow-roll attractor.")
            : Initial.DPhi0 is double d
            ? string.Create(c, $"Start at phi0 = {Initial.Phi0:G6} with dphi/dN = {d:G6}.")
            : string.Create(c, $"Start at phi0 = {Initial.Phi0:G6} on the slow-roll attractor."));
        if (Model.PhiEnd is double pe) parts.Add(string.Create(c, $"Inflation is ended abruptly at phi_end = {pe:G6}."));
        parts.Add(Pivot.Describe());
        parts.Add(Amplitude.ScalarAmplitude is double a
            ? Amplitude.SolveFor is string sf
                ? string.Create(c, $"Normalised to A_s = {a:G4} at the pivot by solving for the parameter {sf} (V not rescaled).")
                : string.Create(c, $"Normalised to A_s = {a:G4} at the pivot.")
            : "Not normalised (V used as given).");
        if (!spectrum) return string.Join(" ", parts);
        parts.Add(string.Create(c, $"Modes: {KRange.Count} wavenumbers in [{KRange.KMin:G4}, {KRange.KMax:G4}]/Mpc, tolerance {KRange.Tolerance:G3}."));
        parts.Add($"Output: {Output.Directory} ({string.Join(", ", Output.Formats)}).");
        var on = new List<string>();
        if (Observables.Distance) on.Add("distance to the data");
        if (Observables.Peak) on.Add("peak summary");
        if (Observables.InducedGw) on.Add("induced GWs");
        if (Observables.Pbh) on.Add(string.Create(c, $"black holes (delta_c = {Observables.DeltaC:G4}, gamma = {Observables.Gamma:G3}, {ModeSolver.Observables.PbhWindowText.Code(Observables.Window)} window)"));
        parts.Add(on.Count == 0 ? "Observables: none." : $"Observables: {string.Join(", ", on)}.");
        return string.Join(" ", parts);
    }
}

/// <summary>
/// The theory: a potential (Einstein-frame V, or Jordan-frame V_J when <see cref="Coupling"/> is set), optional kinetic
/// function (K, or K_J in the Jordan frame), optional Omega^2 coupling with the Palatini flag, parameter values, and
/// the resolved phi_end (catalogue default or given). Formula texts are already resolved from the catalogue.
/// </summary>
public sealed record ModelSpec(string? CatalogueId, string Potential, string? Kinetic, string? Coupling, bool Palatini,
    IReadOnlyDictionary<string, double> Parameters, double? PhiEnd)
{
    /// <summary>True when the input is in the Jordan frame (a coupling is given).</summary>
    public bool IsJordanFrame => Coupling is not null;

    /// <summary>The field names when given (null: one field, phi); the formulas' variables in field order.</summary>
    public IReadOnlyList<string>? Fields { get; init; }

    /// <summary>The field-space metric G_IJ (K^J_IJ with a coupling) as rows of formulas, null for the identity (several fields).</summary>
    public IReadOnlyList<IReadOnlyList<string>>? Metric { get; init; }

    /// <summary>The end surface: a formula in the fields; inflation ends where it crosses zero (several fields).</summary>
    public string? End { get; init; }

    /// <summary>The number of fields (1 unless <see cref="Fields"/> names more).</summary>
    public int FieldCount => Fields?.Count ?? 1;

    /// <summary>True for a model of several fields (run on the n-field theory, <see cref="Models.FormulaFieldTheory"/>).</summary>
    public bool IsMultiField => FieldCount > 1;

    /// <summary>The variable of a one-field model's formulas (phi unless <see cref="Fields"/> names another).</summary>
    public string Variable => Fields is { Count: 1 } f ? f[0] : "phi";

    /// <summary>One-line description: catalogue id or formulas with parameter values.</summary>
    public string Describe()
    {
        var c = CultureInfo.InvariantCulture;
        string head = CatalogueId is null ? "" : CatalogueId + ", ";
        string pot = IsJordanFrame ? $"V_J = {Potential}, Omega^2 = {Coupling}" : $"V = {Potential}";
        if (IsMultiField) pot = $"fields ({string.Join(", ", Fields!)}), " + pot;
        if (Metric is not null) pot += (IsJordanFrame ? ", K_J = [" : ", G = [") + Decks.FormulaMatrix.Format(Metric) + "]";
        if (Kinetic is not null) pot += IsJordanFrame ? $", K_J = {Kinetic}" : $", K = {Kinetic}";
        if (End is not null) pot += $", end where {End} = 0";
        if (IsJordanFrame) pot += Palatini ? " (Jordan frame, Palatini)" : " (Jordan frame, metric)";
        string pars = Parameters.Count == 0 ? "" :
            " with " + string.Join(", ", Parameters.OrderBy(p => p.Key, StringComparer.Ordinal).Select(p => string.Create(c, $"{p.Key} = {p.Value:G6}")));
        return head + pot + pars;
    }
}

/// <summary>Initial field value and, optionally, initial velocity d phi / dN (the slow-roll attractor when null).</summary>
public sealed record InitialConditions(double Phi0, double? DPhi0)
{
    /// <summary>The start values of a several-field model, one per field in field order (null for one field: <see cref="Phi0"/>).</summary>
    public IReadOnlyList<double>? Fields0 { get; init; }

    /// <summary>The start velocities d phi^I / dN of a several-field model (null: the slow-roll attractor direction -G^IJ V_J / V).</summary>
    public IReadOnlyList<double>? Velocity0 { get; init; }

    /// <summary>
    /// When set, the run starts this many e-folds before the end of inflation: <see cref="Phi0"/> is then the slow-roll
    /// first guess, and the pipeline solves for the field value whose exact background gives this N_total.
    /// </summary>
    public double? StartEfolds { get; init; }
}

/// <summary>How reheating is specified.</summary>
public enum ReheatingKind
{
    /// <summary>rho_reh = rho_end (the default).</summary>
    Instantaneous,

    /// <summary>A fluid of constant w until the temperature T_reh.</summary>
    Temperature,

    /// <summary>A fluid of constant w lasting N_reh e-folds.</summary>
    Efolds,
}

/// <summary>Reheating history after inflation (physics.md section 5).</summary>
/// <param name="Kind">Instantaneous, or a constant-w phase ending at a temperature or after a number of e-folds.</param>
/// <param name="W">Equation of state during reheating, -1/3 &lt; w &lt;= 1 (unused when instantaneous).</param>
/// <param name="TemperatureGeV">T_reh in GeV (Kind = Temperature).</param>
/// <param name="Efolds">N_reh (Kind = Efolds).</param>
/// <param name="Dof">g_reh = g_s,reh, relativistic degrees of freedom at reheating.</param>
public sealed record ReheatingSpec(ReheatingKind Kind, double W, double? TemperatureGeV, double? Efolds, double Dof)
{
    /// <summary>Instantaneous reheating with the default g_reh.</summary>
    public static ReheatingSpec Instantaneous { get; } = new(ReheatingKind.Instantaneous, 0.0, null, null, Constants.DefaultReheatingDof);
}

/// <summary>
/// The pivot k_* and how N_* (e-folds before the end of inflation at which k_* = aH) is found: given directly
/// (<see cref="Efolds"/>), else from <see cref="Reheating"/>.
/// </summary>
public sealed record PivotSpec(double KPivot, double? Efolds, ReheatingSpec Reheating)
{
    /// <summary>One sentence.</summary>
    public string Describe()
    {
        var c = CultureInfo.InvariantCulture;
        string head = string.Create(c, $"Pivot k_* = {KPivot:G4}/Mpc");
        if (Efolds is double n) return string.Create(c, $"{head} at N_* = {n:G6} e-folds before the end.");
        return Reheating.Kind switch
        {
            ReheatingKind.Temperature => string.Create(c, $"{head}, N_* from reheating with w = {Reheating.W:G4} to T_reh = {Reheating.TemperatureGeV:G4} GeV (g_reh = {Reheating.Dof:G5})."),
            ReheatingKind.Efolds => string.Create(c, $"{head}, N_* from reheating with w = {Reheating.W:G4} lasting N_reh = {Reheating.Efolds:G4} (g_reh = {Reheating.Dof:G5})."),
            _ => string.Create(c, $"{head}, N_* from instantaneous reheating (g_reh = {Reheating.Dof:G5})."),
        };
    }
}

/// <summary>Normalisation: the scalar amplitude A_s at the pivot, or null for none (V as given).</summary>
public sealed record AmplitudeSpec(double? ScalarAmplitude)
{
    /// <summary>When set, A_s is reached by solving for this model parameter (V is not rescaled).</summary>
    public string? SolveFor { get; init; }

    /// <summary>The default: A_s = 2.099e-9 (physics.md section 6).</summary>
    public static AmplitudeSpec Default { get; } = new(Constants.DefaultScalarAmplitude);
}

/// <summary>Wavenumbers (1/Mpc, log-spaced from KMin to KMax, Count of them) and the relative accuracy target.</summary>
public sealed record KRangeSpec(double KMin, double KMax, int Count, double Tolerance)
{
    /// <summary>True when k_min was not given: the run then narrows it to what the background serves, with a warning.</summary>
    public bool KMinIsDefault { get; init; }

    /// <summary>Defaults: 1e-6 to 10 /Mpc (Boltzmann codes ask for the table from 1e-6 /Mpc), 120 wavenumbers, tolerance 1e-6.</summary>
    public static KRangeSpec Default { get; } = new(1e-6, 10.0, 120, 1e-6);
}

/// <summary>Output directory and formats (a subset of <see cref="KnownFormats"/>).</summary>
public sealed record OutputSpec(string Directory, IReadOnlyList<string> Formats)
{
    /// <summary>When set, the primordial table gives k in h/Mpc with this h (k[h/Mpc] = k[1/Mpc] / h).</summary>
    public double? TableH { get; init; }

    /// <summary>Format names accepted in decks and on the command line.</summary>
    public static IReadOnlyList<string> KnownFormats { get; } = ["hdf5", "table", "json", "plots"];

    /// <summary>Defaults: directory "modesolver-out", all formats.</summary>
    public static OutputSpec Default { get; } = new("modesolver-out", KnownFormats);
}
