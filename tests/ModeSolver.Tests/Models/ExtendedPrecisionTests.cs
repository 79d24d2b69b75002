using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

/// <summary>
/// Double-double evaluation of the Jordan-frame map: the arithmetic against decimal references, the jets against the
/// double evaluator where double is accurate, and the Palatini slope where double arithmetic loses it.
/// </summary>
public class ExtendedPrecisionTests
{
    /// <summary>|x - (hi + lo)| relative to |hi|, computed in double-double.</summary>
    private static double Miss(DoubleDouble x, double hi, double lo) => Math.Abs((x - new DoubleDouble(hi, lo)).ToDouble() / hi);

    [Fact]
    public void ArithmeticCarriesAbout32Digits()
    {
        // References as hi + lo pairs rounded from 60-digit values of Python's decimal module (sqrt(2), e, ln 10, exp(-30.5)).
        Assert.True(Miss(DoubleDouble.Sqrt(2), 1.4142135623730951, -9.667293313452913e-17) < 1e-31);
        Assert.True(Miss(DoubleDouble.Exp(1), 2.718281828459045, 1.4456468917292502e-16) < 1e-31);
        Assert.True(Miss(DoubleDouble.Log(10), 2.302585092994046, -2.1707562233822494e-16) < 1e-31);
        Assert.True(Miss(DoubleDouble.Exp(-30.5), 5.675685232632723e-14, -2.744021414416088e-30) < 1e-30);
        // Identities: 3 * (1/3) = 1 and exp(log x) = x to double-double precision; 1 + 1e-20 - 1 survives, unlike in double.
        Assert.True(Math.Abs((3.0 * (new DoubleDouble(1) / 3) - 1.0).ToDouble()) < 1e-31);
        Assert.True(Miss(DoubleDouble.Exp(DoubleDouble.Log(123.456)), 123.456, 0) < 1e-30);
        Assert.Equal(1e-20, (new DoubleDouble(1) + 1e-20 - 1.0).ToDouble(), 1e-35);
    }

    [Theory]
    [InlineData("1 + xi * phi^2", "lambda * phi^4 / 4", true, 2.0)]
    [InlineData("1 + xi * phi^2", "lambda * phi^4 / 4", false, 0.3)]
    [InlineData("exp(-phi / 3) + 0.2 * phi^2", "lambda * tanh(phi)^2 * cosh(phi / 4)", false, 0.8)]
    [InlineData("sqrt(2 + phi^2) / sqrt(2)", "lambda * (1 - exp(-phi))^2 * log(3 + phi^2) * phi^1.5", false, 1.3)]
    public void ExtendedJetsAgreeWithDoubleWhereDoubleIsAccurate(string omega2, string potential, bool palatini, double phi)
    {
        var pars = new Dictionary<string, double> { ["xi"] = 50.0, ["lambda"] = 0.1 };
        var program = FrameMapProgram.TryCreate(Formula.Parse(omega2, pars), null, Formula.Parse(potential, pars), palatini)!;
        Assert.True(program.SupportsExtended);
        var d = program.Evaluate(phi);
        var e = program.EvaluateExtended(phi);
        foreach (var (x, y) in new[] { (d.Potential, e.Potential), (d.Kinetic, e.Kinetic) })
        {
            double[] a = [x.Value, x.D1, x.D2, x.D3], b = [y.Value, y.D1, y.D2, y.D3];
            double scale = a.Max(Math.Abs);
            for (int i = 0; i < 4; i++) Assert.True(Math.Abs(a[i] - b[i]) <= 1e-12 * scale, $"order {i}: {a[i]:R} vs {b[i]:R}");
        }
    }

    [Theory]
    [InlineData(1e9)]
    [InlineData(1e12)]
    public void PalatiniSlopeSurvivesTheCancellation(double xi)
    {
        // Palatini with Omega^2 = 1 + xi phi^2, K = 1/Omega^2 (physics.md section 1): V = lambda phi^4 / (4 Omega^4), so
        // V_phi / (K V) = (4/phi)(1 + xi phi^2) / (1 + xi phi^2) = 4/phi exactly, by hand. In double arithmetic the two
        // terms of V_phi cancel to 1 part in xi phi^2 (6e11 to 6e14 at phi = 25).
        var pars = new Dictionary<string, double> { ["xi"] = xi, ["lambda"] = 0.1 };
        var theory = JordanFrameTheory.FromFormulas(Formula.Parse("1 + xi * phi^2", pars), null, Formula.Parse("lambda * phi^4 / 4", pars), palatini: true);
        Assert.True(theory.SlopeRoundOff(25) > TheoryFactory.SlopeRoundOffLimit, $"double round-off {theory.SlopeRoundOff(25):E2}");
        var precise = theory.WithExtendedPrecision();
        Assert.True(precise.IsExtendedPrecision);
        foreach (double phi in new[] { 25.0, 21.0, 3.0 })
        {
            var j = precise.ExactJets(phi); // the map itself; its table is checked in FieldJetTableTests
            Assert.Equal(4 / phi, j.Potential.D1 / (j.Kinetic.Value * j.Potential.Value), 1e-14);
        }
        // TheoryFactory makes the same choice from the probe at phi0.
        var spec = new ModelSpec(null, "lambda * phi^4 / 4", null, "1 + xi * phi^2", true, pars, null);
        Assert.True(((JordanFrameTheory)TheoryFactory.Build(spec, 25.0)).IsExtendedPrecision);
        Assert.False(((JordanFrameTheory)TheoryFactory.Build(spec with { Parameters = new Dictionary<string, double> { ["xi"] = 100.0, ["lambda"] = 0.1 } }, 1.0)).IsExtendedPrecision);
    }
}
