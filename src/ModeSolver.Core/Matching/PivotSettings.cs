using ModeSolver.Physics;

namespace ModeSolver.Matching;

/// <summary>
/// Reheating as a fluid of constant equation of state w from the end of inflation to the reheating temperature
/// (physics.md section 5). Give either the temperature or the number of e-folds; instantaneous by default.
/// </summary>
public sealed record ReheatingHistory
{
    /// <summary>Equation of state during reheating, -1/3 &lt; w &lt;= 1.</summary>
    public double W { get; init; } = 1.0 / 3.0;

    /// <summary>Reheating temperature in GeV (null when <see cref="NReh"/> is given or reheating is instantaneous).</summary>
    public double? TRehGeV { get; init; }

    /// <summary>E-folds of reheating (null when <see cref="TRehGeV"/> is given or reheating is instantaneous).</summary>
    public double? NReh { get; init; }

    /// <summary>True when rho_reh = rho_end.</summary>
    public bool IsInstantaneous => TRehGeV is null && NReh is null;

    /// <summary>Instantaneous reheating: rho_reh = rho_end, N_reh = 0.</summary>
    public static ReheatingHistory Instantaneous { get; } = new();

    /// <summary>Reheating with equation of state w ending at temperature T_reh (GeV).</summary>
    public static ReheatingHistory WithTemperature(double w, double tRehGeV) => new() { W = w, TRehGeV = tRehGeV };

    /// <summary>Reheating with equation of state w lasting N_reh e-folds.</summary>
    public static ReheatingHistory WithEFolds(double w, double nReh) => new() { W = w, NReh = nReh };

    /// <summary>Lowest reheating temperature accepted, 4e-3 GeV (nucleosynthesis needs a few MeV; common practice). The deck check uses this same value.</summary>
    public const double MinimumTemperatureGeV = 4e-3;
}

/// <summary>How to place the pivot and normalise the potential.</summary>
public sealed record PivotSettings
{
    /// <summary>Pivot wavenumber k_* in 1/Mpc.</summary>
    public double KPivot { get; init; } = Constants.DefaultPivotK;

    /// <summary>When set, N_* is this number of e-folds before the end and the reheating history is not used.</summary>
    public double? EFolds { get; init; }

    /// <summary>The reheating history that fixes N_* when <see cref="EFolds"/> is not given.</summary>
    public ReheatingHistory Reheating { get; init; } = ReheatingHistory.Instantaneous;

    /// <summary>Relativistic degrees of freedom at reheating, g_reh.</summary>
    public double GReh { get; init; } = Constants.DefaultReheatingDof;

    /// <summary>Entropy degrees of freedom at reheating, g_s,reh.</summary>
    public double GsReh { get; init; } = Constants.DefaultReheatingDof;

    /// <summary>CMB temperature today in GeV.</summary>
    public double T0GeV { get; init; } = Constants.CmbTemperatureGeV;

    /// <summary>Entropy degrees of freedom today.</summary>
    public double Gs0 { get; init; } = Constants.EntropyDofToday;

    /// <summary>Target scalar amplitude at the pivot; null keeps the background's V scale (no normalisation).</summary>
    public double? ScalarAmplitude { get; init; } = Constants.DefaultScalarAmplitude;

    /// <summary>Accuracy of N_* from the reheating history: the root is bracketed to this width, e-folds.</summary>
    public double Tolerance { get; init; } = 1e-6;

    /// <summary>Budget of amplitude evaluations of the matching.</summary>
    public int MaxIterations { get; init; } = 100;

    /// <summary>First guess of N_*.</summary>
    public double InitialEFolds { get; init; } = 55;

    /// <summary>The pivot must be at least this deep inside the horizon (k/aH) somewhere after the start.</summary>
    public double PivotStartDepth { get; init; } = 100;

    /// <summary>Depth k/aH at the start used for the served k range in the result.</summary>
    public double RangeStartDepth { get; init; } = 100;

    /// <summary>Depth k/aH at the end of inflation used for the served k range in the result.</summary>
    public double RangeEndDepth { get; init; } = 1e-3;
}
