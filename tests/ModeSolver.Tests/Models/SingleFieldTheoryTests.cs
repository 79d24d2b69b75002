using ModeSolver.Models;
using ModeSolver.Tests.Background;

namespace ModeSolver.Tests.Models;

public class SingleFieldTheoryTests
{
    [Fact]
    public void Adapter_IsGEqualsKWithOneChristoffelAndNoCurvature()
    {
        // physics.md section 7: one field has G_11 = K(phi), Gamma = K'/(2K) and no curvature.
        var inner = new PoleTModel(1.0);
        var theory = new SingleFieldTheory(inner);
        Assert.Equal(1, theory.FieldCount);
        Assert.False(theory.IsCanonical);
        var x = new[] { 1.3 };
        var k = inner.Kinetic(1.3);
        var v = inner.Potential(1.3);
        var one = new double[1];
        theory.Metric(x, one); Assert.Equal(k.Value, one[0]);
        Assert.True(theory.InverseMetric(x, one)); Assert.Equal(1 / k.Value, one[0]);
        theory.Christoffel(x, one); Assert.Equal(k.D1 / (2 * k.Value), one[0]);
        theory.Riemann(x, one); Assert.Equal(0.0, one[0]);
        Assert.Equal(v.Value, theory.PotentialGradient(x, one)); Assert.Equal(v.D1, one[0]);
        theory.PotentialHessian(x, one); Assert.Equal(v.D2, one[0]);
        // The valid range becomes two coordinate boundaries, left falling below and rising above.
        Assert.Equal(2, theory.Boundaries.Count);
        Assert.All(theory.Boundaries, b => Assert.True(b.IsInside(x)));
        Assert.False(theory.Boundaries[1].IsInside(new[] { 3.0 }));
    }

    [Fact]
    public void Adapter_NonSmoothPointsBecomeCoordinateSurfaces()
    {
        var theory = new SingleFieldTheory(new LinearKink(1.0, 2e-3, 2e-4, 0.25));
        var kink = Assert.Single(theory.NonSmoothSurfaces);
        Assert.True(kink.IsCoordinate);
        Assert.Equal(0.25, kink.CoordinateValue);
        Assert.Equal(0.75, kink.Value(new[] { 1.0 }));
        Assert.True(kink.Contains(new[] { 0.25 }));
    }
}
