using System.Numerics;
using ModeSolver.Background;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The early-time part of the in-in integral, from tau = -infinity to the start N_w of the numerical quadrature, in the
/// limit kappa -> 0 of the convergence factor exp(-kappa K/(aH)) (Chen, Easther &amp; Lim 2007, JCAP 06, 023; the i epsilon
/// prescription), taken analytically by repeated integration by parts. Inside the horizon the integrand is
/// Y = A(N) exp(i Phi), Phi = K tau (dPhi/dN = x = K/(aH)), with A smooth; then
///   Integral_{-inf}^{N_w} Y dN = Sum_n (-1)^n P_n / (i x)^(n+1) at N_w,
///   P_0 = A, P_(n+1) = P_n' + (n + 1) s P_n, s = 1 - e1 (x' = -s x, s frozen at N_w),
/// which terminates for the polynomial part of A in x (the Bunch-Davies modes give A = x^2 (c0 + c1/x + c2/x^2 + ...)),
/// so four terms leave O(x^-4) relative. A and its first three N-derivatives come from a 5-point stencil of width h
/// around N_w on the dense histories, with the phase Phi integrated between the stencil points by Gauss-Legendre.
/// A feature of the background before N_w is not in A: the deeper-start variant of the error estimate sees it.
/// </summary>
internal static class EarlyTimes
{
    /// <summary>Stencil spacing in e-folds (A changes on the scale of an e-fold).</summary>
    public const double Spacing = 0.02;

    // 5-point Gauss-Legendre on [-1, 1] (Abramowitz & Stegun 1964, table 25.4) for the phase between stencil points.
    private static ReadOnlySpan<double> Nodes => [0.0, 0.5384693101056831, 0.9061798459386640];
    private static ReadOnlySpan<double> Weights => [0.5688888888888889, 0.4786286704993665, 0.2369268850405501];

    /// <summary>The tail integral at <paramref name="nw"/> and the size of its last term (the truncation estimate).</summary>
    public static Complex Tail(IBackground bg, in CubicVertices v, ModeHistory h1, ModeHistory h2, ModeHistory h3,
        double lnK, double nw, out double lastTerm)
    {
        const double h = Spacing;
        Span<Complex> a = stackalloc Complex[5];
        for (int j = -2; j <= 2; j++)
        {
            double n = nw + j * h;
            var y = InInIntegral.At(bg, v, h1, h2, h3, lnK, n, out _);
            double phase = j == 0 ? 0 : Phase(bg, lnK, nw, n);
            a[j + 2] = y * Complex.FromPolarCoordinates(1.0, -phase);
        }
        Complex a0 = a[2];
        Complex a1 = (a[0] - 8.0 * a[1] + 8.0 * a[3] - a[4]) / (12.0 * h);
        Complex a2 = (-a[0] + 16.0 * a[1] - 30.0 * a[2] + 16.0 * a[3] - a[4]) / (12.0 * h * h);
        Complex a3 = (a[4] - 2.0 * a[3] + 2.0 * a[1] - a[0]) / (2.0 * h * h * h);
        var p = bg.At(nw);
        double s = 1.0 - p.Epsilon1;
        double x = Math.Exp(lnK - nw) / p.H;
        Complex p0 = a0;
        Complex p1 = a1 + s * a0;
        Complex p2 = a2 + 3.0 * s * a1 + 2.0 * s * s * a0;
        Complex p3 = a3 + 6.0 * s * a2 + 11.0 * s * s * a1 + 6.0 * s * s * s * a0;
        Complex ix = new(0, x);
        Complex t0 = p0 / ix, t1 = -p1 / (ix * ix), t2 = p2 / (ix * ix * ix), t3 = -p3 / (ix * ix * ix * ix);
        lastTerm = t3.Magnitude;
        return t0 + t1 + t2 + t3;
    }

    /// <summary>Phi(n) - Phi(nw) = Integral x dN.</summary>
    private static double Phase(IBackground bg, double lnK, double nw, double n)
    {
        double mid = 0.5 * (nw + n), half = 0.5 * (n - nw), sum = 0;
        var nodes = Nodes;
        var weights = Weights;
        for (int i = 0; i < nodes.Length; i++)
        {
            for (int sgn = -1; sgn <= 1; sgn += 2)
            {
                if (i == 0 && sgn == 1) continue;
                double t = mid + sgn * half * nodes[i];
                sum += weights[i] * Math.Exp(lnK - t) / bg.At(t).H;
            }
        }
        return half * sum;
    }
}
