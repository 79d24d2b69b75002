using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

/// <summary>Closed-form field functions written out by hand for the tests (polynomials with exact derivatives).</summary>
internal static class ClosedForms
{
    /// <summary>Polynomial sum_k c[k] phi^k with exact derivatives of any order.</summary>
    public static DerivativeFunction Polynomial(params double[] c) =>
        new((phi, d) =>
        {
            for (int order = 0; order < d.Length; order++)
            {
                double s = 0;
                for (int k = order; k < c.Length; k++)
                {
                    double f = 1;
                    for (int j = 0; j < order; j++) f *= k - j;
                    s += c[k] * f * Math.Pow(phi, k - order);
                }
                d[order] = s;
            }
        }, 6);
}
