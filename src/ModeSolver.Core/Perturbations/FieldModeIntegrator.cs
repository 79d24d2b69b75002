using ModeSolver.Background;
using ModeSolver.Integrators;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Integrates one Fourier mode of an n-field theory: the n x n covariant system (<see cref="FieldModeSystem"/>) and
/// the tensor mode (<see cref="TensorModeSystem"/>, as in single field) run by the same <see cref="ModeDriver"/> on the
/// adiabatic view of the background (<see cref="AdiabaticBackground"/>): the driver's start policy, horizon exit and
/// stop depth are those of single field; a mode stops once R is frozen and the isocurvature has decayed to the
/// tolerance, else at the end of inflation. On the way the state is kept at <see cref="ExitEFolds"/> e-folds after
/// horizon exit for the transfer function T_RS. No k-derivatives are carried: slopes are finite differences
/// (Spectra/FieldSlopes.cs). A reusable, single-threaded workspace bound to one n-field background (any of its
/// rescaled views): keep one per thread.
/// </summary>
public sealed class FieldModeIntegrator
{
    /// <summary>
    /// E-folds after horizon exit (k = aH) at which P_R "at exit" is read for T_RS: k/aH = e^-3 = 0.05 there, and the de
    /// Sitter decay |R|^2 proportional to 1 + (k/aH)^2 is divided out; what is left of the sub-horizon evolution is of
    /// order epsilon (k/aH)^2, a few 1e-5 of P_R, so T_RS below about 1e-2 is not resolved.
    /// </summary>
    public const double ExitEFolds = 3.0;

    /// <summary>
    /// Shallowest start k/aH of an n-field mode (the single-field default is 4 to 20). The Bunch-Davies data leave out
    /// the couplings between the frame directions, an error falling roughly as 1/(k/aH)^1.5 at the start: measured on a
    /// strongly turning double quadratic (masses 1 and 1/3, T_RS = 0.9) P_R off by 1.6e-5, 1.6e-6, 4e-7, 1e-7 at start
    /// depths 10, 50, 100, 300 (mode tolerance 1e-6; reference 1e-10 from depth 1000). The checks that bound the error
    /// re-run modes 4x deeper (<see cref="CheckDepthFactor"/>), so that this error is part of what they measure.
    /// </summary>
    public const double MinimumStartDepth = 50;

    /// <summary>How much deeper the error checks of n-field modes start than the mode they check.</summary>
    public const double CheckDepthFactor = 4;

    /// <summary>
    /// The start depth of the check of a mode of <paramref name="k"/> that started at <paramref name="depth"/>:
    /// <see cref="CheckDepthFactor"/> times deeper, but no deeper than 0.95 of k/aH at the background's start.
    /// </summary>
    public static double CheckDepth(IBackground background, double k, double depth)
    {
        ArgumentNullException.ThrowIfNull(background);
        double available = k / (Math.Exp(background.NStart) * background.At(background.NStart).H);
        return Math.Max(depth, Math.Min(CheckDepthFactor * depth, 0.95 * available));
    }

    /// <summary>The start depth an n-field mode uses by default at <paramref name="settings"/>' tolerance.</summary>
    public static double StartDepthFor(ModeSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        return settings.StartDepth != 0 ? settings.StartDepth : Math.Max(settings.EffectiveStartDepth, MinimumStartDepth);
    }

    private readonly ModeDriver _driver;
    private readonly FieldModeSystem _fields;
    private readonly IModeSystem[] _both, _scalar;
    private readonly AdiabaticBackground _background;

    /// <summary>A workspace for the modes of <paramref name="background"/> (or any rescaled view of it).</summary>
    public FieldModeIntegrator(AdiabaticBackground background, IOdeMethod? method = null)
    {
        ArgumentNullException.ThrowIfNull(background);
        _background = background;
        _driver = new ModeDriver(method ?? new DormandPrince853());
        _fields = new FieldModeSystem(background);
        _both = [_fields, new TensorModeSystem()];
        _scalar = [_fields];
    }

    /// <summary>
    /// Integrates the mode <paramref name="k"/> (background units of <paramref name="background"/>, a rescaled view of
    /// this workspace's background). <paramref name="transfer"/> also keeps P_R at exit (T_RS). Throws
    /// <see cref="PhysicsException"/> when the background cannot serve k or has non-smooth points during inflation.
    /// </summary>
    public FieldModeResult Solve(AdiabaticBackground background, double k, ModeSettings settings, bool transfer = true, FrictionScan? scan = null)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        if (!ReferenceEquals(background.Fields, _background.Fields))
            throw new ArgumentException("the background is not a view of this workspace's n-field background", nameof(background));
        foreach (double t in background.NonSmoothTimes)
            if (t < background.NEnd)
                throw new PhysicsException($"the n-field perturbations cannot cross the non-smooth point at N = {t - background.NStart:G6} e-folds after the start (a kink of V puts a delta function into the mass matrix); use a smooth potential");
        var ms = settings.Derivatives ? settings with { Derivatives = false } : settings;
        if (ms.StartDepth == 0) ms = ms with { StartDepth = StartDepthFor(ms) };
        var systems = (ms.Kinds & ModeKinds.Tensor) != 0 ? _both : _scalar;
        double nExit = transfer ? background.NAtHorizonExit(k) : double.NaN;
        _driver.SnapshotN = nExit + ExitEFolds;
        var run = _driver.Solve(background, k, ms, systems, scan);
        double lnK = Math.Log(k), lnRef = _driver.LnRef;
        var ctx = _driver.Context;
        var blockF = ctx.Layout[0];
        var end = _fields.Spectra(blockF.Of(_driver.State), Math.Min(run.NFinal, background.NStop), lnK, lnRef);
        double pt = double.NaN;
        if (systems.Length > 1)
        {
            Span<ModePower> powers = stackalloc ModePower[2];
            _driver.Powers(run, powers);
            pt = powers[1].P;
        }
        double prExit = double.NaN;
        if (_driver.SnapshotTaken)
        {
            double ns = nExit + ExitEFolds;
            var ex = _fields.Spectra(blockF.Of(_driver.Snapshot), ns, lnK, lnRef);
            double x = Math.Exp(lnK - ns) / background.At(ns).H;
            prExit = ex.Pr / (1.0 + x * x);
        }
        double tsq = end.Pr / prExit - 1.0;
        return new FieldModeResult(k, end.Pr, end.Ps, end.Crs, pt, prExit, double.IsNaN(tsq) ? double.NaN : Math.Sqrt(Math.Max(0.0, tsq)),
            run.NStart, run.NFinal, run.StartDepth, run.FinalDepth, run.Frozen, _driver.RhsEvaluations, _driver.Steps, run.ErrorEstimate);
    }

    /// <summary>Right-hand-side evaluations of the last integration.</summary>
    public int RhsEvaluations => _driver.RhsEvaluations;
}

/// <summary>One n-field mode at the stop (background units).</summary>
/// <param name="K">Wavenumber.</param>
/// <param name="Pr">P_R (the scalar power P_s).</param>
/// <param name="Ps">P_S, the isocurvature power.</param>
/// <param name="Crs">C_RS, the cross-spectrum (NaN for n &gt; 2).</param>
/// <param name="Pt">P_t (NaN when tensors were off).</param>
/// <param name="PrExit">P_R read <see cref="FieldModeIntegrator.ExitEFolds"/> after horizon exit, de Sitter decay divided out (NaN when not kept).</param>
/// <param name="Trs">T_RS from P_R(end) = P_R(exit)(1 + T_RS^2) (physics.md 7), 0 when P_R fell.</param>
/// <param name="NStart">N of the start.</param>
/// <param name="NFinal">N of the stop.</param>
/// <param name="StartDepth">k/aH at the start.</param>
/// <param name="FinalDepth">k/aH at the stop.</param>
/// <param name="Frozen">True when R froze and S decayed before the end of inflation.</param>
/// <param name="RhsEvaluations">Right-hand sides used.</param>
/// <param name="Steps">Accepted plus rejected steps.</param>
/// <param name="ErrorEstimate">The driver's a-priori relative error estimate of the powers.</param>
public readonly record struct FieldModeResult(double K, double Pr, double Ps, double Crs, double Pt, double PrExit, double Trs,
    double NStart, double NFinal, double StartDepth, double FinalDepth, bool Frozen, int RhsEvaluations, int Steps, double ErrorEstimate)
{
    /// <summary>cos Delta = C_RS / sqrt(P_R P_S).</summary>
    public double CosDelta => Crs / Math.Sqrt(Pr * Ps);

    /// <summary>beta_iso = P_S / (P_R + P_S).</summary>
    public double BetaIso => Ps / (Pr + Ps);
}
