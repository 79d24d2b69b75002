using System.Numerics;
using MathNet.Numerics;
using ModeSolver.Perturbations;
using Xunit;

namespace ModeSolver.Tests.Speed;

public class RealHankelTests
{
    // Both methods lose about x * 1e-14 relative accuracy at large x (argument reduction, CF1 length): the bound
    // allows 3e-14 * x, i.e. 1e-13 near the usual start depths x ~ 3 and 2e-11 at x = 700.
    private static double Bound(double x) => 3e-14 * Math.Max(x, 3.0);

    // Reference: MathNet.Numerics SpecialFunctions.HankelH1 (AMOS, Amos 1986, ACM TOMS 12, 265) for H_nu and,
    // through H'_nu = (nu/x) H_nu - H_{nu+1} (Abramowitz & Stegun 9.1.27), for the derivative.
    [Theory]
    [InlineData(0.0)]
    [InlineData(0.5)]
    [InlineData(1.5)]
    [InlineData(1.4987)]
    [InlineData(1.53)]
    [InlineData(2.2)]
    [InlineData(3.7)]
    public void MatchesAmosHankel(double nu)
    {
        for (double x = 2.0; x < 700; x *= 1.07)
        {
            Assert.True(RealHankel.TryBesselJY(nu, x, out double j, out double y, out double jp, out double yp));
            Complex h = SpecialFunctions.HankelH1(nu, new Complex(x, 0));
            Complex hp = nu / x * h - SpecialFunctions.HankelH1(nu + 1, new Complex(x, 0));
            double e0 = (new Complex(j, y) - h).Magnitude / h.Magnitude;
            double e1 = (new Complex(jp, yp) - hp).Magnitude / hp.Magnitude;
            Assert.True(e0 < Bound(x) && e1 < Bound(x), $"nu = {nu}, x = {x}: relative differences {e0:E2}, {e1:E2}");
        }
    }

    // Closed forms for half-integer order (Abramowitz & Stegun 10.1.11-12, spherical Bessel functions):
    // H_{1/2}(x) = -i sqrt(2/(pi x)) e^{ix},  H_{3/2}(x) = -sqrt(2/(pi x)) e^{ix} (1 + i/x).
    [Fact]
    public void MatchesHalfIntegerClosedForms()
    {
        for (double x = 2.0; x < 700; x *= 1.07)
        {
            double a = Math.Sqrt(2 / (Math.PI * x));
            Complex e = Complex.FromPolarCoordinates(1, x);
            Complex h12 = -Complex.ImaginaryOne * a * e;
            Complex h32 = -a * e * (1 + Complex.ImaginaryOne / x);
            Complex h32p = h12 - 1.5 / x * h32; // H'_nu = H_{nu-1} - (nu/x) H_nu (A&S 9.1.27)
            Assert.True(RealHankel.TryBesselJY(0.5, x, out double j, out double y, out _, out _));
            double e12 = (new Complex(j, y) - h12).Magnitude / h12.Magnitude;
            Assert.True(RealHankel.TryBesselJY(1.5, x, out j, out y, out double jp, out double yp));
            double e32 = (new Complex(j, y) - h32).Magnitude / h32.Magnitude;
            double e32p = (new Complex(jp, yp) - h32p).Magnitude / h32p.Magnitude;
            Assert.True(e12 < Bound(x) && e32 < Bound(x) && e32p < Bound(x), $"x = {x}: {e12:E2}, {e32:E2}, {e32p:E2}");
        }
    }

    [Fact]
    public void RefusesOutsideServedRange()
    {
        Assert.False(RealHankel.TryBesselJY(1.5, 1.0, out _, out _, out _, out _));
        Assert.False(RealHankel.TryBesselJY(-0.5, 5.0, out _, out _, out _, out _));
        Assert.False(RealHankel.TryBesselJY(1.5, double.NaN, out _, out _, out _, out _));
    }
}
