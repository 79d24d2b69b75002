using ModeSolver.Models;

namespace ModeSolver.Tests.Background;

/// <summary>Hand-written theories with closed-form jets for the background and matching tests.</summary>
internal abstract class CanonicalTheory : IInflatonTheory
{
    public abstract string Description { get; }
    public abstract Jet3 Potential(double phi);
    public Jet3 Kinetic(double phi) => new(1, 0, 0, 0);
    public bool IsCanonical => true;
    public virtual IReadOnlyList<double> NonSmoothPoints => Array.Empty<double>();
    public virtual (double Min, double Max) ValidRange => (double.NegativeInfinity, double.PositiveInfinity);
}

/// <summary>V = scale * phi^2 / 2 (m = 1 times sqrt(scale)).</summary>
internal sealed class Quadratic(double scale = 1.0) : CanonicalTheory
{
    public override string Description => $"{scale} phi^2/2";
    public override Jet3 Potential(double phi) => new(scale * 0.5 * phi * phi, scale * phi, scale, 0);
}

/// <summary>Power-law inflation V = exp(-lambda phi) (Lucchin &amp; Matarrese 1985).</summary>
internal sealed class Exponential(double lambda) : CanonicalTheory
{
    public override string Description => $"exp(-{lambda} phi)";
    public override Jet3 Potential(double phi)
    {
        double e = Math.Exp(-lambda * phi);
        return new(e, -lambda * e, lambda * lambda * e, -lambda * lambda * lambda * e);
    }
}

/// <summary>T-model V = tanh^2(phi / sqrt(6 alpha)) (Kallosh, Linde &amp; Roest 2013).</summary>
internal sealed class TModel(double alpha) : CanonicalTheory
{
    private readonly double _c = 1.0 / Math.Sqrt(6 * alpha);
    public override string Description => $"T-model alpha = {alpha}";
    public override Jet3 Potential(double phi)
    {
        double t = Math.Tanh(_c * phi), s = 1 - t * t, c = _c;
        return new(t * t, c * 2 * t * s, c * c * (2 * s * s - 4 * t * t * s), c * c * c * (-16 * t * s * s + 8 * t * t * t * s));
    }
}

/// <summary>Starobinsky V = (1 - exp(-sqrt(2/3) phi))^2 (Starobinsky 1980).</summary>
internal sealed class Starobinsky : CanonicalTheory
{
    private static readonly double B = Math.Sqrt(2.0 / 3.0);
    public override string Description => "Starobinsky";
    public override Jet3 Potential(double phi)
    {
        double x = Math.Exp(-B * phi), b = B;
        return new(1 - 2 * x + x * x, 2 * b * x - 2 * b * x * x, -2 * b * b * x + 4 * b * b * x * x, 2 * b * b * b * x - 8 * b * b * b * x * x);
    }
}

/// <summary>Linear potential with a change of slope at phi0 (Starobinsky 1992): V0 + A(phi - phi0), A = A_plus above, A_minus below.</summary>
internal sealed class LinearKink(double v0, double aPlus, double aMinus, double phi0) : CanonicalTheory
{
    public override string Description => "linear with a kink";
    public override Jet3 Potential(double phi)
    {
        double a = phi >= phi0 ? aPlus : aMinus;
        return new(v0 + a * (phi - phi0), a, 0, 0);
    }
    public override IReadOnlyList<double> NonSmoothPoints => new[] { phi0 };
}

/// <summary>V = 1 - 0.01 phi below phi = 1 and V = -1 above: the potential steps to negative values.</summary>
internal sealed class StepToNegative : CanonicalTheory
{
    public override string Description => "step to negative V";
    public override Jet3 Potential(double phi) => phi < 1 ? new(1 - 0.01 * phi, -0.01, 0, 0) : new(-1, 0, 0, 0);
    public override IReadOnlyList<double> NonSmoothPoints => new[] { 1.0 };
}

/// <summary>A linear slope that returns NaN beyond phi = 2 (a broken formula).</summary>
internal sealed class NaNBeyond : CanonicalTheory
{
    public override string Description => "NaN beyond 2";
    public override Jet3 Potential(double phi) => phi < 2 ? new(1 - 0.01 * phi, -0.01, 0, 0) : new(double.NaN, double.NaN, 0, 0);
}

/// <summary>
/// Pole kinetic term K = (1 - phi^2/(6 alpha))^(-2) with V = phi^2/(6 alpha): in the canonical field chi,
/// phi = sqrt(6 alpha) tanh(chi / sqrt(6 alpha)), so V = tanh^2(chi / sqrt(6 alpha)), the T-model (Kallosh, Linde &amp; Roest 2013).
/// </summary>
internal sealed class PoleTModel(double alpha) : IInflatonTheory
{
    private readonly double _c = 6 * alpha;
    public string Description => $"pole kinetic term alpha = {alpha}";
    public Jet3 Potential(double phi) => new(phi * phi / _c, 2 * phi / _c, 2 / _c, 0);
    public Jet3 Kinetic(double phi)
    {
        double w = 1 - phi * phi / _c, w1 = -2 * phi / _c, w2 = -2 / _c;
        double k = 1 / (w * w);
        double k1 = -2 * w1 / (w * w * w);
        double k2 = 6 * w1 * w1 / (w * w * w * w) - 2 * w2 / (w * w * w);
        double k3 = -24 * w1 * w1 * w1 / Math.Pow(w, 5) + 18 * w1 * w2 / (w * w * w * w);
        return new(k, k1, k2, k3);
    }
    public bool IsCanonical => false;
    public IReadOnlyList<double> NonSmoothPoints => Array.Empty<double>();
    public (double Min, double Max) ValidRange => (-Math.Sqrt(_c), Math.Sqrt(_c));
}

/// <summary>Continuous V = exp(-lambda_i phi + c_i) with slope lambda_i between the break points (kinks in V_phi).</summary>
internal sealed class PiecewiseExponential : CanonicalTheory
{
    private readonly double[] _breaks, _lambdas, _offsets;

    public PiecewiseExponential(double[] breaks, double[] lambdas)
    {
        _breaks = breaks;
        _lambdas = lambdas;
        _offsets = new double[lambdas.Length];
        for (int i = 1; i < lambdas.Length; i++)
            _offsets[i] = _offsets[i - 1] + (lambdas[i] - lambdas[i - 1]) * breaks[i - 1];
    }

    public override string Description => "piecewise exponential";
    public override Jet3 Potential(double phi)
    {
        int i = 0;
        while (i < _breaks.Length && phi >= _breaks[i]) i++;
        double l = _lambdas[i], e = Math.Exp(-l * phi + _offsets[i]);
        return new(e, -l * e, l * l * e, -l * l * l * e);
    }
    public override IReadOnlyList<double> NonSmoothPoints => _breaks;
}
