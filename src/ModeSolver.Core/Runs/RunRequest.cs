using ModeSolver.Diagnostics;
using ModeSolver.Matching;
using ModeSolver.Observables;
using ModeSolver.Physics;

namespace ModeSolver.Runs;

/// <summary>
/// Everything a run needs besides the theory, as plain numbers and Core settings records (no deck strings): the start
/// of the background, the pivot matching (N_* given or from a reheating history) and normalisation, the k range and
/// tolerance of the spectrum, and the options of the report. Field values and k are in the units of the deck: reduced
/// Planck units for phi, 1/Mpc for k.
/// </summary>
public sealed record RunRequest
{
    /// <summary>
    /// Initial field value of a single-field run (ignored when <see cref="StartEfolds"/> is given, except as the guess of
    /// that solve); NaN by default, so an n-field run gives <see cref="Fields0"/> instead.
    /// </summary>
    public double Phi0 { get; init; } = double.NaN;

    /// <summary>Initial values of the n fields in field order (n-field runs; one value stands for <see cref="Phi0"/>).</summary>
    public IReadOnlyList<double>? Fields0 { get; init; }

    /// <summary>Initial d phi^I/dN in field order; null starts on the slow-roll attractor direction -G^IJ V_J / V.</summary>
    public IReadOnlyList<double>? Velocity0 { get; init; }

    /// <summary>The surface g(phi) = 0 where inflation is taken to end; null takes the last epsilon_1 = 1 crossing (or <see cref="PhiEnd"/>).</summary>
    public Models.FieldSurface? EndSurface { get; init; }

    /// <summary>Initial d phi/dN; null starts on the slow-roll attractor.</summary>
    public double? DPhi0 { get; init; }

    /// <summary>Start the background this many e-folds before the end of inflation (solved on the exact background); null starts at <see cref="Phi0"/>.</summary>
    public double? StartEfolds { get; init; }

    /// <summary>Field value where inflation is taken to end; null takes the last epsilon_1 = 1 crossing.</summary>
    public double? PhiEnd { get; init; }

    /// <summary>Pivot scale k_*, 1/Mpc.</summary>
    public double KPivot { get; init; } = Constants.DefaultPivotK;

    /// <summary>N_* given directly (e-folds between the pivot's horizon exit and the end of inflation); null derives it from <see cref="Reheating"/>.</summary>
    public double? PivotEfolds { get; init; }

    /// <summary>Reheating history that fixes N_* when <see cref="PivotEfolds"/> is null.</summary>
    public ReheatingHistory Reheating { get; init; } = ReheatingHistory.Instantaneous;

    /// <summary>Relativistic degrees of freedom at reheating (energy and entropy alike).</summary>
    public double ReheatingDof { get; init; } = Constants.DefaultReheatingDof;

    /// <summary>Target A_s: V is rescaled so that the exact P_s at the pivot equals it; null runs V as given.</summary>
    public double? ScalarAmplitude { get; init; } = Constants.DefaultScalarAmplitude;

    /// <summary>Smallest k of the spectrum, 1/Mpc.</summary>
    public double KMin { get; init; } = 1e-6;

    /// <summary>Largest k of the spectrum, 1/Mpc.</summary>
    public double KMax { get; init; } = 10.0;

    /// <summary>Wavenumbers of the initial log-spaced grid (refined where the spectrum needs it).</summary>
    public int KCount { get; init; } = 120;

    /// <summary>Relative accuracy asked of every P_s and P_t.</summary>
    public double Tolerance { get; init; } = 1e-6;

    /// <summary>
    /// True when <see cref="KMin"/> is a default rather than asked for: a background that cannot serve it starts the
    /// spectrum where it can, with a warning, instead of failing.
    /// </summary>
    public bool KMinIsDefault { get; init; }

    /// <summary>Thresholds of the slow-roll disagreement flags.</summary>
    public FlagSettings Flags { get; init; } = FlagSettings.Default;

    /// <summary>The observables stage (distance to data, peak, induced GWs, black holes); off by default.</summary>
    public ObservablesSettings Observables { get; init; } = ObservablesSettings.Default;

    /// <summary>The reduced Hubble rate h of the primordial table's k in h/Mpc; null writes 1/Mpc.</summary>
    public double? TableH { get; init; }

    /// <summary>Worker threads for the modes (0: all cores).</summary>
    public int Threads { get; init; }

    /// <summary>Number of background samples in the report.</summary>
    public int BackgroundSamples { get; init; } = 1500;

    /// <summary>Points per decade of the primordial table.</summary>
    public int TablePointsPerDecade { get; init; } = 50;

    /// <summary>Warnings found before the run (e.g. while reading its input); they open the report's warning list.</summary>
    public IReadOnlyList<string> Warnings { get; init; } = [];

    /// <summary>Called with a short stage name as the run progresses (for progress displays).</summary>
    public Action<string>? Stage { get; init; }

    /// <summary>The bispectrum stage, or null to skip it.</summary>
    public Bispectrum.BispectrumRequest? Bispectrum { get; init; }
}
