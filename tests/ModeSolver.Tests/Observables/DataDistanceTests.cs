using ModeSolver.Observables;

namespace ModeSolver.Tests.Observables;

public class DataDistanceTests
{
    // The Gaussian approximation of physics.md section 9: n_s = 0.9649 +- 0.0042 (Planck 2018 X), r = 0 +- 0.018
    // (half the 95% bound of BICEP/Keck 2021), alpha_s = -0.0045 +- 0.0067 (Planck 2018 X, from memory).
    private static readonly DataConstraints Data = new();

    [Fact]
    public void TheCentralValuesAreAtZeroDistance()
    {
        var d = DataDistance.Evaluate(0.9649, 0.0, -0.0045, Data);
        Assert.Equal(0.0, d.DeltaChi2);
        Assert.Equal(0.0, d.Sigmas);
        Assert.Equal(2, d.DegreesOfFreedom);
        var d3 = DataDistance.Evaluate(0.9649, 0.0, -0.0045, Data with { UseAlphaS = true });
        Assert.Equal(0.0, d3.DeltaChi2);
        Assert.Equal(3, d3.DegreesOfFreedom);
    }

    [Fact]
    public void OneSigmaAlongEachDirectionGivesOne()
    {
        Assert.Equal(1.0, DataDistance.Evaluate(0.9649 + 0.0042, 0.0, 0, Data).DeltaChi2, 12);
        Assert.Equal(1.0, DataDistance.Evaluate(0.9649 - 0.0042, 0.0, 0, Data).DeltaChi2, 12);
        Assert.Equal(1.0, DataDistance.Evaluate(0.9649, 0.018, 0, Data).DeltaChi2, 12);
        Assert.Equal(1.0, DataDistance.Evaluate(0.9649, 0.0, -0.0045 + 0.0067, Data with { UseAlphaS = true }).DeltaChi2, 12);
        Assert.Equal(1.0, DataDistance.DeltaChi2(0.9649 + 0.0042, 0.0, Data), 12);
        // With two degrees of freedom Delta chi^2 = 1 encloses 1 - exp(-1/2) = 39.3%, i.e. 0.515 Gaussian sigma.
        double p = 1 - Math.Exp(-0.5);
        double n = Math.Sqrt(2) * MathNet.Numerics.SpecialFunctions.ErfInv(p);
        Assert.Equal(n, DataDistance.Evaluate(0.9649 + 0.0042, 0.0, 0, Data).Sigmas, 10);
    }

    [Theory]
    [InlineData(1, 1, 1.0)]
    [InlineData(2, 1, 4.0)]
    [InlineData(1, 2, 2.30)]
    [InlineData(2, 2, 6.18)]
    [InlineData(3, 2, 11.8)]
    [InlineData(1, 3, 3.53)]
    public void ContourLevelsMatchTheStandardTable(double sigmas, int dof, double level)
    {
        // Delta chi^2 enclosing 68.3%, 95.4%, 99.73% for 1-3 parameters: Press, Teukolsky, Vetterling & Flannery,
        // Numerical Recipes, section 15.6 (table of Delta chi^2 against confidence level and degrees of freedom), quoted to
        // three digits there; one degree of freedom is exactly n^2.
        Assert.True(Math.Abs(DataDistance.ContourLevel(sigmas, dof) - level) < 0.006 * level, $"{sigmas} sigma, {dof} dof: {DataDistance.ContourLevel(sigmas, dof)}");
        Assert.Equal(sigmas, DataDistance.Sigmas(DataDistance.ContourLevel(sigmas, dof), dof), 8);
    }
}
