using System.Numerics;
using ModeSolver.Background;
using ModeSolver.Integrators;
using ModeSolver.Perturbations;
using ModeSolver.Physics;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The dense history of one scalar mode: u_k(N) = k^(3/2) zeta_k(N) and du/dN (physical normalisation,
/// P_s = |u|^2 / (2 pi^2)), from deep inside the horizon to the end of the in-in integrals, one Runge-Kutta solution with
/// dense output per smooth segment of the background. Built once per k and shared by every triangle that has k as a side.
/// </summary>
public sealed class ModeHistory
{
    private readonly OdeSolution[] _segments;
    private readonly double _scale;

    internal ModeHistory(double k, OdeSolution[] segments, double scale, int rhsEvaluations)
    {
        K = k;
        _segments = segments;
        _scale = scale;
        RhsEvaluations = rhsEvaluations;
    }

    /// <summary>Wavenumber (background units).</summary>
    public double K { get; }

    /// <summary>First N of the history.</summary>
    public double NStart => _segments[0].T0;

    /// <summary>Last N of the history.</summary>
    public double NEnd => _segments[^1].TFinal;

    /// <summary>Right-hand sides of the integration (the Bunch-Davies start included).</summary>
    public int RhsEvaluations { get; }

    /// <summary>u and du/dN at <paramref name="n"/> in [NStart, NEnd] (allocation-free).</summary>
    public void At(double n, out Complex u, out Complex du)
    {
        int s = 0;
        while (s < _segments.Length - 1 && n > _segments[s].TFinal) s++;
        Span<double> y = stackalloc double[4];
        _segments[s].Evaluate(n, y);
        u = new Complex(y[0] * _scale, y[1] * _scale);
        du = new Complex(y[2] * _scale, y[3] * _scale);
    }
}

/// <summary>
/// Builds <see cref="ModeHistory"/>s: the Bunch-Davies start (local-index Hankel data) and its first fraction of an
/// e-fold come from the mode stage (<see cref="ModeIntegrator.EvolveTo"/>); from there zeta'' + (3 - e1 + e2) zeta' +
/// (k/aH)^2 zeta = 0 (physics.md 3) is integrated with DOP853 keeping the dense output, restarting exactly at each
/// non-smooth point of the background (zeta and zeta' are continuous there). A single-threaded workspace.
/// </summary>
public sealed class ModeHistoryBuilder
{
    private readonly ModeIntegrator _modes = new();
    private readonly DormandPrince853 _method = new();
    private readonly RightHandSide _rhs;
    private IBackground? _bg;
    private double _lnK, _segLo, _segHi;
    private int _count;

    /// <summary>A new workspace.</summary>
    public ModeHistoryBuilder() => _rhs = Rhs;

    /// <summary>
    /// The history of mode <paramref name="k"/> from k/aH = <paramref name="startDepth"/> to <paramref name="nEnd"/> at relative
    /// tolerance <paramref name="tolerance"/>. Throws <see cref="PhysicsException"/> when the background does not reach that deep.
    /// </summary>
    public ModeHistory Build(IBackground background, double k, double startDepth, double nEnd, double tolerance)
    {
        ArgumentNullException.ThrowIfNull(background);
        _bg = background;
        _lnK = Math.Log(k);
        double xFirst = Math.Exp(_lnK - background.NStart) / background.At(background.NStart).H;
        if (!(xFirst >= 1.02 * startDepth))
            throw new PhysicsException($"bispectrum: mode k = {k:G6} is only at k/aH = {xFirst:G4} at the start of the background (N = {background.NStart:G8}); the in-in integral needs k/aH >= {1.02 * startDepth:G4}: start the field further up the potential or choose a larger k");
        double n0 = HorizonExit.Find(background, k / startDepth);
        if (!(nEnd > n0 && nEnd <= background.NEnd))
            throw new PhysicsException($"bispectrum: mode k = {k:G6} would end at N = {nEnd:G8}, outside [{n0:G8}, {background.NEnd:G8}]");
        var snap = _modes.EvolveTo(background, k, n0, new ModeSettings
        {
            Tolerance = Math.Max(tolerance, 1e-10), StartDepth = 1.01 * startDepth, Derivatives = false, Kinds = ModeKinds.Scalar,
        });
        double k15 = Math.Pow(k, 1.5);
        Complex u0 = snap.Zeta * k15, du0 = snap.DZeta * k15;
        double scale = u0.Magnitude / startDepth; // carried |u|/scale ~ k/aH inside, ~1 after exit
        double[] y = [u0.Real / scale, u0.Imaginary / scale, du0.Real / scale, du0.Imaginary / scale];
        // Global error grows with the oscillations integrated (~ startDepth / 2 pi): tighten the steps to match.
        double rtol = Math.Max(tolerance * Math.Min(1.0, 20.0 / startDepth), 1e-14);
        var options = new OdeOptions
        {
            RelativeTolerance = rtol,
            AbsoluteTolerance = rtol,
            AbsoluteToleranceVector = [rtol, rtol, 1e-3 * rtol, 1e-3 * rtol],
            DenseOutput = true,
            MaxSteps = 2_000_000,
        };
        _count = 0;
        var segments = new List<OdeSolution>(2);
        double n = n0;
        var kinks = background.NonSmoothTimes;
        int next = 0;
        while (next < kinks.Count && kinks[next] <= n) next++;
        while (true)
        {
            double end = next < kinks.Count && kinks[next] < nEnd ? kinks[next] : nEnd;
            _segLo = n;
            _segHi = end;
            OdeSolution sol;
            try
            {
                sol = _method.Solve(new OdeProblem(_rhs, n, y, end), options);
            }
            catch (IntegrationException e)
            {
                throw new PhysicsException($"bispectrum: mode k = {k:G6}: the integration broke down at N = {e.T:G8} ({e.Failure}); check the background there", e);
            }
            segments.Add(sol);
            n = end;
            if (end >= nEnd) break;
            y = (double[])sol.FinalState.Clone();
            next++;
        }
        return new ModeHistory(k, segments.ToArray(), scale, _count + snap.RhsEvaluations);
    }

    private void Rhs(double n, ReadOnlySpan<double> y, Span<double> dy)
    {
        _count++;
        var bg = _bg!;
        // Strictly inside the current segment, so that after a non-smooth point the new side is seen (e2 jumps there).
        double eps = 1e-10 * Math.Max(1.0, Math.Abs(n));
        double ne = n - _segLo < eps ? _segLo + eps : _segHi - n < eps ? _segHi - eps : n;
        var p = bg.At(ne);
        double x = Math.Exp(_lnK - n) / p.H;
        double x2 = x * x, f = 3.0 - p.Epsilon1 + p.Epsilon2;
        dy[0] = y[2];
        dy[1] = y[3];
        dy[2] = -f * y[2] - x2 * y[0];
        dy[3] = -f * y[3] - x2 * y[1];
    }
}
