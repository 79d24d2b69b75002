using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Tests.Formulas;

/// <summary>Non-smooth points, thread safety and canonical printing.</summary>
public class FormulaBehaviourTests
{
    private static void AssertPoints(double[] expected, IReadOnlyList<double> actual, double tol = 1e-12)
    {
        Assert.True(expected.Length == actual.Count, $"expected [{string.Join(", ", expected)}], got [{string.Join(", ", actual)}]");
        for (int i = 0; i < expected.Length; i++)
            Assert.True(Math.Abs(expected[i] - actual[i]) <= tol * Math.Max(1, Math.Abs(expected[i])), $"point {i}: {actual[i]:R} vs {expected[i]:R}");
    }

    [Fact]
    public void LinearSwitchesAreSolvedExactly()
    {
        var p = new Dictionary<string, double> { ["phi0"] = 0.7123456789, ["d"] = 0.3 };
        Assert.Equal([0.7123456789], Formula.Parse("piecewise(phi > phi0, 1 + 2*(phi - phi0), 1 + 0.1*(phi - phi0))", p).NonSmoothPoints);
        Assert.Equal([2.0], Formula.Parse("abs(phi - 2)").NonSmoothPoints);
        Assert.Equal([1.5], Formula.Parse("min(phi, 3 - phi)").NonSmoothPoints);
        Assert.Equal([-1.0], Formula.Parse("step(phi + 1)*phi^2").NonSmoothPoints);
        AssertPoints([0.7123456789], Formula.Parse("step((phi - phi0)/d)", p).NonSmoothPoints, 1e-15);
        AssertPoints([-3, 2e3], Formula.Parse("max(2*phi + 6, 0) + abs(phi/1000 - 2)").NonSmoothPoints, 1e-15);
        Assert.Empty(Formula.Parse("abs(V0)*phi^2 + step(1)", new Dictionary<string, double> { ["V0"] = -2 }).NonSmoothPoints);
        Assert.Empty(Formula.Parse("0.5*phi^2").NonSmoothPoints);
        // The same switch written twice is reported once; points are sorted.
        Assert.Equal([-1.0, 4.0], Formula.Parse("abs(phi - 4) + abs(4 - phi) + step(phi + 1)").NonSmoothPoints);
    }

    [Fact]
    public void NonLinearSwitchesAreFoundByScanning()
    {
        AssertPoints([-2, 2], Formula.Parse("max(phi^2, 4)").NonSmoothPoints);
        AssertPoints([0.3], Formula.Parse("step(tanh(phi - 0.3))").NonSmoothPoints);
        AssertPoints([Math.Log(3)], Formula.Parse("piecewise(exp(phi) > 3, 1, 0)").NonSmoothPoints);
        AssertPoints([1e-4], Formula.Parse("abs(phi^3 - 1e-12)").NonSmoothPoints, 1e-10); // small-field switch
        var sines = Formula.Parse("abs(sin(phi))").NonSmoothPointsIn(-10, 10);
        AssertPoints([-3 * Math.PI, -2 * Math.PI, -Math.PI, 0, Math.PI, 2 * Math.PI, 3 * Math.PI], sines);
        // Linear switches outside a requested range are left out.
        Assert.Empty(Formula.Parse("abs(phi - 20)").NonSmoothPointsIn(-10, 10));
    }

    [Fact]
    public void ParallelEvaluationGivesIdenticalResults()
    {
        var f = Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2 + piecewise(phi > 1, asinh(phi)^3, log(2 + phi^2))",
            new Dictionary<string, double> { ["V0"] = 1e-10, ["alpha"] = 3 });
        const int n = 20_000;
        var serial = new Jet3[n];
        var serialValue = new double[n];
        var serial5 = new double[n * 6];
        for (int i = 0; i < n; i++)
        {
            double x = -5 + 10.0 * i / n;
            serial[i] = f.Evaluate(x);
            serialValue[i] = f.Value(x);
            f.EvaluateDerivatives(x, serial5.AsSpan(i * 6, 6));
        }
        var parallel = new Jet3[n];
        var parallelValue = new double[n];
        var parallel5 = new double[n * 6];
        Parallel.For(0, n, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i =>
        {
            double x = -5 + 10.0 * i / n;
            parallel[i] = f.Evaluate(x);
            parallelValue[i] = f.Value(x);
            f.EvaluateDerivatives(x, parallel5.AsSpan(i * 6, 6));
        });
        Assert.Equal(serial, parallel);
        Assert.Equal(serialValue, parallelValue);
        Assert.Equal(serial5, parallel5);
    }

    [Theory]
    [InlineData("-phi^2", "-phi^2")]
    [InlineData("a - (b - c)", "a - (b - c)")]
    [InlineData("(a - b) - c", "a - b - c")]
    [InlineData("a/(b*c)", "a/(b*c)")]
    [InlineData("(a/b)*c", "a/b*c")]
    [InlineData("(phi^2)^3", "(phi^2)^3")]
    [InlineData("phi^2^3", "phi^2^3")]
    [InlineData("2^-phi", "2^(-phi)")]
    [InlineData("a*-b", "a*(-b)")]
    [InlineData("(-a)^2", "(-a)^2")]
    [InlineData("ln(phi) + 1.5e-3", "log(phi) + 0.0015")]
    [InlineData("piecewise(phi>=a,1,0)", "piecewise(phi >= a, 1, 0)")]
    public void CanonicalText(string text, string canonical)
    {
        var p = new Dictionary<string, double> { ["a"] = 1.25, ["b"] = -2, ["c"] = 3.5 };
        var f = Formula.Parse(text, p);
        Assert.Equal(canonical, f.ToString());
        var g = Formula.Parse(f.ToString(), p);
        var h = Formula.Parse(f.ToString(inlineParameters: true));
        foreach (double x in new[] { 0.3, 1.7, 2.9 })
        {
            Assert.Equal(f.Evaluate(x), g.Evaluate(x));
            Assert.Equal(f.Evaluate(x), h.Evaluate(x));
        }
    }

    [Fact]
    public void IntegerPowersOfNegativeFieldAndTheirDerivatives()
    {
        // phi^3 at phi = -2: -8, 12, -12, 6 (power rule); phi^0 = 1.
        Assert.Equal(new Jet3(-8, 12, -12, 6), Formula.Parse("phi^3").Evaluate(-2));
        Assert.Equal(new Jet3(1, 0, 0, 0), Formula.Parse("phi^0").Evaluate(-2));
        Assert.Equal(new Jet3(0, 0, 2, 0), Formula.Parse("phi^2").Evaluate(0));
    }

    [Fact]
    public void OtherVariableNames()
    {
        var f = Formula.Parse("chi^2 + x", new Dictionary<string, double> { ["x"] = 1 }, "chi");
        Assert.Equal(new Jet3(10, 6, 2, 0), f.Evaluate(3));
        Assert.Throws<FormulaException>(() => Formula.Parse("phi", null, "sin"));
    }
}
