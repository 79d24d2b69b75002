using System.Numerics;

namespace ModeSolver.Tests.Bispectrum;

/// <summary>
/// The bispectrum of the linear potential with a change of slope (Starobinsky 1992, JETP Lett. 55, 489; physics.md 4(b))
/// in the limit where V0 dominates (e1 -> 0, de Sitter), derived in docs/bispectrum.md ("The kink reference"): only the
/// e1 e2' zeta^2 zeta' vertex of the cubic action survives (e2' = the jump Delta e2 = 6 D as a delta function at the kink
/// plus the relaxation afterwards), with the exact Starobinsky mode functions. Units H = 1, k0 = 1 (k = y), a = e^x with
/// x the e-folds after the kink; D = (A_minus - A_plus) / A_plus. Test oracle only.
/// </summary>
internal sealed class KinkReference(double d)
{
    // Gauss-Legendre 10-point nodes and weights on [-1, 1] (Abramowitz & Stegun 1964, table 25.4).
    private static readonly double[] Nodes = [0.1488743389816312, 0.4333953941292472, 0.6794095682990244, 0.8650633666889845, 0.9739065285171717];
    private static readonly double[] Weights = [0.2955242247147529, 0.2692667193099963, 0.2190863625159820, 0.1494513491505806, 0.0666713443086881];

    /// <summary>d phi/dN (in units of its value before the kink, which is -1) and its derivative at x e-folds after the kink.</summary>
    private (double PhiN, double PhiNN) Field(double x) =>
        x <= 0 ? (-1.0, 0.0) : (-(1 + d) + d * Math.Exp(-3 * x), -3 * d * Math.Exp(-3 * x));

    /// <summary>e1 (up to the overall scale, which cancels in f_NL), e2 and de2/dN at x.</summary>
    public (double E1, double E2, double E2N) Flow(double x)
    {
        var (p, pp) = Field(x);
        double e2 = 2 * pp / p;
        return (0.5 * p * p, e2, x <= 0 ? 0.0 : -3 * e2 - 0.5 * e2 * e2);
    }

    /// <summary>The jump of e2 at the kink, 6 D.</summary>
    public double Jump => 6 * d;

    /// <summary>Massless de Sitter mode of delta phi (Bunch-Davies) and its N-derivative; tau = -e^-x.</summary>
    private static (Complex F, Complex FN) DeSitter(double y, double x)
    {
        double tau = -Math.Exp(-x);
        var norm = new Complex(0, 1 / Math.Sqrt(2 * y * y * y));
        var ph = Complex.Exp(new Complex(0, -y * tau));
        return (norm * new Complex(1, y * tau) * ph, -norm * (y * y * tau * tau) * ph);
    }

    /// <summary>zeta_k and d zeta_k/dN at x: before the kink the Bunch-Davies mode, after it delta phi matched at the kink
    /// (delta phi continuous, d delta phi/dN jumping by 3 D delta phi: the delta-function mass V_phiphi), zeta = -delta phi / phi_N.</summary>
    public (Complex Z, Complex ZN) Mode(double y, double x)
    {
        var (f, fn) = DeSitter(y, x);
        if (x <= 0) return (f, fn);
        var (f0, fn0) = DeSitter(y, 0);
        Complex w = f0 * Complex.Conjugate(fn0) - Complex.Conjugate(f0) * fn0;
        double j = 3 * d;
        Complex c1 = 1 - j * f0 * Complex.Conjugate(f0) / w, c2 = j * f0 * f0 / w;
        Complex u = c1 * f + c2 * Complex.Conjugate(f), un = c1 * fn + c2 * Complex.Conjugate(fn);
        var (p, pp) = Field(x);
        return (-u / p, -un / p + u * pp / (p * p));
    }

    /// <summary>P_s(y) at x (frozen late) over its large-y limit 9 H^6 / (4 pi^2 A_minus^2).</summary>
    public double PowerRatio(double y, double x)
    {
        var z = Mode(y, x).Z;
        return y * y * y * (z.Real * z.Real + z.Imaginary * z.Imaginary) * 2 * (1 + d) * (1 + d);
    }

    /// <summary>The closed form of physics.md 4(b) (Starobinsky 1992) over its large-y limit.</summary>
    public double ClosedFormPowerRatio(double y)
    {
        double s = Math.Sin(2 * y), c = Math.Cos(2 * y), iy = 1 / y, iy2 = iy * iy;
        return 1 - 3 * d * iy * ((1 - iy2) * s + 2 * iy * c) + 4.5 * d * d * iy2 * (1 + iy2) * (1 + iy2 + (1 - iy2) * c - 2 * iy * s);
    }

    /// <summary>n_s - 1 of the closed form, d ln P / d ln y by a central difference (step 1e-4 in ln y, error ~1e-8).</summary>
    public double ClosedFormTilt(double y)
    {
        const double h = 1e-4;
        return (Math.Log(ClosedFormPowerRatio(y * Math.Exp(h))) - Math.Log(ClosedFormPowerRatio(y * Math.Exp(-h)))) / (2 * h);
    }

    /// <summary>f_NL(y1, y2, y3) ending at xEnd e-folds after the kink, with panels of at most <paramref name="panel"/> e-folds.</summary>
    public double FNL(double y1, double y2, double y3, double xEnd, double panel = 0.02)
    {
        double ysum = y1 + y2 + y3;
        // The delta function at the kink: a^3 H e1 Delta e2 S(0), a = H = 1 there.
        Complex integral = Flow(0).E1 * Jump * S(y1, y2, y3, 0.0);
        double x = 0;
        while (x < xEnd)
        {
            double h = Math.Min(panel, Math.Min(0.3 * Math.Exp(x) / ysum, xEnd - x));
            double mid = x + 0.5 * h, half = 0.5 * h;
            for (int i = 0; i < Nodes.Length; i++)
                foreach (double s in (ReadOnlySpan<double>)[-1.0, 1.0])
                {
                    double xi = mid + s * half * Nodes[i];
                    var fl = Flow(xi);
                    integral += Weights[i] * half * Math.Exp(3 * xi) * fl.E1 * fl.E2N * S(y1, y2, y3, xi);
                }
            x += h;
        }
        var (z1, _) = Mode(y1, xEnd);
        var (z2, _) = Mode(y2, xEnd);
        var (z3, _) = Mode(y3, xEnd);
        double p1 = Norm(z1), p2 = Norm(z2), p3 = Norm(z3), pp = p1 * p2 + p2 * p3 + p3 * p1;
        double b = -2 * (z1 * z2 * z3 * integral).Imaginary + 0.5 * Flow(xEnd).E2 * pp;
        return 5.0 / 6.0 * b / pp;
    }

    /// <summary>S = Sum over the side i carrying the derivative of conj(zeta_j zeta_l d zeta_i/dN).</summary>
    private Complex S(double y1, double y2, double y3, double x)
    {
        var (a, an) = Mode(y1, x);
        var (b, bn) = Mode(y2, x);
        var (c, cn) = Mode(y3, x);
        return Complex.Conjugate(b * c * an + c * a * bn + a * b * cn);
    }

    private static double Norm(Complex z) => z.Real * z.Real + z.Imaginary * z.Imaginary;
}
