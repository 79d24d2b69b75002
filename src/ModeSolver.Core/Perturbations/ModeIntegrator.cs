using System.Numerics;
using ModeSolver.Background;
using ModeSolver.Integrators;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Integrates one Fourier mode of the scalar (zeta) and tensor (h = 2u/a) perturbations in e-folds, with their first
/// and second derivatives with respect to ln k (sensitivity equations), from local-index Hankel Bunch-Davies data to
/// freeze-out. Equations (physics.md 3):
///   zeta'' + (3 - e1 + e2) zeta' + x^2 zeta = 0,  h'' + (3 - e1) h' + x^2 h = 0,  x = k/(aH);
/// each is a mode system (<see cref="CurvatureModeSystem"/>, <see cref="TensorModeSystem"/>) run by one
/// <see cref="ModeDriver"/> (start, segments across non-smooth points, freeze-out, error estimate).
/// The k-derivatives are carried in scale-subtracted form (<see cref="ScaleSubtractedBlocks"/>): W1 = D zeta with
/// D = d/dln k + d/dN + 3/2, which vanishes in de Sitter, and Y2 = d W1/dln k; both of slow-roll size.
/// A reusable, single-threaded workspace: keep one per thread. The right-hand side does not allocate.
/// </summary>
public sealed class ModeIntegrator
{
    private readonly ModeDriver _driver;
    private readonly IModeSystem[] _both, _scalar, _tensor;

    /// <summary>A workspace integrating with <paramref name="method"/> (default: the library's DOP853, which needs the
    /// fewest right-hand sides here; see notes/modes.md).</summary>
    public ModeIntegrator(IOdeMethod? method = null)
    {
        _driver = new ModeDriver(method ?? new DormandPrince853());
        var zeta = new CurvatureModeSystem();
        var tensor = new TensorModeSystem();
        _both = [zeta, tensor];
        _scalar = [zeta];
        _tensor = [tensor];
    }

    /// <summary>Right-hand-side evaluations of the last integration.</summary>
    public int RhsEvaluations => _driver.RhsEvaluations;

    /// <summary>
    /// Use the oscillatory-regime propagator for modes that start deep inside the horizon. Off by default until the
    /// demo decks and catalogue runs have been compared with it on (feature-deepened starts would use it).
    /// </summary>
    internal bool UseOscillatoryRegime
    {
        get => _driver.UseOscillatoryRegime;
        init => _driver.UseOscillatoryRegime = value;
    }

    /// <summary>Largest missed feature excitation (relative) whose first-order bound is still reported as a bound.</summary>
    internal const double MissedExcitationLimit = ModeDriver.MissedExcitationLimit;

    /// <summary>A mode starts at k/aH of at least this many times the background's oscillation frequency per e-fold (<see cref="StartPolicy"/>).</summary>
    internal const double ResonanceStartFactor = StartPolicy.ResonanceStartFactor;

    /// <summary>
    /// Integrates the mode <paramref name="k"/> to freeze-out (or NEnd) and returns P_s, P_t and their exact log-derivatives.
    /// <paramref name="scan"/> may be shared between modes of one background (built on demand when null).
    /// Throws <see cref="PhysicsException"/> when the background cannot serve k (cannot start deep enough, or k has not
    /// left the horizon far enough by the end of inflation).
    /// </summary>
    public ModeResult Solve(IBackground background, double k, ModeSettings settings, FrictionScan? scan = null)
    {
        var systems = SystemsFor(settings);
        var run = _driver.Solve(background, k, settings, systems, scan);
        Span<ModePower> powers = stackalloc ModePower[systems.Length];
        _driver.Powers(run, powers);
        var s = systems == _tensor ? ModePower.None : powers[0];
        var t = systems == _scalar ? ModePower.None : powers[systems.Length - 1];
        return new ModeResult(k, s.P, t.P, s.Slope, s.Running, t.Slope, run.NStart, run.NFinal, run.StartDepth, run.FinalDepth,
            run.Frozen, _driver.RhsEvaluations, _driver.Steps, run.ErrorEstimate)
        { AlphaT = t.Running, StartedInFeature = run.StartedInFeature };
    }

    /// <summary>Integrates the mode from its start to <paramref name="nTarget"/> (no stop) and returns zeta, zeta', h, h' there (unscaled).</summary>
    public ModeSnapshot EvolveTo(IBackground background, double k, double nTarget, ModeSettings settings)
    {
        var systems = SystemsFor(settings);
        double n = _driver.EvolveTo(background, k, nTarget, settings, systems);
        Complex z = Complex.NaN, dz = Complex.NaN, h = Complex.NaN, dh = Complex.NaN;
        var ctx = _driver.Context;
        var y = _driver.State;
        for (int i = 0; i < ctx.SystemCount; i++)
        {
            var (v, d) = ctx.System(i).Amplitude(ctx.Layout[i].Of(y), _driver.LnRef);
            if (ctx.System(i) is CurvatureModeSystem) (z, dz) = (v, d);
            else if (ctx.System(i) is TensorModeSystem) (h, dh) = (v, d);
        }
        return new ModeSnapshot(k, n, z, dz, h, dh, _driver.RhsEvaluations);
    }

    private IModeSystem[] SystemsFor(ModeSettings settings)
    {
        var kinds = settings?.Kinds ?? ModeKinds.Both; // null settings: the driver refuses them
        bool scalar = (kinds & ModeKinds.Scalar) != 0, tensor = (kinds & ModeKinds.Tensor) != 0;
        return scalar && tensor ? _both : scalar ? _scalar : tensor ? _tensor : _both; // neither: Validate refuses it
    }
}

/// <summary>A mode at one instant (unnormalised physical values, background units).</summary>
/// <param name="K">Wavenumber.</param>
/// <param name="N">E-folds.</param>
/// <param name="Zeta">Comoving curvature perturbation zeta_k = v_k / z.</param>
/// <param name="DZeta">d zeta / dN.</param>
/// <param name="H">Tensor amplitude h = 2u/a of one polarisation.</param>
/// <param name="DH">dh/dN.</param>
/// <param name="RhsEvaluations">Work so far.</param>
public readonly record struct ModeSnapshot(double K, double N, Complex Zeta, Complex DZeta, Complex H, Complex DH, int RhsEvaluations);
