using ModeSolver.Integrators;

namespace ModeSolver.Perturbations;

/// <summary>
/// Modulus and phase of the Bessel functions of real order a &gt;= 0 for large argument X: J_a = M cos(theta),
/// Y_a = M sin(theta), with the asymptotic expansions of Abramowitz &amp; Stegun 9.2.28 and 9.2.29 (mu = 4 a^2):
///   M^2 ~ (2/(pi X)) [1 + (1/2)(mu-1)/(2X)^2 + (1.3/2.4)(mu-1)(mu-9)/(2X)^4 + (1.3.5/2.4.6)(mu-1)(mu-9)(mu-25)/(2X)^6
///          + (1.3.5.7/2.4.6.8)(mu-1)(mu-9)(mu-25)(mu-49)/(2X)^8],
///   theta ~ X - (a/2 + 1/4) pi + (mu-1)/(2 (4X)) + (mu-1)(mu-25)/(6 (4X)^3) + (mu-1)(mu^2 - 114 mu + 1073)/(5 (4X)^5)
///          + (mu-1)(5 mu^3 - 1535 mu^2 + 54703 mu - 375733)/(14 (4X)^7).
/// Both series terminate for half-integer orders (a = 1/2, 3/2: exact), so near de Sitter (a close to 3/2 and 1/2) their
/// terms are small from the first. Evaluated on <see cref="Jet2"/> arguments, so the derivatives in a parameter of X
/// come out exactly. The coefficients live here only. Checked against Steed's method (RealHankel) in the tests.
/// </summary>
internal static class BesselModulusPhase
{
    /// <summary>(M^2 X pi/2 - 1) and (theta - X + (a/2 + 1/4) pi) at X, and the size of the last terms kept (truncation estimate).</summary>
    public static (Jet2 ModulusSquaredFactor, Jet2 PhaseCorrection, double Truncation) Evaluate(double a, Jet2 x)
    {
        double mu = 4.0 * a * a;
        double p1 = mu - 1, p2 = p1 * (mu - 9), p3 = p2 * (mu - 25), p4 = p3 * (mu - 49);
        var inv = Jet2.Constant(1.0) / x;       // 1/X
        var u = 0.25 * inv;                      // 1/(4X)
        var w = 0.5 * inv;                       // 1/(2X)
        var w2 = w * w;
        // Horner in (2X)^-2: 1/2 p1 w^2 + 3/8 p2 w^4 + 15/48 p3 w^6 + 105/384 p4 w^8.
        var m = w2 * (Jet2.Constant(0.5 * p1) + w2 * (Jet2.Constant(0.375 * p2) + w2 * (Jet2.Constant(15.0 / 48.0 * p3) + (105.0 / 384.0 * p4) * w2)));
        var u2 = u * u;
        double q1 = p1 / 2.0, q3 = p1 * (mu - 25) / 6.0, q5 = p1 * (mu * mu - 114 * mu + 1073) / 5.0,
               q7 = p1 * (((5 * mu - 1535) * mu + 54703) * mu - 375733) / 14.0;
        var th = u * (Jet2.Constant(q1) + u2 * (Jet2.Constant(q3) + u2 * (Jet2.Constant(q5) + q7 * u2)));
        double wv = w.C0, uv = u.C0;
        double trunc = Math.Abs(105.0 / 384.0 * p4) * Math.Pow(wv, 8) + Math.Abs(q7) * Math.Pow(uv, 7);
        return (m, th, trunc);
    }
}
