using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Start depths for backgrounds that oscillate (an oscillating term in V, e.g. V = V0 (phi + b f cos(phi/f))). The
/// Hubble-flow parameters then oscillate at omega = |phi'|/f radians per e-fold, and a mode resonates with them where
/// its own phase frequency 2 (-k tau) matches omega, i.e. at -k tau ~ omega/2, well inside the horizon when omega is
/// large. omega is measured from the background (extrema of e2, <see cref="FrictionScan.MaxOscillationFrequency"/>),
/// not from the formula, over the e-folds the mode spends inside the horizon.
/// </summary>
internal sealed partial class StartPolicy
{
    /// <summary>
    /// A mode starts at k/aH of at least this many times the largest oscillation frequency (per e-fold) of the
    /// background while it is inside the horizon: four times the resonance point -k tau = omega/2, so the stationary
    /// phase region (width ~ sqrt(omega)/2 about it) lies well after the start.
    /// </summary>
    internal const double ResonanceStartFactor = 2.0;

    private FrictionScan? _oscScan;

    /// <summary>Start depth up to which Runge-Kutta keeps the plain step tolerance.</summary>
    internal const double DeepStepReference = 20;

    /// <summary>
    /// Factor on the Runge-Kutta step tolerance for a mode started at k/aH = <paramref name="startDepth"/>: the global
    /// error grows with the number of oscillations integrated (about with the start depth; measured on the resonant
    /// model at depths 280-430), so deeper starts take proportionally tighter steps (DOP853's cost grows only as the
    /// eighth root). 1 when the oscillatory-regime propagator carries the deep part.
    /// </summary>
    public double DeepStepScale(double startDepth) =>
        OscillatoryRegime ? 1.0 : Math.Min(1.0, DeepStepReference / startDepth);

    /// <summary>Deepens the start (<paramref name="n"/>, <paramref name="depth"/>) to <see cref="ResonanceStartFactor"/> times the background's oscillation frequency.</summary>
    private void ResonantStart(ref double n, ref double depth, double nA, double lnDepthA, double tol, InitialDataKind kind)
    {
        var table = _oscScan;
        if (table is null) return;
        for (int it = 0; it < 6; it++)
        {
            double nExit = DepthTime(1.0, n);
            double omega = table.MaxOscillationFrequency(n, nExit);
            double want = ResonanceStartFactor * omega;
            if (!(want > depth * 1.0001)) return;
            if (lnDepthA < Math.Log(want))
                throw new PhysicsException($"mode k = {Math.Exp(LnK):G6} must start at k/aH >= {want:G4} ({ResonanceStartFactor:G2} times the background's oscillation frequency {omega:G4} per e-fold, measured between N = {n:G6} and {nExit:G6}), but the background starts (N = {nA:G6}) with k/aH = {Math.Exp(lnDepthA):G4}: start the field further up the potential (phi0) or raise kMin");
            depth = want;
            n = DepthTime(depth, nA);
            for (int j = 0; j < 8 && InitialDataError(n, depth, kind) > tol; j++)
            {
                double deeper = depth * 1.5;
                if (lnDepthA < Math.Log(deeper)) break;
                depth = deeper;
                n = DepthTime(depth, nA);
            }
        }
    }

    /// <summary>
    /// Factor on the oscillating drift bound: the local-index data's truncation on an oscillating background was measured
    /// up to 1.6 times 0.5 omega (nu_max - nu_min) / x^3 (resonant deck, f = 1e-3, b = 0.02, starts 500-1600); 4 leaves a
    /// factor 2.5 margin.
    /// </summary>
    internal const double OscillatingDriftMargin = 4.0;

    /// <summary>
    /// |d nu/dN| bound on an oscillating background: omega times the half range of the local indices over one period
    /// about <paramref name="n0"/> (a difference quotient over a fixed interval averages a fast oscillation away). 0 on a
    /// smooth background.
    /// </summary>
    private double OscillatingDrift(double n0)
    {
        var table = _oscScan;
        if (table is null) return 0.0;
        double omega = table.MaxOscillationFrequency(n0 - 0.5, n0 + 0.5);
        if (!(omega > 0)) return 0.0;
        double lo = Math.Max(Bg.NStart, n0 - Math.PI / omega), hi = Math.Min(Bg.NEnd, n0 + Math.PI / omega);
        var ks = Bg.NonSmoothTimes;
        for (int i = 0; i < ks.Count; i++)
        {
            if (ks[i] > n0 && ks[i] < hi) hi = ks[i];
            if (ks[i] <= n0 && ks[i] > lo) lo = ks[i];
        }
        // Per system: the range of its local index over the period.
        Span<double> lo2 = stackalloc double[StateLayout.MaxBlocks];
        Span<double> hi2 = stackalloc double[StateLayout.MaxBlocks];
        int count = _ctx.SystemCount;
        lo2.Fill(double.PositiveInfinity);
        hi2.Fill(double.NegativeInfinity);
        const int samples = 16;
        for (int i = 0; i <= samples; i++)
        {
            double t = lo + (hi - lo) * i / samples;
            for (int s = 0; s < count; s++)
            {
                double v = _ctx.System(s).LocalIndex(Bg.At(t));
                lo2[s] = Math.Min(lo2[s], v);
                hi2[s] = Math.Max(hi2[s], v);
            }
        }
        double range = 0;
        for (int s = 0; s < count; s++) range = Math.Max(range, hi2[s] - lo2[s]);
        return double.IsFinite(range) ? OscillatingDriftMargin * 0.5 * omega * range : 0.0;
    }
}
