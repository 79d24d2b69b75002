using System.Numerics;
using ModeSolver.Background;
using MathNet.Numerics;
using ModeSolver.Integrators;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Integrates one Fourier mode of the scalar (zeta) and tensor (h = 2u/a) perturbations in e-folds, with their first
/// and second derivatives with respect to ln k (sensitivity equations), from local-index Hankel Bunch-Davies data to
/// freeze-out. Equations (physics.md 3):
///   zeta'' + (3 - e1 + e2) zeta' + x^2 zeta = 0,  h'' + (3 - e1) h' + x^2 h = 0,  x = k/(aH);
/// The k-derivatives are carried in scale-subtracted form (<see cref="ScaleSubtractedBlocks"/>): W1 = D zeta with
/// D = d/dln k + d/dN + 3/2, which vanishes in de Sitter, and Y2 = d W1/dln k; both of slow-roll size.
/// Amplitudes are carried relative to exp(-3N0/2)/sqrt(H0) at the start N0, so no background length under- or overflows them.
/// The zeta form needs no e3 and keeps zeta, zeta' continuous where V_phi jumps (e2 jumps but stays finite).
/// A reusable, single-threaded workspace: keep one per thread. The right-hand side does not allocate.
/// </summary>
public sealed partial class ModeIntegrator
{
    private const int MaxDim = 24;
    private readonly double[] _y = new double[MaxDim];
    private readonly double[] _k1 = new double[MaxDim];
    private readonly IOdeMethod _method;
    private readonly RightHandSide _rhs;
    private readonly StepObserver _observer;

    private IBackground _bg = null!;
    private double _lnK;
    private bool _scalar, _tensor, _derivs;
    private int _dim, _tOff, _blockS, _blockT;
    private int _rhsCount, _steps;
    private double _scaleS = 1, _scaleT = 1;
    // Scales of the derivative blocks (W1/s1, Y2/s2) and the log of the common amplitude reference of the data.
    private double _s1S = 1, _s2S = 1, _s1T = 1, _s2T = 1, _lnRef, _x0;
    // Stop test state of the current mode.
    private double _nStopCandidate, _stopTol;
    private FrictionScan? _scan;
    private double _segLo = double.NegativeInfinity, _segHi = double.PositiveInfinity;
    private bool _frozen;
    private double _stopCorrection;

    /// <summary>A workspace integrating with <paramref name="method"/> (default: the library's DOP853, which needs the
    /// fewest right-hand sides here; see notes/modes.md).</summary>
    public ModeIntegrator(IOdeMethod? method = null)
    {
        _method = method ?? new DormandPrince853();
        _rhs = Rhs;
        _observer = Observe;
    }

    /// <summary>Right-hand-side evaluations of the last integration.</summary>
    public int RhsEvaluations => _rhsCount;

    /// <summary>
    /// Integrates the mode <paramref name="k"/> to freeze-out (or NEnd) and returns P_s, P_t and their exact log-derivatives.
    /// <paramref name="scan"/> may be shared between modes of one background (built on demand when null).
    /// Throws <see cref="PhysicsException"/> when the background cannot serve k (cannot start deep enough, or k has not
    /// left the horizon far enough by the end of inflation).
    /// </summary>
    public ModeResult Solve(IBackground background, double k, ModeSettings settings, FrictionScan? scan = null)
    {
        Setup(background, k, settings);
        scan ??= background is IShapeSharedBackground ? FrictionScan.FromStart(background) : null;
        double xs = settings.EffectiveStartDepth;
        double xStop = settings.EffectiveStopDepth;
        double nEnd = background.NEnd;
        double n0 = StartTime(ref xs, settings.Tolerance, settings.InitialData, scan);
        double xEnd = Math.Exp(_lnK - nEnd) / background.At(nEnd).H;
        if (xEnd > xStop)
            throw new PhysicsException($"mode k = {k:G6} is still at k/aH = {xEnd:G3} at the end of inflation (N = {nEnd:G8}); it must reach k/aH <= {xStop:G3}: the largest k allowed is {k * xStop / xEnd:G6}");
        SetInitialData(n0, settings.InitialData);
        _stopTol = settings.Tolerance;
        _scan = scan;
        _frozen = false;
        _stopCorrection = 0;
        _nStopCandidate = DepthTime(xStop, n0);
        _nExit = DepthTime(1.0, n0);
        _maxZeta2 = 0;
        _maxZeta2Free = 0;
        _freeDecayCalibrated = xs <= 1.01 * settings.EffectiveStartDepth;
        double stepTol = settings.Tolerance * settings.StepToleranceRatio;
        // The deep-start scale stops at the integrator's round-off floor; the integrator term below grows by what is lost.
        double rkTol = Math.Max(stepTol * DeepStepScale(xs), StepToleranceFloor);
        double floorLoss = rkTol / (stepTol * DeepStepScale(xs));
        var options = new OdeOptions
        {
            RelativeTolerance = rkTol,
            AbsoluteTolerance = rkTol,
            AbsoluteToleranceVector = AbsoluteTolerances(rkTol, n0, scan),
            DenseOutput = false,
            MaxSteps = settings.MaxSteps,
            Observer = _observer,
        };
        double n = DeepRegime(n0, options.RelativeTolerance, settings.MaxSteps);
        var nonSmooth = background.NonSmoothTimes;
        int seg = 0;
        while (seg < nonSmooth.Count && nonSmooth[seg] <= n) seg++;
        while (true)
        {
            double segEnd = seg < nonSmooth.Count && nonSmooth[seg] < nEnd ? nonSmooth[seg] : nEnd;
            n = Integrate(n, segEnd, options, k);
            if (_frozen || segEnd >= nEnd) break;
            Kink(segEnd);
            seg++; // restart exactly at the non-smooth point (the state zeta, zeta' is continuous there)
        }
        if (_frozen) ApplyFreeze();
        double xf = Math.Exp(_lnK - n) / background.At(n).H;
        double missed = settings.InitialData == InitialDataKind.LocalIndexHankel && _scan is not null
            ? _scan.FeatureExcitationBefore(n0 - 1e-9, _lnK - 0.5 * Math.Log(_bg.VScale)) : 0.0;
        // Beyond this the first-order bound on the missed excitation is no bound (|beta| is no longer small).
        _startInFeature = missed > MissedExcitationLimit;
        // The integrator part is that of the nominal step tolerance: deep starts take tighter steps (DeepStepScale) so that
        // their global error, which grows with the oscillations integrated, stays at the nominal level. The measured terms
        // (integrator, initial data) with the free decay divided out where they were measured (default depth); the
        // first-order bounds (missed excitation, oscillatory regime) with the full factor.
        double err = (IntegratorErrorFactor * stepTol * floorLoss + InitialDataError(n0, xs, settings.InitialData)) * Cancellation(_freeDecayCalibrated)
                     + (_deepError + missed) * Cancellation(false)
                     + 0.1 * _stopCorrection;
        return Results(k, n0, n, xs, xf, _frozen, err);
    }

    // True when the missed excitation of earlier fast features is too large for its first-order bound.
    private bool _startInFeature;

    /// <summary>Largest missed feature excitation (relative) whose first-order bound is still reported as a bound.</summary>
    internal const double MissedExcitationLimit = 0.1;

    // Largest |zeta|^2 (carried units) at the accepted steps after horizon exit, the same divided by 1 + x_lo^2
    // (DepthLowerBound), and the N of exit (k/aH = 1).
    private double _maxZeta2, _maxZeta2Free, _nExit;

    // True when the mode starts at the default depth, where the integrator and initial-data coefficients were measured.
    private bool _freeDecayCalibrated;

    /// <summary>
    /// A lower bound on k/aH at <paramref name="n"/> after the exit at <paramref name="nExit"/>: d ln(k/aH)/dN = -(1 - e1)
    /// with e1 &gt;= 0, so k/aH falls at most one e-fold per e-fold.
    /// </summary>
    private static double DepthLowerBound(double n, double nExit) => Math.Exp(-Math.Max(0.0, n - nExit));

    /// <summary>
    /// How much the final relative accuracy of P_s is worse than that of the state during the run: max |zeta| after
    /// horizon exit over the final |zeta|, squared for P (at least 1). The step control keeps errors relative to the
    /// state's size; where zeta then largely cancels outside the horizon (the dip before an ultra-slow-roll peak, where
    /// P_s falls by many decades), an error of the earlier size remains and is that much larger relative to what is left.
    /// With <paramref name="freeDecay"/> (for the measured terms of a mode started at the default depth) each |zeta|^2 is first divided by the free decay 1 + (k/aH)^2 that every
    /// mode undergoes after exit (|zeta|^2 is proportional to 1 + (k/aH)^2 for the quasi-de Sitter solution, physics.md 3),
    /// with k/aH bounded below (<see cref="DepthLowerBound"/>, so the division is never by more than the decay): the
    /// integrator factor and the initial-data coefficient were measured on the final P of such modes, so that decay is
    /// already in them. Counted again it made every ordinary mode's estimate 1.6-2x larger (Starobinsky pivot at 1e-6:
    /// 1.66e-6 reported, 6.0e-7 off a 1e-11 re-solve; 9.2e-7 reported now). Modes started deeper (before a feature) keep
    /// the full factor: their integration error is larger than the calibration's (step deck, start k/aH = 123: 0.14 of the
    /// step tolerance, above the factor 0.1), and the full factor is what covered it; so do the first-order bounds, which
    /// were not measured.
    /// </summary>
    private double Cancellation(bool freeDecay)
    {
        if (!_scalar) return 1.0;
        double final2 = _y[0] * _y[0] + _y[1] * _y[1];
        double a = (freeDecay ? _maxZeta2Free : _maxZeta2) / final2;
        return double.IsFinite(a) && a > 1 ? a : 1.0;
    }

    /// <summary>
    /// Absolute tolerances of the carried state: <paramref name="stepTol"/> for values, and for the N-derivatives of the
    /// scalar blocks (zeta', W1', Y2') that divided by the largest growth G that a super-horizon zeta' seeded at any time
    /// of the mode's run can still undergo (<see cref="FrictionScan.MaxLogGrowthAfter"/>). Outside the horizon zeta' ~ (k/aH)^2 zeta is tiny, so an absolute error the step
    /// control allows in it is a seed of the mode that an ultra-slow-roll phase (friction 3 - e1 + e2 &lt; 0) amplifies
    /// by G and feeds into zeta: measured on a Gaussian dip with G ~ 1e6, modes that had left the horizon 12 e-folds
    /// before it came out 1e-3 off at tolerance 3e-7 (and 2e-5 off at 1e-10) until this tolerance was divided by G.
    /// </summary>
    private double[] AbsoluteTolerances(double stepTol, double n0, FrictionScan? scan)
    {
        var atol = new double[_dim];
        Array.Fill(atol, stepTol);
        if (!_scalar) return atol;
        scan ??= _bg is IShapeSharedBackground ? FrictionScan.FromStart(_bg) : FrictionScan.Build(_bg, n0);
        _scan = scan;
        double g = Math.Exp(scan.MaxLogGrowthAfter(n0));
        double primes = double.IsFinite(g) && g > 1 ? stepTol / g : stepTol;
        for (int j = 0; j < (_derivs ? 3 : 1); j++)
        {
            atol[4 * j + 2] = primes;
            atol[4 * j + 3] = primes;
        }
        return atol;
    }

    /// <summary>
    /// Use the oscillatory-regime propagator for modes that start deep inside the horizon. Off by default until the
    /// demo decks and catalogue runs have been compared with it on (feature-deepened starts would use it).
    /// </summary>
    internal bool UseOscillatoryRegime { get; init; }

    /// <summary>k/aH below which a mode is handed to Runge-Kutta (the propagator needs -k tau &gt;= OscillatoryRegime.MinArgument).</summary>
    internal const double SwitchDepth = 1.05 * OscillatoryRegime.MinArgument;

    private OscillatoryRegime? _deep;
    private double _deepError;

    /// <summary>
    /// Carries the mode from <paramref name="n0"/> to k/aH = <see cref="SwitchDepth"/> (or the first non-smooth point,
    /// or <paramref name="nLimit"/>) with the oscillatory-regime propagator when it starts deeper than 1.5 times that;
    /// returns where Runge-Kutta takes over. Each propagator counts as one right-hand side (one background evaluation).
    /// </summary>
    private double DeepRegime(double n0, double tolerance, int maxSteps, double nLimit = double.PositiveInfinity)
    {
        _deepError = 0;
        if (!UseOscillatoryRegime || LnDepth(n0) < Math.Log(1.5 * SwitchDepth)) return n0;
        double n1 = Math.Min(nLimit, DepthTime(SwitchDepth, n0));
        var ns = _bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
            if (ns[i] > n0 && ns[i] < n1) { n1 = ns[i]; break; }
        if (!(n1 > n0)) return n0;
        _deep ??= new OscillatoryRegime();
        Carried(n0, toCarried: false); // the propagator advances zeta, zeta_k, zeta_kk
        var run = _deep.Advance(_bg, _lnK, n0, n1, _y.AsSpan(0, _dim), _scalar, _tensor, _derivs, _tOff, tolerance, maxSteps);
        Carried(run.TFinal, toCarried: true);
        _rhsCount += _deep.BackgroundEvaluations;
        _steps += run.Accepted + run.Rejected;
        _deepError = run.SumErrorEstimate;
        return run.TFinal;
    }

    /// <summary>Converts the derivative blocks between the carried scale-subtracted form and (zeta_k, zeta_kk) at N, keeping the scales.</summary>
    private void Carried(double n, bool toCarried)
    {
        if (!_derivs) return;
        var p = _bg.At(n);
        double x = Math.Exp(_lnK - n) / p.H, x2 = x * x;
        if (_scalar)
        {
            var b = _y.AsSpan(0, 12);
            if (toCarried) ScaleSubtractedBlocks.FromSensitivities(b, 3.0 - p.Epsilon1 + p.Epsilon2, x2, _s1S, _s2S);
            else ScaleSubtractedBlocks.ToSensitivities(b, 3.0 - p.Epsilon1 + p.Epsilon2, x2, _s1S, _s2S);
        }
        if (_tensor)
        {
            var b = _y.AsSpan(_tOff, 12);
            if (toCarried) ScaleSubtractedBlocks.FromSensitivities(b, 3.0 - p.Epsilon1, x2, _s1T, _s2T);
            else ScaleSubtractedBlocks.ToSensitivities(b, 3.0 - p.Epsilon1, x2, _s1T, _s2T);
        }
    }

    /// <summary>Smallest Runge-Kutta tolerance (DOP853 refuses tolerances below its 1e-15 round-off floor).</summary>
    internal const double StepToleranceFloor = 1e-15;

    /// <summary>Global error of the integration relative to the step tolerance (measured about 0.01 on the benchmark modes; 10x margin).</summary>
    internal const double IntegratorErrorFactor = 0.1;

    /// <summary>
    /// Truncation of the initial data. The local-index Hankel data are exact for constant nu (power law); their error
    /// follows the drift of the index and falls like the cube of the start depth: about 0.2 |d nu/dN| / x^3 measured
    /// on the quadratic model (x = 4..23); reported with a factor 5 margin. The quasi-de Sitter data leave
    /// about 1.5 |nu - 3/2| / x^2 in P (the x^-2 term of the Hankel asymptotic series, Abramowitz &amp; Stegun 9.2.7,
    /// (4 nu^2 - 1)(4 nu^2 - 9)/(128 x^2), against nu = 3/2), reported as 2 |nu - 3/2| / x^2.
    /// </summary>
    private double InitialDataError(double n0, double xs, InitialDataKind kind)
    {
        // Difference quotient of nu over +-h, one-sided where a non-smooth point or an end of the background is near.
        double h = 0.05;
        double lo = Math.Max(_bg.NStart, n0 - h), hi = Math.Min(_bg.NEnd, n0 + h);
        var ns = _bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
        {
            if (ns[i] > n0 && ns[i] < hi) hi = n0;
            if (ns[i] <= n0 && ns[i] > lo) lo = n0;
        }
        if (!(hi > lo)) return 0.0;
        double dNu = 0, dev = 0;
        if (_scalar)
        {
            dNu = Math.Max(dNu, Math.Abs(ScalarIndex(hi) - ScalarIndex(lo)) / (hi - lo));
            dev = Math.Max(dev, Math.Abs(ScalarIndex(n0) - 1.5));
        }
        if (_tensor)
        {
            dNu = Math.Max(dNu, Math.Abs(TensorIndex(hi) - TensorIndex(lo)) / (hi - lo));
            dev = Math.Max(dev, Math.Abs(TensorIndex(n0) - 1.5));
        }
        dNu = Math.Max(dNu, OscillatingDrift(n0));
        return kind == InitialDataKind.LocalIndexHankel ? dNu / (xs * xs * xs) : 2.0 * dev / (xs * xs) + dNu / (xs * xs * xs);
    }

    private double ScalarIndex(double n)
    {
        var p = _bg.At(n);
        return ScalarIndexOf(p.Epsilon1, p.Epsilon2, p.Epsilon3);
    }

    private double TensorIndex(double n) => TensorIndexOf(_bg.At(n).Epsilon1);

    /// <summary>Local index of the scalar mode from the Hubble-flow parameters (physics.md 3).</summary>
    internal static double ScalarIndexOf(double e1, double e2, double e3) =>
        IndexFrom(2.0 - e1 + 1.5 * e2 - 0.5 * e1 * e2 + 0.25 * e2 * e2 + 0.5 * e2 * e3, 1.0 - e1);

    /// <summary>Local index of the tensor mode.</summary>
    internal static double TensorIndexOf(double e1) => IndexFrom(2.0 - e1, 1.0 - e1);

    private double Integrate(double from, double to, OdeOptions options, double k)
    {
        if (!(to > from)) return from;
        _segLo = from;
        _segHi = to;
        var problem = new OdeProblem(_rhs, from, _y.AsSpan(0, _dim).ToArray(), to);
        OdeSolution sol;
        try
        {
            sol = _method.Solve(problem, options with { MaxSteps = Math.Max(10, options.MaxSteps - _steps) });
        }
        catch (IntegrationException e)
        {
            throw new PhysicsException($"mode k = {k:G6}: the integration broke down at N = {e.T:G8} ({e.Failure}; {StateAt(e.T)}); check the background there", e);
        }
        _steps += sol.Statistics.AcceptedSteps + sol.Statistics.RejectedSteps;
        Array.Copy(sol.FinalState, _y, _dim);
        return sol.TFinal;
    }

    /// <summary>Step observer: after x &lt;= stop depth, tests the freeze-out criterion (one extra right-hand side per test, counted).</summary>
    private bool Observe(double n, ReadOnlySpan<double> y)
    {
        if (_scalar && n >= _nExit)
        {
            double xLo = DepthLowerBound(n, _nExit), z2 = y[0] * y[0] + y[1] * y[1];
            _maxZeta2 = Math.Max(_maxZeta2, z2);
            _maxZeta2Free = Math.Max(_maxZeta2Free, z2 / (1.0 + xLo * xLo));
        }
        if (n < _nStopCandidate) return false;
        y.CopyTo(_y);
        var p = _bg.At(n);
        double x = Math.Exp(_lnK - n) / p.H;
        _scan ??= _bg is IShapeSharedBackground ? FrictionScan.FromStart(_bg) : FrictionScan.Build(_bg, n);
        if (!(x * x * Math.Exp(_scan.LogGrowthAfter(n)) <= _stopTol)) return false;
        if (!(_scan.LogSourcedGrowthAfter(n, _lnK - 0.5 * Math.Log(_bg.VScale)) <= Math.Log(_stopTol))) return false;
        Rhs(n, _y, _k1);
        if (!TryFreeze(_stopTol, out _stopCorrection)) return false;
        _frozen = true;
        return true;
    }

    /// <summary>Integrates the mode from its start to <paramref name="nTarget"/> (no stop) and returns zeta, zeta', h, h' there (unscaled).</summary>
    public ModeSnapshot EvolveTo(IBackground background, double k, double nTarget, ModeSettings settings)
    {
        Setup(background, k, settings);
        double xs = settings.EffectiveStartDepth;
        double n0 = StartTime(ref xs, settings.Tolerance, settings.InitialData);
        if (!(nTarget >= n0 && nTarget <= background.NEnd))
            throw new ArgumentOutOfRangeException(nameof(nTarget), nTarget, $"target N must lie in [{n0:G8}, {background.NEnd:G8}]");
        SetInitialData(n0, settings.InitialData);
        var options = new OdeOptions
        {
            RelativeTolerance = Math.Max(settings.Tolerance * settings.StepToleranceRatio * DeepStepScale(xs), StepToleranceFloor),
            AbsoluteTolerance = Math.Max(settings.Tolerance * settings.StepToleranceRatio * DeepStepScale(xs), StepToleranceFloor),
            DenseOutput = false,
            MaxSteps = settings.MaxSteps,
        };
        double n = DeepRegime(n0, options.RelativeTolerance, settings.MaxSteps, nTarget);
        var nonSmooth = background.NonSmoothTimes;
        while (n < nTarget)
        {
            double segEnd = nTarget;
            for (int i = 0; i < nonSmooth.Count; i++)
                if (nonSmooth[i] > n && nonSmooth[i] < segEnd) { segEnd = nonSmooth[i]; break; }
            n = Integrate(n, segEnd, options, k);
            if (n < nTarget) Kink(n);
        }
        Complex z = Complex.NaN, dz = Complex.NaN, t = Complex.NaN, dt = Complex.NaN;
        if (_scalar)
        {
            z = new Complex(_y[0], _y[1]) * (Math.Exp(_lnRef) / _scaleS);
            dz = new Complex(_y[2], _y[3]) * (Math.Exp(_lnRef) / _scaleS);
        }
        if (_tensor)
        {
            t = new Complex(_y[_tOff], _y[_tOff + 1]) * (Math.Exp(_lnRef) / _scaleT);
            dt = new Complex(_y[_tOff + 2], _y[_tOff + 3]) * (Math.Exp(_lnRef) / _scaleT);
        }
        return new ModeSnapshot(k, n, z, dz, t, dt, _rhsCount);
    }

    private void Setup(IBackground background, double k, ModeSettings settings)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        if (!(k > 0)) throw new ArgumentOutOfRangeException(nameof(k), k, "wavenumber must be positive");
        if (double.IsInfinity(k))
            throw new PhysicsException("a mode's wavenumber in background units (k/aH = k exp(-N)/H) overflows: the mode would leave the horizon more than about 700 e-folds after the background's start");
        _bg = background;
        _lnK = Math.Log(k);
        _scalar = (settings.Kinds & ModeKinds.Scalar) != 0;
        _tensor = (settings.Kinds & ModeKinds.Tensor) != 0;
        _derivs = settings.Derivatives;
        _blockS = _scalar ? (_derivs ? 12 : 4) : 0;
        _blockT = _tensor ? (_derivs ? 12 : 4) : 0;
        _tOff = _blockS;
        _dim = _blockS + _blockT;
        _rhsCount = 0;
        _steps = 0;
        Array.Clear(_y);
    }

    /// <summary>
    /// Where the mode starts: where k/aH = <paramref name="depth"/>, deeper while the estimated truncation of the
    /// local-index data exceeds the tolerance (a background that changes quickly there), and before any
    /// non-smooth point the mode would otherwise start after while still inside the horizon (a kink excites modes
    /// deep inside the horizon with amplitude ~ 1/(k/aH); local vacuum data after it would miss that).
    /// Throws <see cref="PhysicsException"/> when the background starts too late.
    /// </summary>
    private double StartTime(ref double depth, double tol, InitialDataKind kind, FrictionScan? scan = null)
    {
        _oscScan = scan ?? FrictionScan.FromStart(_bg);
        double nA = _bg.NStart;
        double lnDepthA = LnDepth(nA);
        if (lnDepthA < Math.Log(depth))
        {
            double kMin = depth * Math.Exp(nA) * _bg.At(nA).H;
            throw new PhysicsException($"mode k = {Math.Exp(_lnK):G6} cannot start at k/aH = {depth:G3}: the background starts (N = {nA:G6}) with k/aH = {Math.Exp(lnDepthA):G4}; the smallest k allowed is {kMin:G6} (start the field further up the potential or choose a larger k)");
        }
        double n = DepthTime(depth, nA);
        for (int it = 0; it < 8 && InitialDataError(n, depth, kind) > tol; it++)
        {
            double deeper = depth * 1.5;
            if (lnDepthA < Math.Log(deeper)) break;
            depth = deeper;
            n = DepthTime(depth, nA);
        }
        // A fast but smooth feature (a step in V) before this start, while the mode was still inside the horizon,
        // leaves an excitation that local data at the start cannot know about: start before the earliest such
        // feature (where the drift estimate |d nu/dN| / (k/aH)^3 exceeds the tolerance), then deepen as above.
        if (kind == InitialDataKind.LocalIndexHankel)
        {
            double nLimit = DepthTime(MaxKinkDepth, nA);
            double tBad = FirstDriftBefore(nLimit, n, tol, scan);
            // The same for a fast feature whose missed excitation (FeatureExcitationBefore: first order, no credit for
            // the oscillation) would exceed the tolerance, where the drift estimate credits the oscillation too much.
            double lnKUnit = _lnK - 0.5 * Math.Log(_bg.VScale);
            if (scan is not null && scan.NFrom <= nLimit && scan.FeatureExcitationBefore(n, lnKUnit) > tol)
            {
                double tFast = scan.FirstFastCell(nLimit, n);
                if (!double.IsNaN(tFast) && (double.IsNaN(tBad) || tFast < tBad)) tBad = tFast;
            }
            if (!double.IsNaN(tBad))
            {
                n = Math.Max(nA, tBad - FeatureMargin);
                depth = Math.Exp(LnDepth(n));
                for (int it = 0; it < 8 && InitialDataError(n, depth, kind) > tol; it++)
                {
                    double deeper = depth * 1.5;
                    if (lnDepthA < Math.Log(deeper)) break;
                    depth = deeper;
                    n = DepthTime(depth, nA);
                }
            }
        }
        ResonantStart(ref n, ref depth, nA, lnDepthA, tol, kind, scan);
        var ns = _bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
        {
            double t = ns[i];
            double xt = Math.Exp(LnDepth(t));
            if (t > nA && t < n + 0.025 && xt <= MaxKinkDepth)
            {
                double margin = 0.025 / Math.Max(1.0, xt);
                if (t - margin > nA + margin)
                {
                    n = t - margin;
                    depth = Math.Exp(LnDepth(n));
                }
                break;
            }
        }
        // Keep the finite-difference stencil of the initial data (+-0.02/x) inside the background and off non-smooth points.
        double m = 0.025 / Math.Max(1.0, depth);
        n = Math.Max(n, nA + m);
        for (int i = 0; i < ns.Count; i++)
            if (Math.Abs(ns[i] - n) < m) n = ns[i] - m > nA + m ? ns[i] - m : ns[i] + m;
        depth = Math.Exp(LnDepth(n));
        return Math.Min(n, _bg.NEnd);
    }

    /// <summary>E-folds by which a mode starts before the first cell of a fast feature (beyond the +-0.05 stencil of the drift estimate).</summary>
    internal const double FeatureMargin = 0.06;

    /// <summary>
    /// The earliest N in [<paramref name="nFrom"/>, <paramref name="nTo"/>) where |d nu/dN| / (k/aH)^3 exceeds
    /// <paramref name="tol"/> (NaN when nowhere): from the shared scan's table, or sampled every 0.01 e-folds without one.
    /// </summary>
    private double FirstDriftBefore(double nFrom, double nTo, double tol, FrictionScan? scan)
    {
        if (!(nTo > nFrom)) return double.NaN;
        if (scan is not null && scan.NFrom <= nFrom) return scan.FirstDriftAbove(nFrom, nTo, _lnK - 0.5 * Math.Log(_bg.VScale), Math.Log(tol));
        const double h = 0.01;
        int cells = (int)Math.Ceiling((nTo - nFrom) / h);
        double prevS = 0, prevT = 0, prevLnAH = 0;
        for (int i = 0; i <= cells; i++)
        {
            double n = Math.Min(nTo, nFrom + i * h);
            var p = _bg.At(n);
            double s = ScalarIndexOf(p.Epsilon1, p.Epsilon2, p.Epsilon3), t = TensorIndexOf(p.Epsilon1);
            double lnAH = n + Math.Log(p.H);
            if (i > 0)
            {
                double a = n - h;
                bool kink = false;
                var ks = _bg.NonSmoothTimes;
                for (int j = 0; j < ks.Count; j++)
                    if (ks[j] >= a - 1e-12 && ks[j] <= n + 1e-12) kink = true;
                double d = Math.Max(Math.Abs(s - prevS), Math.Abs(t - prevT)) / h;
                double lnX = _lnK - Math.Max(lnAH, prevLnAH);
                if (!kink && d > 0 && Math.Log(d) - 3.0 * lnX > Math.Log(tol)) return a;
            }
            prevS = s; prevT = t; prevLnAH = lnAH;
        }
        return double.NaN;
    }

    /// <summary>Modes deeper than this inside the horizon at a non-smooth point are not started before it (cost grows with the depth).</summary>
    internal const double MaxKinkDepth = 500;

    /// <summary>The first N after <paramref name="nFrom"/> where k/aH = <paramref name="depth"/> (NEnd when never).</summary>
    private double DepthTime(double depth, double nFrom)
    {
        double lnTarget = Math.Log(depth);
        double nA = nFrom, nB = _bg.NEnd;
        double fA = LnDepth(nA) - lnTarget;
        if (fA <= 0) return nA;
        if (LnDepth(nB) - lnTarget > 0) return nB;
        // Newton on ln(k/aH) with d/dN = -(1 - e1), safeguarded by the bracket.
        double n = nA + fA / Math.Max(0.05, 1.0 - _bg.At(nA).Epsilon1);
        for (int it = 0; it < 100; it++)
        {
            if (!(n > nA && n < nB)) n = 0.5 * (nA + nB);
            var p = _bg.At(n);
            double f = _lnK - n - Math.Log(p.H) - lnTarget;
            if (f > 0) nA = n; else nB = n;
            double step = f / Math.Max(0.05, 1.0 - p.Epsilon1);
            n += step;
            if (Math.Abs(step) < 1e-13 * Math.Max(1.0, Math.Abs(n)) || nB - nA < 1e-13 * Math.Max(1.0, Math.Abs(n))) break;
        }
        return Math.Clamp(n, nFrom, _bg.NEnd);
    }

    private double LnDepth(double n) => _lnK - n - Math.Log(_bg.At(n).H);

    // Frozen local data at one N: [0..5] zeta, zeta', zeta_k, zeta_k', zeta_kk, zeta_kk'; [6..11] the same for h.
    private const int DataWidth = 12;

    /// <summary>
    /// N steps of the data stencils times k/aH. 5-point differences leave a truncation (dn x)^4/30 and a round-off
    /// about 1e-16/(dn x)^j in the j-th derivative block: measured on power law with e1 = 5e-9, the narrow step leaves
    /// n_t within 2e-4 relative (5e-3: 7e-2), the wide one alpha_s within 1e-8 (1e-3: 7e-7).
    /// </summary>
    private const double NarrowDataStep = 0.001, WideDataStep = 0.005;
    private readonly Complex[] _data = new Complex[9 * DataWidth];
    private readonly double[] _dataX2 = new double[9];
    private readonly double[] _dataF = new double[9];
    private readonly double[] _dataFt = new double[9];
    private readonly double[] _dataC = new double[9];

    /// <summary>
    /// Bunch-Davies data at <paramref name="n0"/>. Without derivatives: the frozen local-index Hankel solution.
    /// With derivatives: the k-derivatives are TOTAL derivatives along the start path x(N0(k)) = const, so that the
    /// computed n_s, alpha_s are the exact derivatives of the computed P(k) (which is smooth in k because every mode
    /// starts at the same depth). A fixed-N0 derivative would differentiate the small initial-data mismatch
    /// ~ exp(2i k tau0) and amplify it by (2 k/aH)^j. Moving N0 by dN0 = c dln k, c = 1/(1 - e1), adds
    /// c (d/dN data - f(data)) (the defect of the data as a solution) to the next derivative block; the N-derivatives
    /// of the data are 5-point central differences in N (no right-hand-side calls).
    /// </summary>
    private void SetInitialData(double n0, InitialDataKind kind)
    {
        var p0 = _bg.At(n0);
        _lnRef = -1.5 * n0 - 0.5 * Math.Log(p0.H);
        _x0 = Math.Exp(_lnK - n0) / p0.H;
        if (!_derivs)
        {
            LocalData(0.0, p0, 0.0, kind, _data.AsSpan(0, DataWidth), out _, out _, out _, out _);
            if (_scalar) { Put(0, _data[0], _data[1]); }
            if (_tensor) { Put(_tOff, _data[6], _data[7]); }
        }
        else
        {
            double e3Slope = Epsilon3Slope(n0);
            // Two stencils: the second-derivative block divides round-off by dn^2 (wide stencil), while the first
            // block's W1 = zeta_k + 3/2 zeta + zeta' is of slow-roll size and needs the small truncation of a narrow one.
            double wide = WideDataStep / Math.Max(1.0, _x0), narrow = NarrowDataStep / Math.Max(1.0, _x0);
            FillStencil(p0, e3Slope, wide, kind);
            double c = _dataC[4];
            if (_scalar) DerivativeBlocks(0, 0, _dataF, wide, c);
            if (_tensor) DerivativeBlocks(6, _tOff, _dataFt, wide, c);
            FillStencil(p0, e3Slope, narrow, kind);
            if (_scalar) FirstDerivativeBlock(0, 0, _dataF, narrow);
            if (_tensor) FirstDerivativeBlock(6, _tOff, _dataFt, narrow);
        }
        double xs = Math.Exp(_lnK - n0) / p0.H;
        if (_derivs)
        {
            double x2 = xs * xs;
            if (_scalar) ToCarried(0, 3.0 - p0.Epsilon1 + p0.Epsilon2, x2, xs, out _s1S, out _s2S);
            if (_tensor) ToCarried(_tOff, 3.0 - p0.Epsilon1, x2, xs, out _s1T, out _s2T);
        }
        if (_scalar)
        {
            _scaleS = xs / Math.Sqrt(_y[0] * _y[0] + _y[1] * _y[1]); // |zeta| of order 1 after horizon exit
            for (int i = 0; i < _blockS; i++) _y[i] *= _scaleS;
        }
        if (_tensor)
        {
            _scaleT = xs / Math.Sqrt(_y[_tOff] * _y[_tOff] + _y[_tOff + 1] * _y[_tOff + 1]);
            for (int i = _tOff; i < _dim; i++) _y[i] *= _scaleT;
        }
        for (int i = 0; i < _dim; i++)
        {
            if (!double.IsFinite(_y[i]))
                throw new PhysicsException($"mode k = {Math.Exp(_lnK):G6}: the initial data at N = {n0:G8} are not finite (k/aH = {xs:G4}; {StateAt(n0)}); the background is not usable there");
        }
    }

    /// <summary>Converts the block at <paramref name="off"/> from (zeta, zeta_k, zeta_kk) to the carried scale-subtracted form and chooses its scales.</summary>
    private void ToCarried(int off, double f, double x2, double x, out double s1, out double s2)
    {
        var b = _y.AsSpan(off, 12);
        ScaleSubtractedBlocks.FromSensitivities(b, f, x2, 1.0, 1.0);
        s1 = ScaleSubtractedBlocks.Scale(b, 4, x);
        s2 = ScaleSubtractedBlocks.Scale(b, 8, x * x);
        for (int i = 4; i < 8; i++) b[i] /= s1;
        for (int i = 8; i < 12; i++) b[i] /= s2;
    }

    /// <summary>Applies the jumps of the derivative blocks where the friction jumps at the non-smooth point <paramref name="t"/>.</summary>
    private void Kink(double t)
    {
        if (!_derivs) return;
        double eps = 1e-10 * Math.Max(1.0, Math.Abs(t));
        var before = _bg.At(t - eps);
        var after = _bg.At(Math.Min(t + eps, _bg.NStop));
        double x = Math.Exp(_lnK - t) / before.H;
        if (_scalar)
        {
            double fb = 3.0 - before.Epsilon1 + before.Epsilon2, fa = 3.0 - after.Epsilon1 + after.Epsilon2;
            ScaleSubtractedBlocks.Kink(_y.AsSpan(0, 12), fa - fb, fb, x * x, _s1S, _s2S);
        }
        if (_tensor)
        {
            double fb = 3.0 - before.Epsilon1, fa = 3.0 - after.Epsilon1;
            ScaleSubtractedBlocks.Kink(_y.AsSpan(_tOff, 12), fa - fb, fb, x * x, _s1T, _s2T);
        }
    }

    /// <summary>The local data at N0 + (j - 4) <paramref name="dn"/>, j = 0..8, on the background's jet.</summary>
    private void FillStencil(BackgroundPoint p0, double e3Slope, double dn, InitialDataKind kind)
    {
        for (int j = 0; j < 9; j++)
        {
            var pj = JetPoint(p0, e3Slope, (j - 4) * dn, out double lnHRatio);
            LocalData((j - 4) * dn, pj, lnHRatio, kind, _data.AsSpan(j * DataWidth, DataWidth), out _dataX2[j], out _dataF[j], out _dataFt[j], out _dataC[j]);
        }
    }

    /// <summary>Only the first total ln k derivative block (as in <see cref="DerivativeBlocks"/>) from the current stencil.</summary>
    private void FirstDerivativeBlock(int d, int off, double[] fr, double dn)
    {
        int o = 4 * DataWidth + d;
        Complex rho0 = D5(d, 4, dn) - _data[o + 1];
        Complex rho1 = D5(d + 1, 4, dn) - (-fr[4] * _data[o + 1] - _dataX2[4] * _data[o]);
        Put(off + 4, _data[o + 2] + _dataC[4] * rho0, _data[o + 3] + _dataC[4] * rho1);
    }

    /// <summary>Value, first and second total ln k derivative blocks for the quantity whose data start at <paramref name="d"/>.</summary>
    private void DerivativeBlocks(int d, int off, double[] fr, double dn, double c)
    {
        int c0 = 4 * DataWidth;
        Span<Complex> z1 = stackalloc Complex[10]; // Z1 (value, derivative) at j = 2..6 (offsets -2..2)
        for (int j = 2; j <= 6; j++)
        {
            int o = j * DataWidth + d;
            Complex rho0 = D5(d, j, dn) - _data[o + 1];
            Complex rho1 = D5(d + 1, j, dn) - (-fr[j] * _data[o + 1] - _dataX2[j] * _data[o]);
            z1[2 * (j - 2)] = _data[o + 2] + _dataC[j] * rho0;
            z1[2 * (j - 2) + 1] = _data[o + 3] + _dataC[j] * rho1;
        }
        // d/dln k of Z1 at fixed N, then the defect sigma of Z1 as a solution of the first sensitivity equation.
        int b = c0 + d;
        Complex krho0 = D5(d + 2, 4, dn) - _data[b + 3];
        Complex krho1 = D5(d + 3, 4, dn) - (-fr[4] * _data[b + 3] - _dataX2[4] * (_data[b + 2] + 2.0 * _data[b]));
        Complex z1v = z1[4], z1d = z1[5];
        Complex dz1v = (z1[0] - 8.0 * z1[2] + 8.0 * z1[6] - z1[8]) / (12.0 * dn);
        Complex dz1d = (z1[1] - 8.0 * z1[3] + 8.0 * z1[7] - z1[9]) / (12.0 * dn);
        Complex sig0 = dz1v - z1d;
        Complex sig1 = dz1d - (-fr[4] * z1d - _dataX2[4] * (z1v + 2.0 * _data[b]));
        Put(off, _data[b], _data[b + 1]);
        Put(off + 4, z1v, z1d);
        Put(off + 8, _data[b + 4] + c * krho0 + c * sig0, _data[b + 5] + c * krho1 + c * sig1);
    }

    /// <summary>5-point central N-derivative of data component <paramref name="comp"/> at grid point <paramref name="j"/>.</summary>
    private Complex D5(int comp, int j, double dn) =>
        (_data[(j - 2) * DataWidth + comp] - 8.0 * _data[(j - 1) * DataWidth + comp]
         + 8.0 * _data[(j + 1) * DataWidth + comp] - _data[(j + 2) * DataWidth + comp]) / (12.0 * dn);

    /// <summary>
    /// The background near N0 + <paramref name="dn"/> from its Taylor jet at N0 (e1' = e1 e2, e2' = e2 e3, (ln H)' = -e1
    /// exactly; e3' from <paramref name="e3Slope"/>), not from the dense output: the data's N-differences then see a
    /// smooth background. Pointwise values carry the background's round-off (about 1e-8 in e2 when e1 ~ 1e-9), which
    /// the stencil of the derivative data divides by dn^2 (the cause of wrong alpha_s at large non-canonical factors).
    /// </summary>
    private static BackgroundPoint JetPoint(BackgroundPoint p, double e3Slope, double dn, out double lnHRatio)
    {
        lnHRatio = 0;
        if (dn == 0) return p;
        double e1 = p.Epsilon1, e2 = p.Epsilon2, e3 = p.Epsilon3;
        double e2d = e2 * e3, e2dd = e2 * e3 * e3 + e2 * e3Slope;
        double d2 = dn * dn, d3 = d2 * dn;
        double e2n = e2 + e2d * dn + 0.5 * e2dd * d2;
        double e3n = e3 + e3Slope * dn;
        double lnE1 = e2 * dn + 0.5 * e2d * d2 + e2dd * d3 / 6.0;
        double e1n = e1 * Math.Exp(lnE1);
        lnHRatio = -e1 * (dn + 0.5 * e2 * d2 + (e2 * e2 + e2d) * d3 / 6.0);
        return p with { N = p.N + dn, H = p.H * Math.Exp(lnHRatio), Epsilon1 = e1n, Epsilon2 = e2n, Epsilon3 = e3n };
    }

    /// <summary>d e3/dN at <paramref name="n0"/>: a central difference over +-0.02 e-folds, one-sided near an end or a non-smooth point.</summary>
    private double Epsilon3Slope(double n0)
    {
        const double h = 0.02;
        double lo = Math.Max(_bg.NStart, n0 - h), hi = Math.Min(Math.Min(_bg.NEnd, _bg.NStop), n0 + h);
        var ns = _bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
        {
            if (ns[i] > n0 && ns[i] < hi) hi = n0;
            if (ns[i] <= n0 && ns[i] > lo) lo = n0;
        }
        if (!(hi > lo)) return 0.0;
        double d = (_bg.At(hi).Epsilon3 - _bg.At(lo).Epsilon3) / (hi - lo);
        return double.IsFinite(d) ? d : 0.0;
    }

    /// <summary>
    /// The frozen local-index solution at N = N0 + <paramref name="dn"/> (background <paramref name="p"/> there,
    /// ln(H/H0) = <paramref name="lnHRatio"/>) and its k-derivatives at fixed N, relative to exp(_lnRef). Everything is
    /// computed from the offset dn, never from N itself, so the stencil's differences carry no rounding of N.
    /// </summary>
    private void LocalData(double dn, BackgroundPoint p, double lnHRatio, InitialDataKind kind, Span<Complex> d, out double x2, out double f, out double ft, out double c)
    {
        double n = p.N;
        double e1 = p.Epsilon1, e2 = p.Epsilon2, e3 = p.Epsilon3;
        if (!(e1 < 1)) throw new PhysicsException($"mode k = {Math.Exp(_lnK):G6} would start at N = {n:G8} where epsilon_1 = {e1:G4} >= 1 (not inflating); choose a larger kMin or start the background earlier");
        double oneMinus = 1.0 - e1;
        double x = _x0 * Math.Exp(-dn - lnHRatio);
        x2 = x * x;
        f = 3.0 - e1 + e2;
        ft = 3.0 - e1;
        c = 1.0 / oneMinus;
        double bigX = x / oneMinus; // -k tau
        // ln(-tau) = -ln((1 - e1) a H) and ln z, both relative to the start: ln of sqrt(-tau)/z - _lnRef = base - ln z_rest.
        double lnBase = -1.5 * dn - 0.5 * lnHRatio - 0.5 * Math.Log(oneMinus);
        Span<Complex> g = stackalloc Complex[4];
        if (_scalar)
        {
            if (!(e1 > 0)) throw new PhysicsException($"scalar modes need epsilon_1 > 0 (found {e1:G4} at N = {n:G8}); use tensor modes only on de Sitter");
            double nu = kind == InitialDataKind.QuasiDeSitter ? 1.5
                : IndexFrom(2.0 - e1 + 1.5 * e2 - 0.5 * e1 * e2 + 0.25 * e2 * e2 + 0.5 * e2 * e3, oneMinus);
            HankelDerivatives(nu, bigX, g);
            // zeta = v / z, z = a sqrt(2 e1), z'/z = 1 + e2/2.
            Complex cn = Normalisation(nu, lnBase - 0.5 * Math.Log(2.0 * e1));
            double zp = 1.0 + 0.5 * e2;
            for (int j = 0; j < 3; j++)
            {
                Complex v = cn * g[j];
                Complex dv = -oneMinus * cn * (0.5 * g[j] + g[j + 1]);
                d[2 * j] = v;
                d[2 * j + 1] = dv - zp * v;
            }
        }
        if (_tensor)
        {
            double nu = kind == InitialDataKind.QuasiDeSitter ? 1.5 : IndexFrom(2.0 - e1, oneMinus);
            HankelDerivatives(nu, bigX, g);
            // h = 2u/a, h' = 2(u' - u)/a.
            Complex cn = Normalisation(nu, lnBase + Math.Log(2.0));
            for (int j = 0; j < 3; j++)
            {
                Complex u = cn * g[j];
                Complex du = -oneMinus * cn * (0.5 * g[j] + g[j + 1]);
                d[6 + 2 * j] = u;
                d[6 + 2 * j + 1] = du - u;
            }
        }
    }

    /// <summary>The background state at N, for error messages.</summary>
    private string StateAt(double n)
    {
        if (!(n >= _bg.NStart && n <= _bg.NStop)) return "outside the background";
        var p = _bg.At(n);
        return FormattableString.Invariant($"phi = {p.Phi:G6}, dphi/dN = {p.DPhi:G6}, H = {p.H:G4}, epsilon_1 = {p.Epsilon1:G4}, epsilon_2 = {p.Epsilon2:G4}");
    }

    private static double IndexFrom(double u, double oneMinusE1)
    {
        double nu2 = u / (oneMinusE1 * oneMinusE1) + 0.25;
        return Math.Sqrt(Math.Max(nu2, 0.0));
    }

    /// <summary>(sqrt(pi)/2) exp(i (nu + 1/2) pi/2) sqrt(-tau) / z with ln(sqrt(-tau)/z) = <paramref name="lnAmplitude"/>: the factor of H_nu in zeta (or of h with z = a/2).</summary>
    private static Complex Normalisation(double nu, double lnAmplitude) =>
        Complex.FromPolarCoordinates(0.5 * Math.Sqrt(Math.PI) * Math.Exp(lnAmplitude), (nu + 0.5) * Math.PI / 2);

    /// <summary>g[j] = (X d/dX)^j H^(1)_nu(X), j = 0..3, from the Bessel equation: D^2 H = (nu^2 - X^2) H.</summary>
    internal static void HankelDerivatives(double nu, double bigX, Span<Complex> g)
    {
        if (RealHankel.TryBesselJY(nu, bigX, out double bj, out double by, out double bjp, out double byp))
        {
            // H = J + iY and X H' = X (J' + iY') directly (Steed's method, no allocation).
            Complex h0 = new(bj, by);
            Complex xd = new(bigX * bjp, bigX * byp);
            double qq = nu * nu - bigX * bigX;
            g[0] = h0;
            g[1] = xd;
            g[2] = qq * h0;
            g[3] = -2.0 * bigX * bigX * h0 + qq * xd;
            return;
        }
        Complex hn = SpecialFunctions.HankelH1(nu, new Complex(bigX, 0));
        Complex hp = SpecialFunctions.HankelH1(nu + 1.0, new Complex(bigX, 0));
        // H'_nu = (nu/X) H_nu - H_{nu+1}  =>  X H' = nu H_nu - X H_{nu+1}
        Complex d1 = nu * hn - bigX * hp;
        double q = nu * nu - bigX * bigX;
        g[0] = hn;
        g[1] = d1;
        g[2] = q * hn;
        g[3] = -2.0 * bigX * bigX * hn + q * d1;
    }

    private void Put(int off, Complex f, Complex df)
    {
        _y[off] = f.Real;
        _y[off + 1] = f.Imaginary;
        _y[off + 2] = df.Real;
        _y[off + 3] = df.Imaginary;
    }

    private void Rhs(double n, ReadOnlySpan<double> y, Span<double> dy)
    {
        _rhsCount++;
        // Evaluate the background strictly inside the current segment, so that at a restart after a non-smooth
        // point the first stage sees the new side (e2 jumps there).
        double eps = 1e-10 * Math.Max(1.0, Math.Abs(n));
        double ne = n - _segLo < eps ? _segLo + eps : _segHi - n < eps ? _segHi - eps : n;
        var p = _bg.At(Math.Min(ne, _bg.NStop));
        double x = Math.Exp(_lnK - n) / p.H;
        double x2 = x * x;
        double e1 = p.Epsilon1, e1e2 = e1 * p.Epsilon2;
        if (_scalar)
            ScaleSubtractedBlocks.Rhs(y.Slice(0, _blockS), dy.Slice(0, _blockS), 3.0 - e1 + p.Epsilon2, -e1e2 + p.Epsilon2 * p.Epsilon3, e1, x2, _s1S, _s2S, _derivs);
        if (_tensor)
            ScaleSubtractedBlocks.Rhs(y.Slice(_tOff, _blockT), dy.Slice(_tOff, _blockT), 3.0 - e1, -e1e2, e1, x2, _s1T, _s2T, _derivs);
    }

    /// <summary>
    /// Checks that every carried quantity f has stopped changing: outside the horizon f tends to a constant as
    /// f_inf - f = f'/r with r = -zeta''/zeta' (one decay rate; Aitken-type). Frozen when every |f'/r| is below
    /// <paramref name="tol"/> relative to |zeta| (or |h|); the correction f'/r is then added.
    /// </summary>
    private bool TryFreeze(double tol, out double correction)
    {
        correction = 0;
        if (_scalar && !TryFreezeBlock(0, _derivs ? 3 : 1, tol, ref correction)) return false;
        if (_tensor && !TryFreezeBlock(_tOff, _derivs ? 3 : 1, tol, ref correction)) return false;
        return true;
    }

    private bool TryFreezeBlock(int off, int blocks, double tol, ref double correction)
    {
        var f1 = new Complex(_y[off + 2], _y[off + 3]);
        var f2 = new Complex(_k1[off + 2], _k1[off + 3]);
        double mag = new Complex(_y[off], _y[off + 1]).Magnitude;
        if (f1 == Complex.Zero) return true;
        Complex r = -f2 / f1;
        if (!(r.Real > 0.5)) return false; // not decaying: keep going
        for (int j = 0; j < blocks; j++)
        {
            var d = new Complex(_y[off + 4 * j + 2], _y[off + 4 * j + 3]) / r;
            double rel = d.Magnitude / mag;
            if (!(rel <= tol)) return false;
            correction = Math.Max(correction, rel);
        }
        return true;
    }

    /// <summary>Adds the remaining change f'/r to every carried quantity (uses _y and _k1 = f(N, _y) of the stop test).</summary>
    private void ApplyFreeze()
    {
        if (_scalar) ApplyFreeze(0, _derivs ? 3 : 1);
        if (_tensor) ApplyFreeze(_tOff, _derivs ? 3 : 1);
    }

    private void ApplyFreeze(int off, int blocks)
    {
        var f1 = new Complex(_y[off + 2], _y[off + 3]);
        if (f1 == Complex.Zero) return;
        Complex r = -new Complex(_k1[off + 2], _k1[off + 3]) / f1;
        for (int j = 0; j < blocks; j++)
        {
            int o = off + 4 * j;
            var d = new Complex(_y[o + 2], _y[o + 3]) / r;
            _y[o] += d.Real;
            _y[o + 1] += d.Imaginary;
        }
    }

    private ModeResult Results(double k, double n0, double nf, double xs, double xf, bool frozen, double err)
    {
        double lnK3 = 3.0 * _lnK;
        double ps = double.NaN, pt = double.NaN, nsm1 = double.NaN, alpha = double.NaN, nt = double.NaN, alphaT = double.NaN;
        var p = _bg.At(Math.Min(nf, _bg.NStop));
        double x2 = xf * xf;
        if (_scalar)
        {
            double ln = ScaleSubtractedBlocks.LogDerivatives(_y.AsSpan(0, _blockS), frozen, _derivs, 3.0 - p.Epsilon1 + p.Epsilon2, x2, _s1S, _s2S, out nsm1, out alpha);
            ps = Math.Exp(lnK3 + ln - 2.0 * Math.Log(_scaleS) + 2.0 * _lnRef) / (2.0 * Math.PI * Math.PI);
        }
        if (_tensor)
        {
            // P_t = 8 k^3 |u/a|^2/(2 pi^2) = k^3 |h|^2 / pi^2.
            double ln = ScaleSubtractedBlocks.LogDerivatives(_y.AsSpan(_tOff, _blockT), frozen, _derivs, 3.0 - p.Epsilon1, x2, _s1T, _s2T, out nt, out alphaT);
            pt = Math.Exp(lnK3 + ln - 2.0 * Math.Log(_scaleT) + 2.0 * _lnRef) / (Math.PI * Math.PI);
        }
        return new ModeResult(k, ps, pt, nsm1, alpha, nt, n0, nf, xs, xf, frozen, _rhsCount, _steps, err) { AlphaT = alphaT, StartedInFeature = _startInFeature };
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
