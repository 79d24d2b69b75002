using ModeSolver.Background;
using ModeSolver.Integrators;

namespace ModeSolver.Perturbations;

/// <summary>
/// The mode equations deep inside the horizon, stepped by the exact propagator of a frozen power-law background.
/// On each step [N0, N1] the Hubble-flow parameters are frozen at the midpoint (e1, e2, and k/aH there), which makes the
/// zeta equation zeta'' + F zeta' + x^2 zeta = 0 (F = 3 - e1 + e2) exactly solvable: with X = x/(1 - e1) = -k tau
/// (x = x_mid exp(-(1 - e1)(N - N_mid))), zeta = X^nu [A J_nu(X) + B Y_nu(X)], nu = F/(2(1 - e1)), and
/// d zeta/dN = -(1 - e1) X^(nu+1) [A J_(nu-1) + B Y_(nu-1)] (Abramowitz &amp; Stegun 9.1.30); the tensor mode has
/// F = 3 - e1. The step matrix Phi = W(X1) W(X0)^-1 uses the Wronskian J_nu Y_(nu-1) - J_(nu-1) Y_nu = 2/(pi X)
/// (A&amp;S 9.1.16) and the modulus-phase form of the Bessel functions (<see cref="BesselModulusPhase"/>):
///   Phi11 = r^(nu-1/2) R cos(phi11),            Phi12 = r^(nu-1/2) R sin(phi12) / ((1 - e1) X0),
///   Phi21 = -(1 - e1) r^(nu+1/2) X0 R sin(phi21), Phi22 = r^(nu+1/2) R cos(phi22),   r = X1/X0,
/// where each phi is X0 - X1 plus the difference of two phase corrections, so the oscillation is carried exactly
/// whatever the step and the cost does not grow with the number of oscillations. The k-derivative blocks (sensitivity
/// equations) are carried by the ln k-derivatives of Phi (X is proportional to k): Z1 -> Phi Z1 + Phi' Z0,
/// Z2 -> Phi Z2 + 2 Phi' Z1 + Phi'' Z0, all from <see cref="Jet2"/> arithmetic. This is a piecewise-analytic
/// (Gordon-type) method with Bessel-function segments; its step control is <see cref="PropagatorStepper"/>'s.
/// A step is declined (the mode switches to Runge-Kutta) when X1 &lt; <see cref="MinArgument"/>, nu &lt; 1, or the
/// truncation of the modulus-phase series exceeds a thousandth of the step tolerance.
/// </summary>
internal sealed class OscillatoryRegime
{
    /// <summary>Smallest -k tau served: below it the mode goes to Runge-Kutta (the series need X well above nu^2).</summary>
    public const double MinArgument = 8;

    /// <summary>First trial step in e-folds.</summary>
    public const double FirstStep = 0.05;

    private readonly PropagatorStepper _stepper = new(24);
    private readonly PropagatorStep _step;
    private IBackground _bg = null!;
    private double _lnK, _tol;
    private ModeContext _ctx = null!;
    private int _evaluations;
    private int[] _scaleIndex = new int[24];

    public OscillatoryRegime() => _step = Step;

    /// <summary>Background evaluations (one per propagator) of the last <see cref="Advance"/>.</summary>
    public int BackgroundEvaluations => _evaluations;

    /// <summary>
    /// Advances the mode state <paramref name="y"/> (laid out by <paramref name="ctx"/>: one block per system, every
    /// system a <see cref="DecoupledModeSystem"/>, each value block [Re f, Im f, Re f', Im f'] followed by the two
    /// derivative blocks when it carries k-derivatives) from <paramref name="n0"/> towards <paramref name="n1"/>.
    /// Returns the run (where it stopped, steps, error estimates).
    /// </summary>
    public PropagatorRun Advance(IBackground background, double lnK, double n0, double n1, Span<double> y,
        ModeContext ctx, double tolerance, int maxSteps)
    {
        _bg = background;
        _lnK = lnK;
        _ctx = ctx;
        _tol = tolerance;
        _evaluations = 0;
        if (_scaleIndex.Length < y.Length) _scaleIndex = new int[y.Length];
        // Errors of every block (value and k-derivatives) are measured against the value block: an error in the
        // k-derivative block Z_j, which is ~(k/aH)^j larger than Z_0 inside the horizon, reaches n_s and alpha_s
        // after exit undiminished. Values against |f|, N-derivatives against |f'|.
        var layout = ctx.Layout;
        for (int s = 0; s < layout.Count; s++)
        {
            var b = layout[s];
            for (int i = b.Offset; i < b.Offset + b.Size; i++)
            {
                int within = (i - b.Offset) % 4;
                _scaleIndex[i] = b.Offset + (within < 2 ? 0 : 2);
            }
        }
        return _stepper.Advance(_step, n0, n1, FirstStep, y, _scaleIndex.AsSpan(0, y.Length), tolerance, maxSteps);
    }

    private bool Step(double n0, double n1, ReadOnlySpan<double> y, Span<double> yOut)
    {
        double nm = 0.5 * (n0 + n1), h = n1 - n0;
        _evaluations++;
        var p = _bg.At(nm);
        double e1 = p.Epsilon1;
        if (!(e1 < 1) || !double.IsFinite(p.Epsilon2)) return false;
        double c = 1.0 - e1;
        double xm = Math.Exp(_lnK - nm) / p.H / c;
        double half = 0.5 * c * h;
        double x0 = xm * Math.Exp(half), x1 = xm * Math.Exp(-half);
        if (!(x1 >= MinArgument)) return false;
        double diff = 2.0 * xm * Math.Sinh(half);
        Span<Jet2> phi = stackalloc Jet2[4];
        var layout = _ctx.Layout;
        for (int s = 0; s < layout.Count; s++)
        {
            var sys = (DecoupledModeSystem)_ctx.System(s);
            if (!Propagator(sys.Friction(p) / (2.0 * c), c, x0, x1, diff, phi)) return false;
            Apply(phi, y, yOut, layout[s].Offset, layout[s].Size > 4);
        }
        return true;
    }

    /// <summary>Phi11, Phi12, Phi21, Phi22 as ln k-jets for index nu, c = 1 - e1, X0 &gt; X1, diff = X0 - X1.</summary>
    private bool Propagator(double nu, double c, double x0, double x1, double diff, Span<Jet2> phi)
    {
        if (!(nu >= 1) || !double.IsFinite(nu)) return false;
        var j0 = Jet2.Exponential(x0);
        var j1 = Jet2.Exponential(x1);
        var d = Jet2.Exponential(diff);
        var (mA0, sA0, tA0) = BesselModulusPhase.Evaluate(nu, j0);
        var (mA1, sA1, tA1) = BesselModulusPhase.Evaluate(nu, j1);
        var (mB0, sB0, tB0) = BesselModulusPhase.Evaluate(nu - 1, j0);
        var (mB1, sB1, tB1) = BesselModulusPhase.Evaluate(nu - 1, j1);
        if (Math.Max(Math.Max(tA0, tA1), Math.Max(tB0, tB1)) > 1e-3 * _tol) return false;
        var one = Jet2.Constant(1.0);
        var fA0 = one + mA0; var fA1 = one + mA1; var fB0 = one + mB0; var fB1 = one + mB1;
        double r = x1 / x0;
        double lo = Math.Pow(r, nu - 0.5), hi = lo * r;
        // phi11: theta_(nu-1)(X0) - theta_nu(X1) - pi/2; phi12: theta_nu(X0) - theta_nu(X1); and so on.
        var (_, cos11) = Jet2.SinCos(d + sB0 - sA1);
        var (sin12, _) = Jet2.SinCos(d + sA0 - sA1);
        var (sin21, _) = Jet2.SinCos(d + sB0 - sB1);
        var (_, cos22) = Jet2.SinCos(d + sA0 - sB1);
        phi[0] = lo * (Jet2.Sqrt(fA1 * fB0) * cos11);
        phi[1] = (lo / c) * (Jet2.Sqrt(fA1 * fA0) * sin12 / j0);
        phi[2] = (-c * hi) * (Jet2.Sqrt(fB1 * fB0) * sin21 * j0);
        phi[3] = hi * (Jet2.Sqrt(fB1 * fA0) * cos22);
        return true;
    }

    /// <summary>Applies the lifted step matrix to the blocks at <paramref name="off"/>.</summary>
    private static void Apply(ReadOnlySpan<Jet2> phi, ReadOnlySpan<double> y, Span<double> yOut, int off, bool derivatives)
    {
        Jet2 p11 = phi[0], p12 = phi[1], p21 = phi[2], p22 = phi[3];
        for (int part = 0; part < 2; part++)
        {
            int a = off + part, b = off + 2 + part; // value and N-derivative of block 0
            double z0 = y[a], dz0 = y[b];
            yOut[a] = p11.C0 * z0 + p12.C0 * dz0;
            yOut[b] = p21.C0 * z0 + p22.C0 * dz0;
            if (!derivatives) continue;
            double z1 = y[a + 4], dz1 = y[b + 4], z2 = y[a + 8], dz2 = y[b + 8];
            yOut[a + 4] = p11.C0 * z1 + p12.C0 * dz1 + p11.D1 * z0 + p12.D1 * dz0;
            yOut[b + 4] = p21.C0 * z1 + p22.C0 * dz1 + p21.D1 * z0 + p22.D1 * dz0;
            yOut[a + 8] = p11.C0 * z2 + p12.C0 * dz2 + 2.0 * (p11.D1 * z1 + p12.D1 * dz1) + p11.D2 * z0 + p12.D2 * dz0;
            yOut[b + 8] = p21.C0 * z2 + p22.C0 * dz2 + 2.0 * (p21.D1 * z1 + p22.D1 * dz1) + p21.D2 * z0 + p22.D2 * dz0;
        }
    }
}
