using System.Collections.Immutable;
using System.Reflection;
using ModeSolver.Diagnostics;
using ModeSolver.Models;

using ModeSolver.Results;
using ModeSolver.Estimates;

namespace ModeSolver.Report;

/// <summary>
/// Everything a finished spectrum run hands to the output stage: an immutable record tree filled by the pipeline
/// and read by the writers (JSON, HDF5, primordial table, plots, terminal summary). Units: reduced Planck units for
/// background quantities, k in 1/Mpc, energies also in GeV where the field name says so.
/// </summary>
/// <param name="Model">The theory that was run.</param>
/// <param name="Settings">Every setting used, flat and ordered, plus typed fields.</param>
/// <param name="Pivot">Exact results at the pivot.</param>
/// <param name="SlowRoll">Slow-roll predictions at the pivot (first order, second order, potential form).</param>
/// <param name="Background">Background samples and markers.</param>
/// <param name="Spectrum">Exact spectrum samples.</param>
/// <param name="SlowRollSpectra">Slow-roll spectra on the same k as <paramref name="Spectrum"/>.</param>
/// <param name="Table">Dense log-spaced (k, P_s, P_t) table for Boltzmann codes.</param>
/// <param name="Flags">Slow-roll disagreement flags (see <see cref="Diagnostics.Flags"/>).</param>
/// <param name="AmplitudeMethod">How the potential was normalised to A_s ("exact" or "slow-roll-2", see IPivotAmplitude.Name).</param>
/// <param name="Statistics">Timings and counters.</param>
/// <param name="Warnings">Human-readable warnings collected during the run, one line each.</param>
public sealed record RunReport(
    ModelInfo Model,
    ReportSettings Settings,
    PivotResults Pivot,
    PivotSlowRoll SlowRoll,
    BackgroundSamples Background,
    SpectrumSamples Spectrum,
    SlowRollSpectra SlowRollSpectra,
    PrimordialTable Table,
    ImmutableArray<Flag> Flags,
    string AmplitudeMethod,
    RunStatistics Statistics,
    ImmutableArray<string> Warnings)
{
    /// <summary>T_reh, rho_end^(1/4) and r at 0.002 /Mpc; null when the producer did not derive them.</summary>
    public DerivedQuantities? Derived { get; init; }

    /// <summary>The isocurvature of an n-field run (P_S, C_RS, cos Delta, beta_iso, T_RS at the pivot and per k); null for one field.</summary>
    public IsocurvatureResults? Isocurvature { get; init; }

    /// <summary>The n-field trajectory kinematics and delta N at the pivot; null for one field.</summary>
    public MultiFieldResults? MultiField { get; init; }

    /// <summary>The one-field model with the `[compare] freeze` fields held at their pivot-exit values; null when not asked.</summary>
    public FrozenComparison? Frozen { get; init; }

    /// <summary>Distance to the data, peak summary, induced GWs and black holes; null when the run computed none.</summary>
    public Observables.ObservablesReport? Observables { get; init; }

    /// <summary>f_NL at the pivot, the equilateral curve and the shape grid; null when the run computed no bispectrum.</summary>
    public Bispectrum.BispectrumReport? Bispectrum { get; init; }

    /// <summary>Generator name and version written into every file; defaults to this assembly's informational version.</summary>
    public string Generator { get; init; } = DefaultGenerator;

    /// <summary>"modesolver &lt;informational version&gt;" of the library assembly.</summary>
    public static string DefaultGenerator { get; } = "modesolver " + LibraryVersion;

    /// <summary>Informational version of the ModeSolver library assembly (no build metadata).</summary>
    public static string LibraryVersion
    {
        get
        {
            var asm = typeof(RunReport).Assembly;
            var info = asm.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion
                       ?? asm.GetName().Version?.ToString() ?? "0.0.0";
            int plus = info.IndexOf('+');
            return plus >= 0 ? info[..plus] : info;
        }
    }
}

/// <summary>Formulation of the theory as entered by the user (physics.md section 1).</summary>
public enum TheoryFrame
{
    /// <summary>Einstein frame: V and K given directly.</summary>
    Einstein,
    /// <summary>Jordan frame, metric formulation.</summary>
    JordanMetric,
    /// <summary>Jordan frame, Palatini formulation.</summary>
    JordanPalatini,
}

/// <summary>Helpers for <see cref="TheoryFrame"/>.</summary>
public static class TheoryFrameText
{
    /// <summary>File and screen code: "einstein", "jordan-metric" or "jordan-palatini".</summary>
    public static string Code(this TheoryFrame frame) => frame switch
    {
        TheoryFrame.Einstein => "einstein",
        TheoryFrame.JordanMetric => "jordan-metric",
        TheoryFrame.JordanPalatini => "jordan-palatini",
        _ => throw new ArgumentOutOfRangeException(nameof(frame), frame, "unknown theory frame"),
    };
}

/// <summary>The theory that was run.</summary>
/// <param name="Id">Catalogue id of the model, or "formula" for a user formula.</param>
/// <param name="Description">One-line description.</param>
/// <param name="Potential">Formula text of V (Jordan-frame V_J when the frame is Jordan).</param>
/// <param name="Kinetic">Formula text of K (or K_J); "1" when canonical.</param>
/// <param name="ConformalFactor">Formula text of Omega^2; null in the Einstein frame.</param>
/// <param name="Parameters">Parameters in the order the user gave them.</param>
/// <param name="Frame">Formulation.</param>
public sealed record ModelInfo(
    string Id,
    string Description,
    string Potential,
    string Kinetic,
    string? ConformalFactor,
    ImmutableArray<ModelParameter> Parameters,
    TheoryFrame Frame);

/// <summary>One setting as used by the run: key and value rendered as a string (invariant culture).</summary>
/// <param name="Key">Deck-style key, e.g. "pivot.k".</param>
/// <param name="Value">The value as text (numbers in round-trip form).</param>
/// <param name="IsNumber">True when the value is a number: JSON writes it as a number, HDF5 as a float64 attribute.</param>
public sealed record Setting(string Key, string Value, bool IsNumber = false);

/// <summary>Every setting used by the run.</summary>
/// <param name="Entries">Flat, ordered (key, value) list: this is what the files record.</param>
/// <param name="FlagSettings">Thresholds the flags were computed with.</param>
public sealed record ReportSettings(ImmutableArray<Setting> Entries, FlagSettings FlagSettings)
{
    /// <summary>Value of the first entry with the given key, or null.</summary>
    public string? Get(string key)
    {
        foreach (var e in Entries)
            if (e.Key == key) return e.Value;
        return null;
    }
}


/// <summary>Wall time of one pipeline stage.</summary>
public sealed record StageTiming(string Stage, double Seconds);

/// <summary>Timings and counters of the run.</summary>
/// <param name="WallSeconds">Total wall time.</param>
/// <param name="Stages">Per-stage wall times, in pipeline order.</param>
/// <param name="ModeCount">Number of k modes integrated.</param>
/// <param name="RhsEvaluations">Total right-hand-side evaluations over all modes.</param>
/// <param name="Workers">Threads or ranks used.</param>
public sealed record RunStatistics(double WallSeconds, ImmutableArray<StageTiming> Stages, int ModeCount, long RhsEvaluations, int Workers);

/// <summary>Consistency checks of a <see cref="RunReport"/> before anything is written.</summary>
public static class RunReportChecks
{
    /// <summary>
    /// Throws <see cref="ArgumentException"/> with a one-line message naming the first problem: an array left
    /// default (use ImmutableArray&lt;T&gt;.Empty), arrays of one group with different lengths, or k / N not increasing.
    /// </summary>
    public static void Validate(RunReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var b = report.Background;
        Same("background", ("N", b.N), ("phi", b.Phi), ("dphi", b.DPhi), ("H", b.H), ("epsilon_1", b.Epsilon1),
            ("epsilon_2", b.Epsilon2), ("epsilon_3", b.Epsilon3));
        NotDefault("background.epsilon_1_crossings", b.Epsilon1Crossings);
        Increasing("background.N", b.N);
        var s = report.Spectrum;
        Same("spectrum", ("k", s.K), ("P_s", s.Ps), ("P_t", s.Pt), ("r", s.R), ("n_s", s.Ns), ("n_t", s.Nt),
            ("alpha_s", s.AlphaS), ("rel_error", s.RelError));
        Increasing("spectrum.k", s.K);
        var sr = report.SlowRollSpectra;
        Same("slow-roll spectra", ("k", sr.K), ("P_s first order", sr.PsFirstOrder), ("P_t first order", sr.PtFirstOrder),
            ("P_s second order", sr.PsSecondOrder), ("P_t second order", sr.PtSecondOrder),
            ("n_s first order", sr.NsFirstOrder), ("n_s second order", sr.NsSecondOrder));
        if (sr.K.Length != s.K.Length)
            throw new ArgumentException($"run report: slow-roll spectra have {sr.K.Length} k values but the exact spectrum has {s.K.Length}");
        Same("table", ("k", report.Table.K), ("P_s", report.Table.Ps), ("P_t", report.Table.Pt));
        Increasing("table.k", report.Table.K);
        if (report.Isocurvature is { } iso)
            Same("isocurvature", ("k", iso.K), ("P_S", iso.Ps), ("C_RS", iso.Crs), ("cos_delta", iso.CosDelta), ("beta_iso", iso.BetaIso),
                ("T_RS", iso.Trs), ("P_R_exit", iso.PrExit));
        if (report.MultiField is { } mf)
        {
            var t = mf.Trajectory;
            Same("trajectory", ("N", t.N), ("epsilon_1", t.Epsilon1), ("eta_perp", t.TurnRate), ("m_s2_over_H2", t.EntropicMass), ("R_fs", t.RicciScalar));
            Increasing("trajectory.N", t.N);
            if (t.FieldNames.IsDefault || t.Fields.IsDefault || t.Velocities.IsDefault
                || t.Fields.Length != t.N.Length * t.FieldCount || t.Velocities.Length != t.N.Length * t.FieldCount)
                throw new ArgumentException($"run report: trajectory fields and velocities must hold {t.N.Length} rows of {t.FieldCount} values");
        }
        if (report.Flags.IsDefault) throw new ArgumentException("run report: flags array is default (use an empty array)");
        if (report.Warnings.IsDefault) throw new ArgumentException("run report: warnings array is default (use an empty array)");
        if (report.Settings.Entries.IsDefault) throw new ArgumentException("run report: settings array is default (use an empty array)");
        if (report.Model.Parameters.IsDefault) throw new ArgumentException("run report: model parameters array is default (use an empty array)");
        if (report.Statistics.Stages.IsDefault) throw new ArgumentException("run report: stage timings array is default (use an empty array)");
    }

    private static void NotDefault(string name, ImmutableArray<double> a)
    {
        if (a.IsDefault) throw new ArgumentException($"run report: {name} is default (use an empty array)");
    }

    private static void Same(string group, params (string Name, ImmutableArray<double> Values)[] arrays)
    {
        foreach (var (name, values) in arrays) NotDefault($"{group}.{name}", values);
        int n = arrays[0].Values.Length;
        foreach (var (name, values) in arrays)
            if (values.Length != n)
                throw new ArgumentException($"run report: {group} arrays differ in length ({arrays[0].Name} has {n}, {name} has {values.Length})");
    }

    private static void Increasing(string name, ImmutableArray<double> a)
    {
        for (int i = 1; i < a.Length; i++)
            if (!(a[i] > a[i - 1]))
                throw new ArgumentException($"run report: {name} is not strictly increasing at index {i}");
    }
}
