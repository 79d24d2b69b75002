using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

public class TaylorJetTests
{
    [Fact]
    public void PowMatchesClosedFormDerivatives()
    {
        // f = (1 + x)^1.5 at x = 0.3: f^(k) = 1.5 (0.5)(-0.5)(-1.5) ... (1.3)^(1.5 - k) (elementary calculus).
        double x = 0.3, b = 1.3;
        var jet = TaylorJet.Pow(TaylorJet.Variable(x) + 1.0, 1.5);
        double[] expected = [Math.Pow(b, 1.5), 1.5 * Math.Pow(b, 0.5), 0.75 * Math.Pow(b, -0.5), -0.375 * Math.Pow(b, -1.5), 0.5625 * Math.Pow(b, -2.5)];
        for (int k = 0; k < 5; k++) Assert.Equal(expected[k], jet.Derivative(k), 12);
    }

    [Fact]
    public void DivisionInvertsMultiplication()
    {
        var a = TaylorJet.FromDerivatives([2.0, -1.0, 0.5, 3.0, -7.0]);
        var b = TaylorJet.FromDerivatives([1.5, 0.25, -2.0, 1.0, 4.0]);
        var back = (a * b) / b;
        for (int k = 0; k < TaylorJet.Length; k++) Assert.Equal(a[k], back[k], 12);
        var r = TaylorJet.Reciprocal(b) * b;
        Assert.Equal(1.0, r[0], 14);
        for (int k = 1; k < TaylorJet.Length; k++) Assert.Equal(0.0, r[k], 12);
    }

    [Fact]
    public void ReciprocalOfQuadraticMatchesHandDerivatives()
    {
        // g = 1/w, w = 1 + 2 x^2 at x = 0.7: g' = -w'/w^2, g'' = -w''/w^2 + 2 w'^2/w^3, g''' = 6 w' w''/w^3 - 6 w'^3/w^4.
        double x = 0.7, w = 1 + 2 * x * x, w1 = 4 * x, w2 = 4;
        var jet = TaylorJet.Reciprocal(TaylorJet.FromDerivatives([w, w1, w2, 0, 0]));
        Assert.Equal(1 / w, jet.Derivative(0), 14);
        Assert.Equal(-w1 / (w * w), jet.Derivative(1), 13);
        Assert.Equal(-w2 / (w * w) + 2 * w1 * w1 / (w * w * w), jet.Derivative(2), 12);
        Assert.Equal(6 * w1 * w2 / (w * w * w) - 6 * w1 * w1 * w1 / (w * w * w * w), jet.Derivative(3), 12);
    }
}
