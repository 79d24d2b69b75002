namespace ModeSolver.Perturbations;

/// <summary>
/// When a mode may stop, and how much its final value lost to cancellation. A mode is frozen once k/aH is below the
/// stop depth, (k/aH)^2 times every later growth of a super-horizon zeta' (<see cref="FrictionScan"/>) is below the
/// tolerance, the source (k/aH)^2 zeta can no longer move it (<see cref="FrictionScan.LogSourcedGrowthAfter"/>), and
/// every system's carried quantities have stopped changing (<see cref="IModeSystem.TryFreeze"/>, whose remaining
/// change is then added). It also tracks the largest amplitude after horizon exit of the growing system (zeta) for
/// the cancellation factor of the error estimate. State of one mode; reused between modes.
/// </summary>
internal sealed class FreezeOut
{
    private readonly ModeContext _ctx;

    /// <summary>The stop test of the modes of <paramref name="ctx"/>.</summary>
    public FreezeOut(ModeContext ctx) => _ctx = ctx;

    private double _tol;
    // Largest |zeta|^2 (carried units) at the accepted steps after horizon exit, the same divided by 1 + x_lo^2
    // (DepthLowerBound), and the N of exit (k/aH = 1).
    private double _maxAmp2, _maxAmp2Free, _nExit;

    /// <summary>N from which the stop is tested (k/aH at the stop depth).</summary>
    public double NStopCandidate { get; private set; }

    /// <summary>True once the mode froze.</summary>
    public bool Frozen { get; set; }

    /// <summary>The relative correction added at the stop (largest over the carried quantities).</summary>
    public double Correction { get; set; }

    /// <summary>True when the mode starts at the default depth, where the integrator and initial-data coefficients were measured.</summary>
    public bool FreeDecayCalibrated { get; private set; }

    /// <summary>Starts the test for a mode that may stop from <paramref name="nStopCandidate"/> on and leaves the horizon at <paramref name="nExit"/>.</summary>
    public void Begin(double tol, double nStopCandidate, double nExit, bool freeDecayCalibrated)
    {
        _tol = tol;
        Frozen = false;
        Correction = 0;
        NStopCandidate = nStopCandidate;
        _nExit = nExit;
        _maxAmp2 = 0;
        _maxAmp2Free = 0;
        FreeDecayCalibrated = freeDecayCalibrated;
    }

    /// <summary>
    /// A lower bound on k/aH at <paramref name="n"/> after the exit at <paramref name="nExit"/>: d ln(k/aH)/dN = -(1 - e1)
    /// with e1 &gt;= 0, so k/aH falls at most one e-fold per e-fold.
    /// </summary>
    private static double DepthLowerBound(double n, double nExit) => Math.Exp(-Math.Max(0.0, n - nExit));

    /// <summary>Records the amplitude of the growing system at an accepted step.</summary>
    public void Track(double n, ReadOnlySpan<double> y)
    {
        int g = _ctx.GrowingSystem;
        if (g < 0 || n < _nExit) return;
        double xLo = DepthLowerBound(n, _nExit), z2 = _ctx.System(g).AmplitudeSquared(_ctx.Layout[g].Of(y));
        _maxAmp2 = Math.Max(_maxAmp2, z2);
        _maxAmp2Free = Math.Max(_maxAmp2Free, z2 / (1.0 + xLo * xLo));
    }

    /// <summary>
    /// The background part of the test at <paramref name="n"/> (k/aH = <paramref name="x"/>): nothing later can still
    /// move a super-horizon mode by more than the tolerance.
    /// </summary>
    public bool BackgroundAllows(double n, double x, FrictionScan scan)
    {
        if (!(x * x * Math.Exp(scan.LogGrowthAfter(n)) <= _tol)) return false;
        return scan.LogSourcedGrowthAfter(n, _ctx.LnK - 0.5 * Math.Log(_ctx.Background.VScale)) <= Math.Log(_tol);
    }

    /// <summary>The systems' part of the test, from the state and its right-hand side; sets <see cref="Correction"/>.</summary>
    public bool TryFreeze(ReadOnlySpan<double> y, ReadOnlySpan<double> dy)
    {
        double correction = 0;
        bool ok = true;
        for (int s = 0; s < _ctx.SystemCount && ok; s++)
        {
            var b = _ctx.Layout[s];
            ok = _ctx.System(s).TryFreeze(b.Of(y), b.Of(dy), _tol, ref correction);
        }
        Correction = correction;
        return ok;
    }

    /// <summary>Adds the remaining change of every system (uses the state and its right-hand side of the stop test).</summary>
    public void Apply(Span<double> y, ReadOnlySpan<double> dy)
    {
        for (int s = 0; s < _ctx.SystemCount; s++)
        {
            var b = _ctx.Layout[s];
            _ctx.System(s).ApplyFreeze(b.Of(y), b.Of(dy));
        }
    }

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
    public double Cancellation(bool freeDecay, ReadOnlySpan<double> y)
    {
        int g = _ctx.GrowingSystem;
        if (g < 0) return 1.0;
        double final2 = _ctx.System(g).AmplitudeSquared(_ctx.Layout[g].Of(y));
        double a = (freeDecay ? _maxAmp2Free : _maxAmp2) / final2;
        return double.IsFinite(a) && a > 1 ? a : 1.0;
    }
}
