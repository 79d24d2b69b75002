using ModeSolver.Formulas;

namespace ModeSolver.Tests.Formulas;

/// <summary>Parser behaviour: precedence, associativity, numbers, errors with columns, names.</summary>
public class FormulaParserTests
{
    private static double V(string text, double phi, Dictionary<string, double>? p = null) => Formula.Parse(text, p).Value(phi);

    [Theory]
    // Conventional precedence of arithmetic (common practice): ^ over unary minus over * / over + -.
    [InlineData("1 + 2*3", 0, 7)]
    [InlineData("(1 + 2)*3", 0, 9)]
    [InlineData("2^3^2", 0, 512)]          // right-associative: 2^(3^2)
    [InlineData("(2^3)^2", 0, 64)]
    [InlineData("-phi^2", 3, -9)]          // -(phi^2)
    [InlineData("(-phi)^2", 3, 9)]
    [InlineData("2^-1", 0, 0.5)]
    [InlineData("-2^2", 0, -4)]
    [InlineData("8/4/2", 0, 1)]            // left-associative
    [InlineData("8-4-2", 0, 2)]
    [InlineData("--phi", 2, 2)]
    [InlineData("+phi", 2, 2)]
    [InlineData("2*-phi", 2, -4)]
    [InlineData("1e-10*1e10", 0, 1)]
    [InlineData("2.5E+3", 0, 2500)]
    [InlineData(".5 + 1.", 0, 1.5)]
    [InlineData("1.5e2", 0, 150)]
    [InlineData("phi^3", -2, -8)]          // integer powers of negative bases
    [InlineData("phi^-2", -2, 0.25)]
    [InlineData("ln(e)", 0, 1)]
    [InlineData("log10(1000)", 0, 3)]
    [InlineData("min(phi, 1) + max(phi, 1)", 3, 4)]
    [InlineData("step(phi) + step(-phi)", 0, 2)] // step(0) = 1
    [InlineData("abs(phi - 5)", 2, 3)]
    [InlineData("piecewise(phi > 1, 10, phi > 0, 20, 30)", 2, 10)]
    [InlineData("piecewise(phi > 1, 10, phi > 0, 20, 30)", 0.5, 20)]
    [InlineData("piecewise(phi > 1, 10, phi > 0, 20, 30)", -1, 30)]
    [InlineData("piecewise(phi >= 1, 10, 30)", 1, 10)]
    [InlineData("piecewise(phi <= 1, 10, 30)", 1, 10)]
    [InlineData("piecewise(phi < 1, 10, 30)", 1, 30)]
    public void EvaluatesWithConventionalPrecedence(string text, double phi, double expected)
        => Assert.Equal(expected, V(text, phi), 14);

    [Fact]
    public void PiIsPi() => Assert.Equal(Math.PI, V("pi", 0));

    [Fact]
    public void ParametersAreSubstituted()
        => Assert.Equal(0.5 * 4 * 9, V("0.5*m^2*phi^2", 3, new() { ["m"] = 2 }), 14);
}
