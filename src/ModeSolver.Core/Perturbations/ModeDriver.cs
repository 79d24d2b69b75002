using ModeSolver.Background;
using ModeSolver.Integrators;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Integrates one Fourier mode of any set of <see cref="IModeSystem"/>s in e-folds: picks the start
/// (<see cref="StartPolicy"/>), sets Bunch-Davies data (<see cref="BunchDaviesData"/>), optionally carries the deep part
/// with the oscillatory-regime propagator, integrates segment by segment across the background's non-smooth points
/// (restarting exactly at each, where the systems apply their jumps), stops at freeze-out (<see cref="FreezeOut"/>)
/// and sums the error estimate. The systems own the equations, their k-derivative (sensitivity) blocks and their
/// observables; the state is laid out by <see cref="StateLayout"/>. A reusable, single-threaded workspace: keep one
/// per thread. The right-hand side and the stop test do not allocate.
/// </summary>
internal sealed class ModeDriver
{
    private double[] _y = new double[24];
    private double[] _k1 = new double[24];
    private readonly IOdeMethod _method;
    private readonly RightHandSide _rhs;
    private readonly StepDerivativeObserver _observer;
    private readonly ModeContext _ctx = new();
    private readonly StartPolicy _start;
    private readonly BunchDaviesData _data = new();
    private readonly FreezeOut _freeze;
    private OscillatoryRegime? _deep;
    private int _rhsCount, _steps;
    private FrictionScan? _scan;
    private double _segLo = double.NegativeInfinity, _segHi = double.PositiveInfinity;
    private double _deepError;
    private double[]? _atol;

    /// <summary>A driver integrating with <paramref name="method"/>.</summary>
    public ModeDriver(IOdeMethod method)
    {
        _method = method;
        _rhs = Rhs;
        _observer = Observe;
        _start = new StartPolicy(_ctx);
        _freeze = new FreezeOut(_ctx);
    }

    /// <summary>Use the oscillatory-regime propagator for modes that start deep inside the horizon.</summary>
    public bool UseOscillatoryRegime { get; set; }

    /// <summary>Right-hand-side evaluations of the last integration.</summary>
    public int RhsEvaluations => _rhsCount;

    /// <summary>Accepted plus rejected steps of the last integration.</summary>
    public int Steps => _steps;

    /// <summary>The systems and layout of the last integration.</summary>
    public ModeContext Context => _ctx;

    /// <summary>The carried state at the end of the last integration.</summary>
    public ReadOnlySpan<double> State => _y.AsSpan(0, _ctx.Layout.Dimension);

    /// <summary>
    /// N at which <see cref="Solve"/> keeps a copy of the carried state (<see cref="Snapshot"/>) on the way (NaN: none).
    /// The integration restarts there, so a run with a snapshot is not bit-identical to one without.
    /// </summary>
    public double SnapshotN { get; set; } = double.NaN;

    /// <summary>True when the last <see cref="Solve"/> reached <see cref="SnapshotN"/> before it froze.</summary>
    public bool SnapshotTaken { get; private set; }

    private double[] _snapshot = [];

    /// <summary>The carried state at <see cref="SnapshotN"/> of the last <see cref="Solve"/> (valid when <see cref="SnapshotTaken"/>).</summary>
    public ReadOnlySpan<double> Snapshot => _snapshot;

    /// <summary>ln of the amplitude reference of the carried state.</summary>
    public double LnRef => _data.LnRef;

    /// <summary>Largest missed feature excitation (relative) whose first-order bound is still reported as a bound.</summary>
    internal const double MissedExcitationLimit = 0.1;

    /// <summary>Smallest Runge-Kutta tolerance (DOP853 refuses tolerances below its 1e-15 round-off floor).</summary>
    internal const double StepToleranceFloor = 1e-15;

    /// <summary>Global error of the integration relative to the step tolerance (measured about 0.01 on the benchmark modes; 10x margin).</summary>
    internal const double IntegratorErrorFactor = 0.1;

    /// <summary>k/aH below which a mode is handed to Runge-Kutta (the propagator needs -k tau &gt;= OscillatoryRegime.MinArgument).</summary>
    internal const double SwitchDepth = 1.05 * OscillatoryRegime.MinArgument;

    // The one place that asks whether a background can share one friction scan between its rescaled views and threads.
    private static FrictionScan? SharedScan(IBackground background) => background is IShapeSharedBackground ? FrictionScan.FromStart(background) : null;
    private static FrictionScan ScanFrom(IBackground background, double n) => SharedScan(background) ?? FrictionScan.Build(background, n);

    /// <summary>
    /// Integrates the mode <paramref name="k"/> of <paramref name="systems"/> to freeze-out (or NEnd). Throws
    /// <see cref="PhysicsException"/> when the background cannot serve k (cannot start deep enough, or k has not left
    /// the horizon far enough by the end of inflation).
    /// </summary>
    public ModeRun Solve(IBackground background, double k, ModeSettings settings, IModeSystem[] systems, FrictionScan? scan)
    {
        Begin(background, k, settings, systems);
        scan ??= SharedScan(background);
        double xs = settings.EffectiveStartDepth;
        double xStop = settings.EffectiveStopDepth;
        double nEnd = background.NEnd;
        double n0 = _start.StartTime(ref xs, settings.Tolerance, settings.InitialData, scan);
        double xEnd = Math.Exp(_ctx.LnK - nEnd) / background.At(nEnd).H;
        if (xEnd > xStop)
            throw new PhysicsException($"mode k = {k:G6} is still at k/aH = {xEnd:G3} at the end of inflation (N = {nEnd:G8}); it must reach k/aH <= {xStop:G3}: the largest k allowed is {k * xStop / xEnd:G6}");
        StartData(n0, settings.InitialData);
        _scan = scan;
        _freeze.Begin(settings.Tolerance, _start.DepthTime(xStop, n0), _start.DepthTime(1.0, n0), xs <= 1.01 * settings.EffectiveStartDepth);
        double stepTol = settings.Tolerance * settings.StepToleranceRatio;
        // The deep-start scale stops at the integrator's round-off floor; the integrator term below grows by what is lost.
        double rkTol = Math.Max(stepTol * _start.DeepStepScale(xs), StepToleranceFloor);
        double floorLoss = rkTol / (stepTol * _start.DeepStepScale(xs));
        var options = new OdeOptions
        {
            RelativeTolerance = rkTol,
            AbsoluteTolerance = rkTol,
            AbsoluteToleranceVector = AbsoluteTolerances(rkTol, n0, scan),
            DenseOutput = false,
            MaxSteps = settings.MaxSteps,
            DerivativeObserver = _observer,
        };
        double n = DeepRegime(n0, options.RelativeTolerance, settings.MaxSteps);
        SnapshotTaken = false;
        if (SnapshotN > n && SnapshotN < nEnd)
        {
            // Integrate to the snapshot and on from it (a restart there; no system sees it).
            n = Segments(n, SnapshotN, options, k);
            if (!_freeze.Frozen)
            {
                int dim = _ctx.Layout.Dimension;
                if (_snapshot.Length != dim) _snapshot = new double[dim];
                _y.AsSpan(0, dim).CopyTo(_snapshot);
                SnapshotTaken = true;
                n = Segments(n, nEnd, options, k);
            }
        }
        else n = Segments(n, nEnd, options, k);
        bool frozen = _freeze.Frozen;
        if (frozen) _freeze.Apply(_y.AsSpan(0, _ctx.Layout.Dimension), _k1);
        double xf = Math.Exp(_ctx.LnK - n) / background.At(n).H;
        double missed = settings.InitialData == InitialDataKind.LocalIndexHankel && _scan is not null
            ? _scan.FeatureExcitationBefore(n0 - 1e-9, _ctx.LnK - 0.5 * Math.Log(background.VScale)) : 0.0;
        // Beyond this the first-order bound on the missed excitation is no bound (|beta| is no longer small).
        bool startInFeature = missed > MissedExcitationLimit;
        // The integrator part is that of the nominal step tolerance: deep starts take tighter steps (DeepStepScale) so that
        // their global error, which grows with the oscillations integrated, stays at the nominal level. The measured terms
        // (integrator, initial data) with the free decay divided out where they were measured (default depth); the
        // first-order bounds (missed excitation, oscillatory regime) with the full factor.
        var y = _y.AsSpan(0, _ctx.Layout.Dimension);
        double err = (IntegratorErrorFactor * stepTol * floorLoss + _start.InitialDataError(n0, xs, settings.InitialData)) * _freeze.Cancellation(_freeze.FreeDecayCalibrated, y)
                     + (_deepError + missed) * _freeze.Cancellation(false, y)
                     + 0.1 * _freeze.Correction;
        return new ModeRun(n0, n, xs, xf, frozen, err, startInFeature);
    }

    /// <summary>Integrates the mode from its start to <paramref name="nTarget"/> (no stop); returns the N reached.</summary>
    public double EvolveTo(IBackground background, double k, double nTarget, ModeSettings settings, IModeSystem[] systems)
    {
        Begin(background, k, settings, systems);
        double xs = settings.EffectiveStartDepth;
        double n0 = _start.StartTime(ref xs, settings.Tolerance, settings.InitialData);
        if (!(nTarget >= n0 && nTarget <= background.NEnd))
            throw new ArgumentOutOfRangeException(nameof(nTarget), nTarget, $"target N must lie in [{n0:G8}, {background.NEnd:G8}]");
        StartData(n0, settings.InitialData);
        double tol = Math.Max(settings.Tolerance * settings.StepToleranceRatio * _start.DeepStepScale(xs), StepToleranceFloor);
        var options = new OdeOptions
        {
            RelativeTolerance = tol,
            AbsoluteTolerance = tol,
            DenseOutput = false,
            MaxSteps = settings.MaxSteps,
        };
        double n = DeepRegime(n0, options.RelativeTolerance, settings.MaxSteps, nTarget);
        return Segments(n, nTarget, options, k);
    }

    /// <summary>The observables of every system at the end of <paramref name="run"/>, in the order of the systems.</summary>
    public void Powers(in ModeRun run, Span<ModePower> powers)
    {
        var bg = _ctx.Background;
        var p = bg.At(Math.Min(run.NFinal, bg.NStop));
        double x2 = run.FinalDepth * run.FinalDepth;
        var y = State;
        for (int s = 0; s < _ctx.SystemCount; s++)
            powers[s] = _ctx.System(s).Power(_ctx.Layout[s].Of(y), run.Frozen, p, x2, _ctx.LnK, _data.LnRef);
    }

    private void Begin(IBackground background, double k, ModeSettings settings, IModeSystem[] systems)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        if (!(k > 0)) throw new ArgumentOutOfRangeException(nameof(k), k, "wavenumber must be positive");
        if (double.IsInfinity(k))
            throw new PhysicsException("a mode's wavenumber in background units (k/aH = k exp(-N)/H) overflows: the mode would leave the horizon more than about 700 e-folds after the background's start");
        _ctx.Begin(background, Math.Log(k), settings.Derivatives, systems);
        _start.OscillatoryRegime = UseOscillatoryRegime;
        int dim = _ctx.Layout.Dimension;
        if (_y.Length < dim)
        {
            _y = new double[dim];
            _k1 = new double[dim];
        }
        _rhsCount = 0;
        _steps = 0;
        _freeze.Frozen = false;
        Array.Clear(_y);
    }

    /// <summary>Bunch-Davies data at <paramref name="n0"/> in every system's block, in the carried form.</summary>
    private void StartData(double n0, InitialDataKind kind)
    {
        var bg = _ctx.Background;
        _data.Fill(_ctx, n0, kind);
        var p0 = bg.At(n0);
        double x0 = _data.X0;
        var y = _y.AsSpan(0, _ctx.Layout.Dimension);
        for (int s = 0; s < _ctx.SystemCount; s++)
            _ctx.System(s).Start(_data, s, p0, x0, _ctx.Layout[s].Of(y));
        for (int i = 0; i < y.Length; i++)
        {
            if (!double.IsFinite(y[i]))
                throw new PhysicsException($"mode k = {Math.Exp(_ctx.LnK):G6}: the initial data at N = {n0:G8} are not finite (k/aH = {x0:G4}; {StateAt(n0)}); the background is not usable there");
        }
    }

    /// <summary>
    /// Absolute tolerances of the carried state: <paramref name="stepTol"/> for values, and for the N-derivatives of the
    /// blocks of systems that grow outside the horizon (zeta', W1', Y2') that divided by the largest growth G that a
    /// super-horizon zeta' seeded at any time of the mode's run can still undergo (<see cref="FrictionScan.MaxLogGrowthAfter"/>).
    /// Outside the horizon zeta' ~ (k/aH)^2 zeta is tiny, so an absolute error the step control allows in it is a seed
    /// of the mode that an ultra-slow-roll phase (friction 3 - e1 + e2 &lt; 0) amplifies by G and feeds into zeta:
    /// measured on a Gaussian dip with G ~ 1e6, modes that had left the horizon 12 e-folds before it came out 1e-3 off
    /// at tolerance 3e-7 (and 2e-5 off at 1e-10) until this tolerance was divided by G.
    /// </summary>
    private double[] AbsoluteTolerances(double stepTol, double n0, FrictionScan? scan)
    {
        int dim = _ctx.Layout.Dimension;
        if (_atol is null || _atol.Length != dim) _atol = new double[dim]; // reused: the options live for this mode only
        var atol = _atol;
        Array.Fill(atol, stepTol);
        if (_ctx.GrowingSystem < 0) return atol;
        scan ??= ScanFrom(_ctx.Background, n0);
        _scan = scan;
        double g = Math.Exp(scan.MaxLogGrowthAfter(n0));
        double primes = double.IsFinite(g) && g > 1 ? stepTol / g : stepTol;
        for (int s = 0; s < _ctx.SystemCount; s++)
            if (_ctx.System(s).GrowsOutsideHorizon) _ctx.System(s).Tolerances(_ctx.Layout[s].Of(atol.AsSpan()), stepTol, primes);
        return atol;
    }

    /// <summary>
    /// Integrates from <paramref name="n"/> to <paramref name="target"/> segment by segment: each non-smooth point of
    /// the background ends a segment, the systems apply their jumps there and the integration restarts exactly at it
    /// (the values and N-derivatives are continuous there). Stops early when the mode freezes.
    /// </summary>
    private double Segments(double n, double target, OdeOptions options, double k)
    {
        var nonSmooth = _ctx.Background.NonSmoothTimes;
        int seg = 0;
        while (seg < nonSmooth.Count && nonSmooth[seg] <= n) seg++;
        while (true)
        {
            double segEnd = seg < nonSmooth.Count && nonSmooth[seg] < target ? nonSmooth[seg] : target;
            n = Integrate(n, segEnd, options, k);
            if (_freeze.Frozen || segEnd >= target) break;
            Kink(segEnd);
            seg++;
        }
        return n;
    }

    private double Integrate(double from, double to, OdeOptions options, double k)
    {
        if (!(to > from)) return from;
        _segLo = from;
        _segHi = to;
        int dim = _ctx.Layout.Dimension;
        var problem = new OdeProblem(_rhs, from, _y.AsSpan(0, dim).ToArray(), to);
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
        Array.Copy(sol.FinalState, _y, dim);
        return sol.TFinal;
    }

    private void Rhs(double n, ReadOnlySpan<double> y, Span<double> dy)
    {
        _rhsCount++;
        var bg = _ctx.Background;
        // Evaluate the background strictly inside the current segment, so that at a restart after a non-smooth
        // point the first stage sees the new side (e2 jumps there).
        double eps = 1e-10 * Math.Max(1.0, Math.Abs(n));
        double ne = n - _segLo < eps ? _segLo + eps : _segHi - n < eps ? _segHi - eps : n;
        var p = bg.At(Math.Min(ne, bg.NStop));
        double x = Math.Exp(_ctx.LnK - n) / p.H;
        double x2 = x * x;
        var layout = _ctx.Layout;
        for (int s = 0; s < layout.Count; s++)
        {
            var b = layout[s];
            _ctx.System(s).Rhs(p, x2, b.Of(y), b.Of(dy));
        }
    }

    /// <summary>
    /// Step observer: after k/aH &lt;= stop depth, tests the freeze-out criterion. The right-hand side at the step's end is
    /// the method's first-same-as-last stage where it has one (<paramref name="dy"/>: the same call with the same
    /// arguments, so the same bits), else one extra right-hand side per test (counted).
    /// </summary>
    private bool Observe(double n, ReadOnlySpan<double> y, ReadOnlySpan<double> dy)
    {
        _freeze.Track(n, y);
        if (n < _freeze.NStopCandidate) return false;
        y.CopyTo(_y);
        var bg = _ctx.Background;
        var p = bg.At(n);
        double x = Math.Exp(_ctx.LnK - n) / p.H;
        _scan ??= ScanFrom(bg, n);
        if (!_freeze.BackgroundAllows(n, x, _scan)) return false;
        if (dy.Length == y.Length) dy.CopyTo(_k1);
        else Rhs(n, _y, _k1);
        if (!_freeze.TryFreeze(_y.AsSpan(0, y.Length), _k1.AsSpan(0, y.Length))) return false;
        _freeze.Frozen = true;
        return true;
    }

    /// <summary>Applies every system's jumps at the non-smooth point <paramref name="t"/>.</summary>
    private void Kink(double t)
    {
        if (!_ctx.Derivatives) return;
        var bg = _ctx.Background;
        double eps = 1e-10 * Math.Max(1.0, Math.Abs(t));
        var before = bg.At(t - eps);
        var after = bg.At(Math.Min(t + eps, bg.NStop));
        double x = Math.Exp(_ctx.LnK - t) / before.H;
        var y = _y.AsSpan(0, _ctx.Layout.Dimension);
        for (int s = 0; s < _ctx.SystemCount; s++)
            _ctx.System(s).Kink(before, after, x * x, _ctx.Layout[s].Of(y));
    }

    /// <summary>
    /// Carries the mode from <paramref name="n0"/> to k/aH = <see cref="SwitchDepth"/> (or the first non-smooth point,
    /// or <paramref name="nLimit"/>) with the oscillatory-regime propagator when it starts deeper than 1.5 times that
    /// and every system is a decoupled oscillator; returns where Runge-Kutta takes over. Each propagator counts as one
    /// right-hand side (one background evaluation).
    /// </summary>
    private double DeepRegime(double n0, double tolerance, int maxSteps, double nLimit = double.PositiveInfinity)
    {
        _deepError = 0;
        if (!UseOscillatoryRegime || _start.LnDepth(n0) < Math.Log(1.5 * SwitchDepth)) return n0;
        for (int s = 0; s < _ctx.SystemCount; s++)
            if (_ctx.System(s) is not DecoupledModeSystem) return n0;
        var bg = _ctx.Background;
        double n1 = Math.Min(nLimit, _start.DepthTime(SwitchDepth, n0));
        var ns = bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
            if (ns[i] > n0 && ns[i] < n1) { n1 = ns[i]; break; }
        if (!(n1 > n0)) return n0;
        _deep ??= new OscillatoryRegime();
        Carried(n0, toCarried: false); // the propagator advances f, f_k, f_kk
        var run = _deep.Advance(bg, _ctx.LnK, n0, n1, _y.AsSpan(0, _ctx.Layout.Dimension), _ctx, tolerance, maxSteps);
        Carried(run.TFinal, toCarried: true);
        _rhsCount += _deep.BackgroundEvaluations;
        _steps += run.Accepted + run.Rejected;
        _deepError = run.SumErrorEstimate;
        return run.TFinal;
    }

    /// <summary>Converts the derivative blocks between the carried scale-subtracted form and (f_k, f_kk) at N, keeping the scales.</summary>
    private void Carried(double n, bool toCarried)
    {
        if (!_ctx.Derivatives) return;
        var p = _ctx.Background.At(n);
        double x = Math.Exp(_ctx.LnK - n) / p.H, x2 = x * x;
        var y = _y.AsSpan(0, _ctx.Layout.Dimension);
        for (int s = 0; s < _ctx.SystemCount; s++)
            ((DecoupledModeSystem)_ctx.System(s)).Convert(p, x2, _ctx.Layout[s].Of(y), toCarried);
    }

    /// <summary>The background state at N, for error messages.</summary>
    private string StateAt(double n)
    {
        var bg = _ctx.Background;
        if (!(n >= bg.NStart && n <= bg.NStop)) return "outside the background";
        var p = bg.At(n);
        return FormattableString.Invariant($"phi = {p.Phi:G6}, dphi/dN = {p.DPhi:G6}, H = {p.H:G4}, epsilon_1 = {p.Epsilon1:G4}, epsilon_2 = {p.Epsilon2:G4}");
    }
}

/// <summary>Where and how one mode integration ran.</summary>
/// <param name="NStart">N of the start.</param>
/// <param name="NFinal">N of the stop.</param>
/// <param name="StartDepth">k/aH at the start.</param>
/// <param name="FinalDepth">k/aH at the stop.</param>
/// <param name="Frozen">True when the mode froze before the end of inflation.</param>
/// <param name="ErrorEstimate">Estimated relative error of the powers.</param>
/// <param name="StartedInFeature">True when the first-order bound on a missed feature excitation is no bound.</param>
internal readonly record struct ModeRun(double NStart, double NFinal, double StartDepth, double FinalDepth, bool Frozen, double ErrorEstimate, bool StartedInFeature);
