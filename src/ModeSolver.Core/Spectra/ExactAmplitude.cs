using ModeSolver.Background;
using ModeSolver.Matching;
using ModeSolver.Perturbations;

namespace ModeSolver.Spectra;

/// <summary>The pivot amplitude from one exact scalar mode (no slow-roll approximation); for normalisation and the N_* iteration.</summary>
public sealed class ExactAmplitude : IPivotAmplitude
{
    private readonly ModeSettings _settings;

    /// <summary>Uses a scalar-only mode at <paramref name="tolerance"/> relative accuracy (default 1e-6).</summary>
    public ExactAmplitude(double tolerance = 1e-6)
    {
        _settings = new ModeSettings { Tolerance = tolerance, Kinds = ModeKinds.Scalar, Derivatives = false };
        _settings.Validate();
    }

    /// <inheritdoc />
    public string Name => "exact";

    /// <inheritdoc />
    public double ScalarPower(IBackground background, double kBackgroundUnits) =>
        new ModeIntegrator().Solve(background, kBackgroundUnits, _settings).Ps;
}

/// <summary>Exact observables at one k (background units).</summary>
/// <param name="K">Wavenumber.</param>
/// <param name="Ps">Scalar power.</param>
/// <param name="Pt">Tensor power.</param>
/// <param name="Ns">Scalar index.</param>
/// <param name="Nt">Tensor index.</param>
/// <param name="R">Tensor-to-scalar ratio.</param>
/// <param name="AlphaS">Running of the scalar index.</param>
/// <param name="ErrorEstimate">Estimated relative error of P.</param>
/// <param name="RhsEvaluations">Work of the mode integration (the check at a tighter tolerance not counted).</param>
public sealed record PivotValues(double K, double Ps, double Pt, double Ns, double Nt, double R, double AlphaS, double ErrorEstimate, int RhsEvaluations)
{
    /// <summary>Estimated absolute error of each quantity (see <see cref="Compute"/>).</summary>
    public PivotErrors Errors { get; init; } = PivotErrors.Unknown;

    /// <summary>k/aH at which the pivot mode started (the check starts there too).</summary>
    public double StartDepth { get; init; } = double.NaN;

    /// <summary>
    /// Deepest start (k/aH) up to which the running from the derivative equations has been checked against fits of
    /// P_s(k): the step deck's pivot mode starts at k/aH ~ 100 and agrees within its error (DerivativeFitTests). Beyond
    /// it the second-derivative block gathers integration error growing with (k/aH)^2 before exit (docs/modes.md), which
    /// the check cannot see because it starts at the same depth (measured: alpha_s off by 0.8 at k/aH ~ 1200 on a
    /// resonant feature).
    /// </summary>
    public const double RunningDepthLimit = 300;

    /// <summary>The warning line of a pivot mode started deeper than <see cref="RunningDepthLimit"/>, else null.</summary>
    public string? DeepStartWarning() => StartDepth > RunningDepthLimit
        ? string.Create(System.Globalization.CultureInfo.InvariantCulture,
            $"alpha_s: the pivot mode had to start at k/aH = {StartDepth:G3} (a feature of the background), deeper than {RunningDepthLimit:G3}; its alpha_s from the derivative equations is not bounded by the stated error there: check it against a fit of P_s(k) around the pivot")
        : null;

    /// <summary>Ratio of the check's mode tolerance to the requested one.</summary>
    internal const double CheckFactor = 0.01;

    /// <summary>Smallest mode tolerance of the check (below it the background's own accuracy, 1e-10, is near).</summary>
    internal const double CheckFloor = 1e-9;

    /// <summary>
    /// Floors of the derivative errors: what the data stencils leave (measured on power law with e1 = 5e-9 and 5e-3,
    /// start depths 4 to 20: n_s - 1 and n_t within 2e-11, alpha_s within 3e-8), with a factor 5 margin; shared by the
    /// check, so a difference cannot see them.
    /// </summary>
    internal const double SlopeFloor = 1e-10, RunningFloor = 1.5e-7;

    /// <summary>
    /// Computes the values from one scalar+tensor mode with derivatives at <paramref name="tolerance"/> (default 1e-6),
    /// and their errors: the mode is re-run 100x tighter (deeper start, smaller steps, later stop; tolerance at least
    /// 1e-9), and each error is twice the change plus the mode's own estimate (A_s, r) or the stencil floor (indices).
    /// </summary>
    public static PivotValues Compute(IBackground background, double k, double tolerance = 1e-6)
    {
        var integrator = new ModeIntegrator();
        var m = integrator.Solve(background, k, new ModeSettings { Tolerance = tolerance });
        int work = m.RhsEvaluations;
        var t = integrator.Solve(background, k, new ModeSettings { Tolerance = Math.Max(tolerance * CheckFactor, Math.Min(tolerance, CheckFloor)) });
        var errors = new PivotErrors(
            As: m.Ps * (m.ErrorEstimate + 2.0 * Math.Abs(m.Ps / t.Ps - 1.0)),
            Ns: 2.0 * Math.Abs(m.Ns - t.Ns) + SlopeFloor,
            AlphaS: 2.0 * Math.Abs(m.AlphaS - t.AlphaS) + RunningFloor,
            R: Math.Abs(m.R) * (2.0 * m.ErrorEstimate + 2.0 * Math.Abs(m.R / t.R - 1.0)),
            Nt: 2.0 * Math.Abs(m.Nt - t.Nt) + SlopeFloor);
        return new PivotValues(k, m.Ps, m.Pt, m.Ns, m.Nt, m.R, m.AlphaS, m.ErrorEstimate, work) { Errors = errors, StartDepth = m.StartDepth };
    }
}
