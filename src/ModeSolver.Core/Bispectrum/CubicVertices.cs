using System.Numerics;
using ModeSolver.Background;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The integrand of the tree-level in-in integral of Maldacena's cubic action (Maldacena 2003, JHEP 05, 013, eq. 3.9 with
/// the field redefinition) for one triangle, in e-folds with the Hubble-flow parameters (the seven terms G1..G7 of
/// Martin &amp; Sriramkumar 2012, JCAP 01, 008, section 2, rewritten with dN = aH d tau and d tau-derivatives aH d/dN).
/// In terms of u_i = k_i^(3/2) zeta_i, x = K/(aH) and q_i = k_i/K (K the perimeter), the bispectrum is
///   B(k1,k2,k3) = (k1 k2 k3)^-3 K^3 S,  S = -2 Im[U_e Integral(Y dN)] + (e2(N_e)/2) D + R,  U_e = u1 u2 u3 at the end,
///   D = sum over pairs |u_i|^2 |u_j|^2 q_l^3,  f_NL = (5/6) B / (P1 P2 + P2 P3 + P3 P1) = (5/6) S / D,
/// where the last two terms come from the field redefinition zeta = zeta_n + (e2/4) zeta_n^2 + zeta_n d zeta_n/dN + ...
/// (Maldacena 2003 eq. 3.9; the terms with spatial gradients fall off as (k/aH)^2 and are left out, which the end-depth
/// variant of the error estimate measures): R = Sum_i q_i^3 [|u_j|^2 Re(u_l' conj u_l) + Re(u_j' conj u_j) |u_l|^2]
/// (negligible after exit in slow roll, where zeta' decays; 6 D in ultra-slow roll, where zeta' = 3 zeta),
/// with Y = conj of [ 2 e1^2 Sum_i P_i + (-2 e1^2 + e1^3/2) Sum_i c3_i P_i + (e1^3/2) Sum_i c6_i P_i
///                   + e1 e2' Sum_i u_j u_l u_i' ] / (x^3 H^2)  -  2 (q1.q2 + q2.q3 + q3.q1) e1^2 conj(u1 u2 u3) / (x H^2),
/// P_i = u_i u_j' u_l' ((i, j, l) a cyclic order), c3_i = q_i.q_j / q_j^2 + q_i.q_l / q_l^2 (the G3 and G5 terms),
/// c6_i = q_i^2 (q_j.q_l) / (q_j^2 q_l^2) (G6), e2' = e2 e3 (G4) and q_i.q_j = (q_l^2 - q_i^2 - q_j^2)/2 (the triangle closes).
/// A jump of e2 at a non-smooth point adds e1 Delta e2 Sum_i conj(u_j u_l u_i') / (x^3 H^2) there (G4 with e2' a delta).
/// </summary>
internal readonly struct CubicVertices
{
    private readonly double _c3a, _c3b, _c3c, _c6a, _c6b, _c6c, _dots;

    /// <summary>The coefficients of triangle <paramref name="t"/>.</summary>
    public CubicVertices(in Triangle t)
    {
        double k = t.Perimeter;
        double q1 = t.K1 / k, q2 = t.K2 / k, q3 = t.K3 / k;
        double d12 = 0.5 * (q3 * q3 - q1 * q1 - q2 * q2);
        double d23 = 0.5 * (q1 * q1 - q2 * q2 - q3 * q3);
        double d31 = 0.5 * (q2 * q2 - q3 * q3 - q1 * q1);
        double s1 = q1 * q1, s2 = q2 * q2, s3 = q3 * q3;
        _c3a = d12 / s2 + d31 / s3;
        _c3b = d23 / s3 + d12 / s1;
        _c3c = d31 / s1 + d23 / s2;
        _c6a = s1 * d23 / (s2 * s3);
        _c6b = s2 * d31 / (s3 * s1);
        _c6c = s3 * d12 / (s1 * s2);
        _dots = d12 + d23 + d31;
        Q1 = q1; Q2 = q2; Q3 = q3;
    }

    /// <summary>Sides over the perimeter.</summary>
    public double Q1 { get; }
    /// <inheritdoc cref="Q1"/>
    public double Q2 { get; }
    /// <inheritdoc cref="Q1"/>
    public double Q3 { get; }

    /// <summary>The integrand Y (complex, before the projection -2 Im[U_e Y]) at one instant.</summary>
    public Complex Integrand(in BackgroundPoint p, double x, Complex u1, Complex u2, Complex u3, Complex d1, Complex d2, Complex d3)
    {
        double e1 = p.Epsilon1, e1s = e1 * e1, e2p = p.Epsilon2 * p.Epsilon3;
        Complex p1 = u1 * d2 * d3, p2 = u2 * d3 * d1, p3 = u3 * d1 * d2;
        Complex sum = p1 + p2 + p3;
        Complex c3 = _c3a * p1 + _c3b * p2 + _c3c * p3;
        Complex c6 = _c6a * p1 + _c6b * p2 + _c6c * p3;
        Complex one = u2 * u3 * d1 + u3 * u1 * d2 + u1 * u2 * d3;
        double h2 = p.H * p.H, x3 = x * x * x;
        Complex deriv = (2.0 * e1s * sum + (-2.0 * e1s + 0.5 * e1s * e1) * c3 + 0.5 * e1s * e1 * c6 + e1 * e2p * one) / (x3 * h2);
        Complex grad = (-2.0 * _dots * e1s / (x * h2)) * (u1 * u2 * u3);
        return Complex.Conjugate(deriv + grad);
    }

    /// <summary>The point contribution of a jump <paramref name="jump"/> of e2 (the G4 term with e2' a delta function).</summary>
    public static Complex Jump(double e1, double jump, double h, double x, Complex u1, Complex u2, Complex u3, Complex d1, Complex d2, Complex d3)
    {
        Complex one = u2 * u3 * d1 + u3 * u1 * d2 + u1 * u2 * d3;
        return Complex.Conjugate(e1 * jump / (x * x * x * h * h) * one);
    }

    /// <summary>R = Sum_i q_i^3 [|u_j|^2 Re(u_l' conj u_l) + Re(u_j' conj u_j) |u_l|^2], the zeta zeta' part of the field redefinition.</summary>
    public double Redefinition(Complex u1, Complex u2, Complex u3, Complex d1, Complex d2, Complex d3)
    {
        double a = Norm(u1), b = Norm(u2), c = Norm(u3);
        double ra = (d1 * Complex.Conjugate(u1)).Real, rb = (d2 * Complex.Conjugate(u2)).Real, rc = (d3 * Complex.Conjugate(u3)).Real;
        return Q1 * Q1 * Q1 * (b * rc + rb * c) + Q2 * Q2 * Q2 * (c * ra + rc * a) + Q3 * Q3 * Q3 * (a * rb + ra * b);
    }

    private static double Norm(Complex z) => z.Real * z.Real + z.Imaginary * z.Imaginary;

    /// <summary>D = sum over pairs |u_i|^2 |u_j|^2 q_l^3 (the denominator of f_NL in these units).</summary>
    public double Denominator(Complex u1, Complex u2, Complex u3)
    {
        double a = u1.Real * u1.Real + u1.Imaginary * u1.Imaginary;
        double b = u2.Real * u2.Real + u2.Imaginary * u2.Imaginary;
        double c = u3.Real * u3.Real + u3.Imaginary * u3.Imaginary;
        return a * b * Q3 * Q3 * Q3 + b * c * Q1 * Q1 * Q1 + c * a * Q2 * Q2 * Q2;
    }
}
