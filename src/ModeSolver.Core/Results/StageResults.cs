using ModeSolver.Estimates;
using System.Collections.Immutable;

namespace ModeSolver.Results;

/// <summary>Exact results at the pivot.</summary>
/// <param name="Ns">Scalar spectral index n_s.</param>
/// <param name="AlphaS">Running alpha_s = d n_s / d ln k.</param>
/// <param name="R">Tensor-to-scalar ratio r.</param>
/// <param name="Nt">Tensor index n_t.</param>
/// <param name="As">Scalar amplitude A_s = P_s(k_*).</param>
/// <param name="KPivot">Pivot wavenumber k_* in 1/Mpc.</param>
/// <param name="NStar">e-folds between pivot exit and the end of inflation, N_*.</param>
/// <param name="PhiStar">Field value at pivot exit (input field, M_pl).</param>
/// <param name="HStar">Hubble rate at pivot exit in M_pl.</param>
/// <param name="EnergyScaleGeV">V_*^(1/4) in GeV.</param>
/// <param name="VScale">Factor applied to the potential to reach the target A_s (1 if not normalised).</param>
/// <param name="NTotal">Total e-folds of inflation integrated (start to the last end of inflation).</param>
/// <param name="NReh">e-folds of reheating; 0 for instantaneous reheating; NaN when N_* was given directly.</param>
/// <param name="MaxRelError">Largest estimated relative error of the exact spectrum samples.</param>
/// <param name="RhsEvaluationsPerMode">Mean number of right-hand-side evaluations per mode.</param>
public sealed record PivotResults(
    double Ns,
    double AlphaS,
    double R,
    double Nt,
    double As,
    double KPivot,
    double NStar,
    double PhiStar,
    double HStar,
    double EnergyScaleGeV,
    double VScale,
    double NTotal,
    double NReh,
    double MaxRelError,
    double RhsEvaluationsPerMode)
{
    /// <summary>H_* in GeV (H_* times the reduced Planck mass, physics.md section 0).</summary>
    public double HStarGeV => HStar * Physics.Constants.ReducedPlanckMassGeV;

    /// <summary>Estimated absolute error of each exact pivot quantity (NaN when not estimated).</summary>
    public Spectra.PivotErrors Errors { get; init; } = Spectra.PivotErrors.Unknown;

    /// <summary>False when <see cref="MaxRelError"/> exceeds the requested tolerance (the run then warns).</summary>
    public bool ToleranceMet { get; init; } = true;
}

/// <summary>
/// Slow-roll predictions at the pivot (physics.md section 4c), each the Estimates stage's
/// <see cref="SlowRollPrediction"/> (A_s is its P_s); quantities an approximation does not give are NaN.
/// </summary>
public sealed record PivotSlowRoll(SlowRollPrediction FirstOrder, SlowRollPrediction SecondOrder, SlowRollPrediction Potential);

/// <summary>Background samples (all arrays the same length, increasing N) and markers.</summary>
/// <param name="N">e-folds N = ln a.</param>
/// <param name="Phi">Field (input field, M_pl).</param>
/// <param name="DPhi">d phi / dN.</param>
/// <param name="H">Hubble rate in M_pl (after normalisation).</param>
/// <param name="Epsilon1">epsilon_1.</param>
/// <param name="Epsilon2">epsilon_2.</param>
/// <param name="Epsilon3">epsilon_3.</param>
/// <param name="NEnd">N at the end of inflation (the epsilon_1 = 1 crossing used).</param>
/// <param name="NPivot">N coordinate (since the start) at which the pivot exits (k_* = aH); N_star = NEnd - NPivot.</param>
/// <param name="WindowStart">N at which k_min exits the horizon.</param>
/// <param name="WindowEnd">N at which k_max exits the horizon.</param>
/// <param name="Epsilon1Crossings">Every N where epsilon_1 crosses 1, in order.</param>
/// <param name="ContinuationStop">Why the continuation after the end stopped early as expected (fast oscillations), or null.</param>
public sealed record BackgroundSamples(
    ImmutableArray<double> N,
    ImmutableArray<double> Phi,
    ImmutableArray<double> DPhi,
    ImmutableArray<double> H,
    ImmutableArray<double> Epsilon1,
    ImmutableArray<double> Epsilon2,
    ImmutableArray<double> Epsilon3,
    double NEnd,
    double NPivot,
    double WindowStart,
    double WindowEnd,
    ImmutableArray<double> Epsilon1Crossings,
    string? ContinuationStop = null);

/// <summary>Exact spectrum samples, increasing k (all arrays the same length).</summary>
/// <param name="K">k in 1/Mpc.</param>
/// <param name="Ps">Scalar power P_s.</param>
/// <param name="Pt">Tensor power P_t (both polarisations).</param>
/// <param name="R">r = P_t/P_s.</param>
/// <param name="Ns">n_s(k).</param>
/// <param name="Nt">n_t(k).</param>
/// <param name="AlphaS">alpha_s(k).</param>
/// <param name="RelError">Estimated relative error of P_s at each k.</param>
public sealed record SpectrumSamples(
    ImmutableArray<double> K,
    ImmutableArray<double> Ps,
    ImmutableArray<double> Pt,
    ImmutableArray<double> R,
    ImmutableArray<double> Ns,
    ImmutableArray<double> Nt,
    ImmutableArray<double> AlphaS,
    ImmutableArray<double> RelError)
{
    /// <summary>The requested relative tolerance (NaN when unknown): plots mark the k where <see cref="RelError"/> exceeds it.</summary>
    public double Tolerance { get; init; } = double.NaN;

    /// <summary>False at the k where <see cref="RelError"/> is not a bound (empty: bounded everywhere).</summary>
    public ImmutableArray<bool> ErrorBounded { get; init; } = ImmutableArray<bool>.Empty;

    /// <summary>True at sample <paramref name="i"/> when its error is above the tolerance or not bounded.</summary>
    public bool Unreliable(int i) =>
        (!ErrorBounded.IsDefaultOrEmpty && !ErrorBounded[i]) || (double.IsFinite(Tolerance) && !(RelError[i] <= Tolerance));
}

/// <summary>Slow-roll spectra on the k of <see cref="SpectrumSamples"/> (each evaluated at that mode's horizon exit).</summary>
public sealed record SlowRollSpectra(
    ImmutableArray<double> K,
    ImmutableArray<double> PsFirstOrder,
    ImmutableArray<double> PtFirstOrder,
    ImmutableArray<double> PsSecondOrder,
    ImmutableArray<double> PtSecondOrder,
    ImmutableArray<double> NsFirstOrder,
    ImmutableArray<double> NsSecondOrder);

/// <summary>Dense log-spaced primordial table for Boltzmann codes: k in 1/Mpc, P_s, P_t.</summary>
public sealed record PrimordialTable(ImmutableArray<double> K, ImmutableArray<double> Ps, ImmutableArray<double> Pt)
{
    /// <summary>When set, the table file gives k in h/Mpc with this dimensionless Hubble parameter h (K stays in 1/Mpc).</summary>
    public double? H { get; init; }
}
