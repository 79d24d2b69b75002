using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

public class FrameTests
{
    private const double Lambda = 0.1;

    private static JordanFrameTheory NonMinimalQuartic(double xi, bool palatini) =>
        new(ClosedForms.Polynomial(1, 0, xi), null, ClosedForms.Polynomial(0, 0, 0, 0, Lambda / 4), palatini, "quartic, xi phi^2");

    // Derivatives of g1 = 1/w and g2 = 1/w^2 for w = 1 + xi phi^2 (w''' = 0), by hand.
    private static double[] G1(double xi, double p)
    {
        double w = 1 + xi * p * p, w1 = 2 * xi * p, w2 = 2 * xi;
        return [1 / w, -w1 / (w * w), -w2 / (w * w) + 2 * w1 * w1 / Math.Pow(w, 3), 6 * w1 * w2 / Math.Pow(w, 3) - 6 * Math.Pow(w1, 3) / Math.Pow(w, 4)];
    }

    private static double[] G2(double xi, double p)
    {
        double w = 1 + xi * p * p, w1 = 2 * xi * p, w2 = 2 * xi;
        return [1 / (w * w), -2 * w1 / Math.Pow(w, 3), -2 * w2 / Math.Pow(w, 3) + 6 * w1 * w1 / Math.Pow(w, 4), 18 * w1 * w2 / Math.Pow(w, 4) - 24 * Math.Pow(w1, 3) / Math.Pow(w, 5)];
    }

    private static void AssertRelative(double expected, double actual, double tol, string what)
    {
        double scale = Math.Max(Math.Abs(expected), 1e-300);
        Assert.True(Math.Abs(actual - expected) <= tol * scale + 1e-300, $"{what}: expected {expected:R}, got {actual:R}");
    }

    [Theory]
    [InlineData(1.0, 0.7)]
    [InlineData(100.0, 0.05)]
    [InlineData(1e4, -0.03)]
    public void MetricKineticMatchesClosedForm(double xi, double phi)
    {
        // Bezrukov & Shaposhnikov 2008, Phys. Lett. B 659, 703: K = (1 + xi phi^2 + 6 xi^2 phi^2)/(1 + xi phi^2)^2
        // = A/w + B/w^2 with A = 1 + 6 xi, B = -6 xi (partial fractions), differentiated by hand.
        var theory = NonMinimalQuartic(xi, palatini: false);
        var k = theory.Kinetic(phi);
        double w = 1 + xi * phi * phi;
        AssertRelative((1 + xi * phi * phi + 6 * xi * xi * phi * phi) / (w * w), k.Value, 1e-13, "K");
        double[] g1 = G1(xi, phi), g2 = G2(xi, phi);
        double a = 1 + 6 * xi, b = -6 * xi;
        double[] got = [k.Value, k.D1, k.D2, k.D3];
        for (int n = 0; n < 4; n++)
        {
            double expected = a * g1[n] + b * g2[n];
            double scale = Math.Abs(a * g1[n]) + Math.Abs(b * g2[n]);
            Assert.True(Math.Abs(got[n] - expected) <= 1e-11 * scale, $"K^({n}): expected {expected:R}, got {got[n]:R}");
        }
    }

    [Theory]
    [InlineData(1.0, 0.7)]
    [InlineData(1e4, 0.02)]
    public void PotentialIsJordanPotentialOverOmegaToTheFourth(double xi, double phi)
    {
        // physics.md section 1: V = V_J / Omega^4 = (lambda/4) phi^4 g2; derivatives by the Leibniz rule on phi^4 * g2.
        var v = NonMinimalQuartic(xi, false).Potential(phi);
        double[] g2 = G2(xi, phi);
        double[] p4 = [Math.Pow(phi, 4), 4 * Math.Pow(phi, 3), 12 * phi * phi, 24 * phi];
        double[] expected =
        [
            p4[0] * g2[0],
            p4[1] * g2[0] + p4[0] * g2[1],
            p4[2] * g2[0] + 2 * p4[1] * g2[1] + p4[0] * g2[2],
            p4[3] * g2[0] + 3 * p4[2] * g2[1] + 3 * p4[1] * g2[2] + p4[0] * g2[3],
        ];
        double[] got = [v.Value, v.D1, v.D2, v.D3];
        for (int n = 0; n < 4; n++) AssertRelative(Lambda / 4 * expected[n], got[n], 1e-11, $"V^({n})");
    }

    [Fact]
    public void PalatiniKineticIsOneOverOmegaSquared()
    {
        // physics.md section 1 (Palatini): K = K_J / Omega^2 with K_J = 1.
        double xi = 50, phi = 0.3;
        var k = NonMinimalQuartic(xi, palatini: true).Kinetic(phi);
        double[] g1 = G1(xi, phi);
        AssertRelative(g1[0], k.Value, 1e-14, "K");
        AssertRelative(g1[1], k.D1, 1e-13, "K'");
        AssertRelative(g1[2], k.D2, 1e-12, "K''");
        AssertRelative(g1[3], k.D3, 1e-12, "K'''");
    }

    [Fact]
    public void LargeCouplingApproachesStarobinskyPlateau()
    {
        // Bezrukov & Shaposhnikov 2008: for xi >> 1 at large field V(chi) -> (lambda / 4 xi^2)(1 - exp(-sqrt(2/3) chi))^2.
        // The corrections are O(1/xi) in chi (from the 1 + xi phi^2 terms of K), so with xi = 1e4 we ask for 1e-4 relative (measured 2.5e-5).
        double xi = 1e4;
        var theory = NonMinimalQuartic(xi, false);
        var map = new CanonicalFieldMap(theory, 0.0, 0.2, 0.0);
        double worst = 0;
        foreach (double chi in new[] { 3.0, 4.0, 5.0, 6.0 })
        {
            double v = map.PotentialOfChi(chi);
            double plateau = Lambda / (4 * xi * xi) * Math.Pow(1 - Math.Exp(-Math.Sqrt(2.0 / 3.0) * chi), 2);
            worst = Math.Max(worst, Math.Abs(v / plateau - 1));
        }
        Assert.True(worst < 1e-4, $"largest relative deviation {worst:G3}");
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(0.3)]
    public void PoleKineticTermGivesTanhMap(double alpha)
    {
        // Kallosh, Linde & Roest 2013, JHEP 11, 198: K = (1 - phi^2/(6 alpha))^(-2) gives phi = sqrt(6 alpha) tanh(chi / sqrt(6 alpha)).
        double s = Math.Sqrt(6 * alpha);
        var kinetic = new DerivativeFunction((phi, d) =>
        {
            var u = TaylorJet.Constant(1.0) - (1.0 / (s * s)) * TaylorJet.Square(TaylorJet.Variable(phi));
            var k = TaylorJet.Pow(u, -2);
            for (int i = 0; i < d.Length; i++) d[i] = k.Derivative(i);
        }, 4);
        var theory = new EinsteinFrameTheory(ClosedForms.Polynomial(0, 0, 1), kinetic, "pole", (-s, s));
        var map = new CanonicalFieldMap(theory, -0.99 * s, 0.99 * s, 0.0);
        for (double chi = -2.5 * s; chi <= 2.5 * s; chi += 0.25 * s)
        {
            double expectedPhi = s * Math.Tanh(chi / s);
            Assert.True(Math.Abs(map.Phi(chi) - expectedPhi) <= 1e-10, $"phi({chi}) = {map.Phi(chi):R}, expected {expectedPhi:R}");
        }
        foreach (double phi in new[] { -0.98 * s, -0.5 * s, 0.1 * s, 0.9 * s })
        {
            double expectedChi = s * Math.Atanh(phi / s);
            Assert.True(Math.Abs(map.Chi(phi) - expectedChi) <= 1e-10, $"chi({phi}) = {map.Chi(phi):R}, expected {expectedChi:R}");
        }
    }

    [Fact]
    public void NegativeOmegaSquaredIsRefusedWithTheFieldValue()
    {
        // Omega^2 = 1 - 0.1 phi^2 vanishes at phi = sqrt(10) (physics.md section 1: invalid where Omega^2 <= 0).
        var theory = new JordanFrameTheory(ClosedForms.Polynomial(1, 0, -0.1), null, ClosedForms.Polynomial(0, 0, 0.5), false, "bad");
        var ex = Assert.Throws<TheoryException>(() => theory.ValidateRange(0.5, 5.0));
        Assert.StartsWith("Omega^2 <= 0 at phi = 3.16228", ex.Message);
        Assert.Contains("start inside (-3.16228, 3.16228)", ex.Message);
        Assert.DoesNotContain("\n", ex.Message);
        Assert.Equal(Math.Sqrt(10), ex.Phi!.Value, 9);
        var (lo, hi) = theory.FindValidInterval(0.0);
        Assert.Equal(-Math.Sqrt(10), lo, 9);
        Assert.Equal(Math.Sqrt(10), hi, 9);
        theory.ValidateRange(-3.0, 3.0); // valid: no throw
        var outside = Assert.Throws<TheoryException>(() => theory.ValidateRange(4.0, 5.0));
        Assert.StartsWith("Omega^2 <= 0 at phi = 4:", outside.Message);
    }

    [Fact]
    public void NegativeKineticFunctionIsRefused()
    {
        // K = 1 - phi: a ghost beyond phi = 1 (physics.md section 1: invalid where K <= 0).
        var theory = new EinsteinFrameTheory(ClosedForms.Polynomial(0, 0, 1), ClosedForms.Polynomial(1, -1), "ghost");
        var ex = Assert.Throws<TheoryException>(() => theory.ValidateRange(-2, 2));
        Assert.StartsWith("K <= 0 at phi = 1", ex.Message);
    }

    [Fact]
    public void CanonicalMapOfCanonicalTheoryIsIdentity()
    {
        var theory = new EinsteinFrameTheory(ClosedForms.Polynomial(0, 0, 1), null, "quadratic");
        var map = new CanonicalFieldMap(theory, -3, 7, 1.0);
        Assert.Equal(-4.0, map.ChiMin, 12);
        Assert.Equal(6.0, map.ChiMax, 12);
        Assert.Equal(2.5, map.Phi(1.5), 12);
        Assert.Equal(6.25, map.PotentialOfChi(1.5), 11);
    }

    [Fact]
    public void PoleOfKineticFunctionIsRefused()
    {
        // K = (1 - phi^2/(6 alpha))^(-2) diverges at phi = sqrt(6 alpha) (Kallosh, Linde & Roest 2013) without changing sign.
        double s = Math.Sqrt(6.0);
        var kinetic = new DerivativeFunction((phi, d) =>
        {
            var k = TaylorJet.Pow(TaylorJet.Constant(1.0) - (1.0 / 6.0) * TaylorJet.Square(TaylorJet.Variable(phi)), -2);
            for (int i = 0; i < d.Length; i++) d[i] = k.Derivative(i);
        }, 4);
        var theory = new EinsteinFrameTheory(ClosedForms.Polynomial(0, 0, 1), kinetic, "pole");
        var ex = Assert.Throws<TheoryException>(() => theory.ValidateRange(0.0, 4.0));
        Assert.StartsWith("K diverges at phi = 2.44949", ex.Message);
        Assert.Equal(s, ex.Phi!.Value, 6);
        var (lo, hi) = theory.FindValidInterval(1.0);
        Assert.Equal(-s, lo, 6);
        Assert.Equal(s, hi, 6);
        theory.ValidateRange(-2.4, 2.4); // inside: no throw
    }
}
