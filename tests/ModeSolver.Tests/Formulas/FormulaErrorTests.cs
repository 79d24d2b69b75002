using ModeSolver.Formulas;

namespace ModeSolver.Tests.Formulas;

/// <summary>Malformed input gives one clear FormulaException with a column and a caret; names are reported by list.</summary>
public class FormulaErrorTests
{
    [Theory]
    [InlineData("sin(phi", 8, "expected ')' after 'sin(phi'")]
    [InlineData("1 +", 4, "expected an operand after '1 +'")]
    [InlineData("phi +* 2", 6, "expected an operand after 'phi +', found '*'")]
    [InlineData("2phi", 2, "found 'phi'")]
    [InlineData("(phi", 5, "expected ')'")]
    [InlineData("phi)", 4, "unmatched ')'")]
    [InlineData("foo(phi)", 1, "unknown function 'foo'")]
    [InlineData("sin phi", 4, "expected '(' after function name 'sin'")]
    [InlineData("min(phi)", 1, "function 'min' takes 2 arguments, got 1")]
    [InlineData("phi $ 2", 5, "unexpected character '$'")]
    [InlineData("1e+", 4, "expected digits in the exponent")]
    [InlineData("", 1, "formula is empty")]
    [InlineData("   ", 1, "formula is empty")]
    [InlineData("phi > 2", 5, "only allowed as a condition inside piecewise")]
    [InlineData("piecewise(phi, 1, 2)", 11, "argument 1 must be a condition")]
    [InlineData("piecewise(phi > 1, 2)", 1, "an odd count of at least 3 arguments), got 2")]
    [InlineData("piecewise(phi > 1, 2, phi < 1)", 23, "argument 3 must be a value")]
    [InlineData("phi ** 2", 5, "write powers with '^'")]
    [InlineData("1.2.3", 4, "unexpected '.'")]
    [InlineData("1e999", 1, "out of range")]
    [InlineData("log(0)*phi", 1, "evaluates to -Infinity")]
    [InlineData("sin()", 5, "expected an argument")]
    [InlineData("phi = 1", 5, "'=' is not supported")]
    [InlineData("piecewise(0 < phi < 1, 1, 0)", 19, "chained comparisons")]
    [InlineData("max(phi, )", 10, "expected an operand")]
    public void MalformedInputGivesColumnAndCaret(string text, int column, string fragment)
    {
        var ex = Assert.Throws<FormulaException>(() => Formula.Parse(text));
        Assert.Equal(column, ex.Column);
        Assert.Contains(fragment, ex.Message);
        Assert.StartsWith($"formula error at column {column}: ", ex.Message);
        Assert.DoesNotContain('\n', ex.Message);
        Assert.Equal(text, ex.Text);
        var lines = ex.Pointer.Split('\n');
        Assert.Equal(2, lines.Length);
        Assert.Equal(text, lines[0]);
        Assert.Equal(new string(' ', column - 1) + "^", lines[1]);
    }

    [Fact]
    public void MessageMatchesTheDocumentedFormat()
    {
        var ex = Assert.Throws<FormulaException>(() => Formula.Parse("sin(phi"));
        Assert.Equal("formula error at column 8: expected ')' after 'sin(phi', found the end of the formula", ex.Message);
        Assert.Equal("')'", ex.Expected);
        Assert.Equal("sin(phi\n       ^", ex.Pointer);
    }

    [Fact]
    public void UnknownNamesAreListedWithKnownNames()
    {
        var p = new Dictionary<string, double> { ["V0"] = 1, ["alpha"] = 2 };
        var ex = Assert.Throws<FormulaException>(() => Formula.Parse("V0*exp(-lamda*phi) + mu*phi + lamda", p));
        Assert.Contains("unknown name(s) 'lamda', 'mu' in formula (known: phi, pi, e, and parameters V0, alpha)", ex.Message);
        Assert.Equal(9, ex.Column);
    }

    [Fact]
    public void MissingParametersAreListedByName()
    {
        var ex = Assert.Throws<FormulaException>(() => Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2"));
        Assert.Contains("missing parameters 'V0', 'alpha' in formula (known: phi, pi, e; no parameters given)", ex.Message);
        Assert.Equal(1, ex.Column);
        Assert.Equal(["V0", "alpha"], Formula.ReferencedNames("V0*tanh(phi/sqrt(6*alpha))^2 + pi*e + V0"));
        Assert.Equal(["phi"], Formula.ReferencedNames("phi*chi^2", "chi"));
    }

    [Fact]
    public void UnusedParametersAreReported()
    {
        var f = Formula.Parse("V0*phi^2", new Dictionary<string, double> { ["V0"] = 1, ["beta"] = 2, ["alpha"] = 3 });
        Assert.Equal(["alpha", "beta"], f.UnusedParameters);
        Assert.Empty(Formula.Parse("V0*phi", new Dictionary<string, double> { ["V0"] = 1 }).UnusedParameters);
    }

    [Theory]
    [InlineData("sin", "name of a built-in")]
    [InlineData("phi", "same name as the variable")]
    [InlineData("2x", "not a valid name")]
    public void BadParameterNamesAreRejected(string name, string fragment)
    {
        var ex = Assert.Throws<FormulaException>(() => Formula.Parse("phi", new Dictionary<string, double> { [name] = 1 }));
        Assert.Contains(fragment, ex.Message);
    }

    [Fact]
    public void NonFiniteParameterIsRejected()
        => Assert.Contains("not a finite number",
            Assert.Throws<FormulaException>(() => Formula.Parse("a*phi", new Dictionary<string, double> { ["a"] = double.NaN })).Message);

    [Fact]
    public void DeepNestingGivesAnErrorNotAStackOverflow()
    {
        string deep = new string('(', 3000) + "phi" + new string(')', 3000);
        Assert.Contains("nested too deeply", Assert.Throws<FormulaException>(() => Formula.Parse(deep)).Message);
        string minus = new string('-', 3000) + "phi";
        Assert.Contains("nested too deeply", Assert.Throws<FormulaException>(() => Formula.Parse(minus)).Message);
        string powers = string.Join("^", Enumerable.Repeat("phi", 1000));
        Assert.Contains("nested too deeply", Assert.Throws<FormulaException>(() => Formula.Parse(powers)).Message);
        string calls = string.Concat(Enumerable.Repeat("sin(", 1000)) + "phi" + new string(')', 1000);
        Assert.Contains("nested too deeply", Assert.Throws<FormulaException>(() => Formula.Parse(calls)).Message);
        string sum = string.Join("+", Enumerable.Repeat("phi", 2000));
        Assert.Contains("too many chained operations", Assert.Throws<FormulaException>(() => Formula.Parse(sum)).Message);
        string tooLong = "phi" + new string(' ', 10_000);
        Assert.Contains("limit 10000", Assert.Throws<FormulaException>(() => Formula.Parse(tooLong)).Message);
        // Just inside the limits parses and evaluates.
        string ok = new string('(', 150) + "phi" + new string(')', 150) + "+" + string.Join("+", Enumerable.Repeat("1", 500));
        Assert.Equal(502, Formula.Parse(ok).Value(2));
    }

    [Fact]
    public void LongTextPointerShowsAWindow()
    {
        string text = string.Join(" + ", Enumerable.Repeat("phi", 60)) + " + )";
        var ex = Assert.Throws<FormulaException>(() => Formula.Parse(text));
        var lines = ex.Pointer.Split('\n');
        Assert.Equal(2, lines.Length);
        Assert.True(lines[0].Length < 90);
        Assert.Equal(')', lines[0][lines[1].Length - 1]);
    }
}
