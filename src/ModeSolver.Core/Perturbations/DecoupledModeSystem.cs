using System.Numerics;
using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// A mode system of one decoupled damped oscillator f'' + F f' + x^2 f = 0 (x = k/aH, friction F from the
/// Hubble-flow parameters), carried with its k-derivatives in scale-subtracted form (<see cref="ScaleSubtractedBlocks"/>,
/// block of 12 doubles; 4 without k-derivatives: Re f, Im f, Re f', Im f'). Subclasses give the friction, its
/// N-derivative, the local Hankel index, the normalisation of the Bunch-Davies data (f = v / z) and of the power.
/// Keeps the block's scales (amplitude, W1, Y2) chosen at the start of each mode.
/// </summary>
internal abstract class DecoupledModeSystem : IModeSystem
{
    /// <summary>The amplitude scale: the carried block is the physical one times this (|f| of order 1 after exit).</summary>
    protected double Scale { get; private set; } = 1;

    /// <summary>Scales of the first and second k-derivative blocks (W1/s1, Y2/s2).</summary>
    protected double S1 { get; private set; } = 1;

    /// <inheritdoc cref="S1"/>
    protected double S2 { get; private set; } = 1;

    /// <inheritdoc />
    public abstract string Name { get; }

    /// <inheritdoc />
    public abstract bool GrowsOutsideHorizon { get; }

    /// <summary>Friction F of the equation at <paramref name="p"/>.</summary>
    public abstract double Friction(in BackgroundPoint p);

    /// <summary>dF/dN at <paramref name="p"/>.</summary>
    public abstract double FrictionSlope(in BackgroundPoint p);

    /// <inheritdoc />
    public abstract double LocalIndex(in BackgroundPoint p);

    /// <summary>ln(sqrt(-tau)/z) at the stencil point: the log amplitude of the Hankel solution in f.</summary>
    protected abstract double LnAmplitude(in VacuumPoint v);

    /// <summary>z'/z (N-derivative): f' = (v' - (z'/z) v)/z.</summary>
    protected abstract double ZPrimeOverZ(in BackgroundPoint p);

    /// <summary>The power is k^3 |f|^2 divided by this.</summary>
    protected abstract double PowerDivisor { get; }

    /// <summary>Refuses a background the system has no Bunch-Davies data on (throws <see cref="Physics.PhysicsException"/>).</summary>
    protected virtual void CheckVacuum(in VacuumPoint v) { }

    /// <inheritdoc />
    public int StateSize(bool derivatives) => derivatives ? 12 : 4;

    /// <inheritdoc />
    public int VacuumWidth => 6;

    /// <inheritdoc />
    public void Vacuum(in VacuumPoint v, Span<Complex> d)
    {
        CheckVacuum(v);
        var p = v.Background;
        double nu = v.Kind == InitialDataKind.QuasiDeSitter ? 1.5 : LocalIndex(p);
        Span<Complex> g = stackalloc Complex[4];
        BunchDaviesData.HankelDerivatives(nu, v.BigX, g);
        Complex cn = BunchDaviesData.Normalisation(nu, LnAmplitude(v));
        double zp = ZPrimeOverZ(p);
        double oneMinus = v.OneMinusE1;
        for (int j = 0; j < 3; j++)
        {
            Complex u = cn * g[j];
            Complex du = -oneMinus * cn * (0.5 * g[j] + g[j + 1]);
            d[2 * j] = u;
            d[2 * j + 1] = du - zp * u;
        }
    }

    /// <inheritdoc />
    public void Start(BunchDaviesData data, int slot, in BackgroundPoint p0, double x0, Span<double> block)
    {
        if (block.Length == 4)
        {
            data.Value(slot, block);
            S1 = S2 = 1;
        }
        else
        {
            Span<double> fr = stackalloc double[BunchDaviesData.StencilPoints];
            Frictions(data.Wide, fr);
            data.DerivativeBlocks(data.Wide, slot, fr, block);
            Frictions(data.Narrow, fr);
            data.FirstDerivativeBlock(data.Narrow, slot, fr, block);
            ScaleSubtractedBlocks.FromSensitivities(block, Friction(p0), x0 * x0, 1.0, 1.0);
            double s1 = ScaleSubtractedBlocks.Scale(block, 4, x0);
            double s2 = ScaleSubtractedBlocks.Scale(block, 8, x0 * x0);
            for (int i = 4; i < 8; i++) block[i] /= s1;
            for (int i = 8; i < 12; i++) block[i] /= s2;
            S1 = s1;
            S2 = s2;
        }
        double scale = x0 / Math.Sqrt(block[0] * block[0] + block[1] * block[1]); // |f| of order 1 after horizon exit
        for (int i = 0; i < block.Length; i++) block[i] *= scale;
        Scale = scale;
    }

    private void Frictions(BunchDaviesData.Stencil stencil, Span<double> fr)
    {
        for (int j = 0; j < fr.Length; j++) fr[j] = Friction(stencil.Points[j]);
    }

    /// <summary>
    /// Right-hand side of the block. Sealed subclasses override it with the same line, so that the JIT binds their
    /// friction directly (no virtual call per right-hand side).
    /// </summary>
    public abstract void Rhs(in BackgroundPoint p, double x2, ReadOnlySpan<double> y, Span<double> dy);

    /// <summary>The right-hand side for friction <paramref name="f"/> and its slope <paramref name="fp"/>.</summary>
    protected void Rhs(double f, double fp, double e1, double x2, ReadOnlySpan<double> y, Span<double> dy) =>
        ScaleSubtractedBlocks.Rhs(y, dy, f, fp, e1, x2, S1, S2, y.Length > 4);

    /// <inheritdoc />
    public void Kink(in BackgroundPoint before, in BackgroundPoint after, double x2, Span<double> block)
    {
        if (block.Length <= 4) return;
        double fb = Friction(before), fa = Friction(after);
        ScaleSubtractedBlocks.Kink(block, fa - fb, fb, x2, S1, S2);
    }

    /// <summary>Converts the k-derivative blocks between the carried form and (f_k, f_kk) at <paramref name="p"/>, keeping the scales.</summary>
    public void Convert(in BackgroundPoint p, double x2, Span<double> block, bool toCarried)
    {
        if (block.Length <= 4) return;
        if (toCarried) ScaleSubtractedBlocks.FromSensitivities(block, Friction(p), x2, S1, S2);
        else ScaleSubtractedBlocks.ToSensitivities(block, Friction(p), x2, S1, S2);
    }

    /// <inheritdoc />
    public double AmplitudeSquared(ReadOnlySpan<double> block) => block[0] * block[0] + block[1] * block[1];

    /// <inheritdoc />
    public void Tolerances(Span<double> atol, double value, double derivative)
    {
        for (int j = 0; j < atol.Length / 4; j++)
        {
            atol[4 * j] = value;
            atol[4 * j + 1] = value;
            atol[4 * j + 2] = derivative;
            atol[4 * j + 3] = derivative;
        }
    }

    /// <summary>
    /// Outside the horizon f tends to a constant as f_inf - f = f'/r with r = -f''/f' (one decay rate; Aitken-type):
    /// frozen when every |f'/r| of the value and k-derivative blocks is below <paramref name="tol"/> relative to |f|.
    /// </summary>
    public bool TryFreeze(ReadOnlySpan<double> y, ReadOnlySpan<double> dy, double tol, ref double correction)
    {
        var f1 = new Complex(y[2], y[3]);
        var f2 = new Complex(dy[2], dy[3]);
        double mag = new Complex(y[0], y[1]).Magnitude;
        if (f1 == Complex.Zero) return true;
        Complex r = -f2 / f1;
        if (!(r.Real > 0.5)) return false; // not decaying: keep going
        for (int j = 0; j < y.Length / 4; j++)
        {
            var d = new Complex(y[4 * j + 2], y[4 * j + 3]) / r;
            double rel = d.Magnitude / mag;
            if (!(rel <= tol)) return false;
            correction = Math.Max(correction, rel);
        }
        return true;
    }

    /// <inheritdoc />
    public void ApplyFreeze(Span<double> y, ReadOnlySpan<double> dy)
    {
        var f1 = new Complex(y[2], y[3]);
        if (f1 == Complex.Zero) return;
        Complex r = -new Complex(dy[2], dy[3]) / f1;
        for (int j = 0; j < y.Length / 4; j++)
        {
            int o = 4 * j;
            var d = new Complex(y[o + 2], y[o + 3]) / r;
            y[o] += d.Real;
            y[o + 1] += d.Imaginary;
        }
    }

    /// <inheritdoc />
    public ModePower Power(ReadOnlySpan<double> block, bool frozen, in BackgroundPoint p, double x2, double lnK, double lnRef)
    {
        double ln = ScaleSubtractedBlocks.LogDerivatives(block, frozen, block.Length > 4, Friction(p), x2, S1, S2, out double slope, out double running);
        double power = Math.Exp(3.0 * lnK + ln - 2.0 * Math.Log(Scale) + 2.0 * lnRef) / PowerDivisor;
        return new ModePower(power, slope, running);
    }

    /// <inheritdoc />
    public (Complex Value, Complex Derivative) Amplitude(ReadOnlySpan<double> block, double lnRef) =>
        (new Complex(block[0], block[1]) * (Math.Exp(lnRef) / Scale), new Complex(block[2], block[3]) * (Math.Exp(lnRef) / Scale));

    /// <summary>nu from U and 1 - e1: nu^2 = U/(1 - e1)^2 + 1/4 (physics.md 3).</summary>
    internal static double IndexFrom(double u, double oneMinusE1)
    {
        double nu2 = u / (oneMinusE1 * oneMinusE1) + 0.25;
        return Math.Sqrt(Math.Max(nu2, 0.0));
    }
}
