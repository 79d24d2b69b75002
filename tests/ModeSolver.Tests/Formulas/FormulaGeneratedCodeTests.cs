using System.Globalization;
using CsCheck;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Tests.Formulas;

/// <summary>
/// The generated straight-line code behind <see cref="Formula.Value"/> and <see cref="Formula.Evaluate"/> against
/// the register interpreter (the reference): same operations in the same order, so the results must be identical
/// to the last bit (NaN where the interpreter gives NaN), on every catalogue formula and on random formulas.
/// </summary>
public class FormulaGeneratedCodeTests
{
    private static string R(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    /// <summary>Fails unless the interpreter's and the generated code's values have the same bits (any NaN matches any NaN).</summary>
    internal static void Same(double expected, double actual, string what)
    {
        if (BitConverter.DoubleToInt64Bits(expected) == BitConverter.DoubleToInt64Bits(actual)) return;
        if (double.IsNaN(expected) && double.IsNaN(actual)) return;
        Assert.Fail($"{what}: interpreter {R(expected)}, generated code {R(actual)}");
    }

    private static void Agree(Formula f, double phi, string what)
    {
        // c*phi^n has its own closed-form path; everything else runs generated code where the runtime compiles.
        if (!f.IsGenerated) return;
        Same(f.ValueInterpreted(phi), f.ValueGenerated(phi), $"{what} value at {R(phi)}");
        Same(f.ValueGenerated(phi), f.Value(phi), $"{what} public value at {R(phi)}");
        var i = f.EvaluateInterpreted(phi);
        var g = f.EvaluateGenerated(phi);
        Assert.Equal(g, f.Evaluate(phi));
        Same(i.Value, g.Value, $"{what} jet f at {R(phi)}");
        Same(i.D1, g.D1, $"{what} jet f' at {R(phi)}");
        Same(i.D2, g.D2, $"{what} jet f'' at {R(phi)}");
        Same(i.D3, g.D3, $"{what} jet f''' at {R(phi)}");
    }

    private static readonly double[] Specials = [0, -0.0, 1, -1, 0.5, -0.5, 2, 1e-300, -1e-300, 30, -30, 800, double.NaN, double.PositiveInfinity];

    [Fact]
    public void GeneratedCodeIsUsedWhereTheRuntimeCompiles()
    {
        var f = Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2", new Dictionary<string, double> { ["V0"] = 2, ["alpha"] = 1 });
        Assert.Equal(System.Runtime.CompilerServices.RuntimeFeature.IsDynamicCodeCompiled, f.IsGenerated);
        Assert.False(Formula.Parse("3*phi^4").IsGenerated); // the monomial path comes first
    }

    [Fact]
    public void CatalogueFormulasAgreeBitForBit()
    {
        int checkedFormulas = 0, generated = 0;
        foreach (var entry in ModelCatalogue.All)
        {
            var pars = entry.DefaultParameters;
            foreach (var (kind, text) in new[] { ("potential", entry.Potential), ("coupling", entry.Coupling), ("kinetic", entry.Kinetic) })
            {
                if (text is null) continue;
                var f = Formula.Parse(text, pars);
                checkedFormulas++;
                if (f.IsGenerated) generated++;
                string what = $"{entry.Id} {kind} '{text}'";
                double scale = Math.Max(1, Math.Abs(entry.DefaultPhi0));
                for (int k = -200; k <= 200; k++) Agree(f, scale * k / 100.0, what);
                foreach (double x in Specials) Agree(f, x, what);
                foreach (double x in f.NonSmoothPoints) Agree(f, x, what);
            }
        }
        Assert.True(checkedFormulas >= ModelCatalogue.All.Count);
        Assert.True(generated >= checkedFormulas / 2, $"only {generated} of {checkedFormulas} catalogue formulas ran generated code");
    }

    /// <summary>
    /// Every operation of the language, including the switching ones, with ties and zeros likely; leaves are the
    /// <paramref name="variables"/> (default phi; phi must be among them, the piecewise templates use it), a, and numbers.
    /// </summary>
    internal static Gen<string> AllOps(int depth, params string[] variables)
    {
        if (variables.Length == 0) variables = ["phi"];
        var leaves = new List<Gen<string>> { Gen.Const("a"), Gen.Const("0"), Gen.Const("1"), Gen.Const("pi"),
            Gen.Int[-3, 6].Select(i => i.ToString(CultureInfo.InvariantCulture)), Gen.Double[-3, 3].Select(R) };
        foreach (string v in variables) leaves.Add(Gen.Const(v));
        var leaf = Gen.OneOf(leaves.ToArray());
        if (depth == 0) return leaf;
        var sub = AllOps(depth - 1, variables);
        var unary = Gen.Select(sub, Gen.Int[0, 25], (x, k) => k switch
        {
            0 => $"-({x})",
            1 => $"exp({x})",
            2 => $"log({x})",
            3 => $"log10({x})",
            4 => $"sqrt({x})",
            5 => $"sin({x})",
            6 => $"cos({x})",
            7 => $"tan({x})",
            8 => $"sinh({x})",
            9 => $"cosh({x})",
            10 => $"tanh({x})",
            11 => $"asin({x})",
            12 => $"acos({x})",
            13 => $"atan({x})",
            14 => $"asinh({x})",
            15 => $"acosh({x})",
            16 => $"atanh({x})",
            17 => $"abs({x})",
            18 => $"step({x})",
            19 => $"({x})^3",
            20 => $"({x})^-2",
            21 => $"({x})^0.5",
            22 => $"2^({x})",
            23 => $"3/({x})",
            24 => $"({x})^5",
            _ => $"({x})/4 + 1.5",
        });
        var binary = Gen.Select(sub, sub, Gen.Int[0, 9], (x, y, k) => k switch
        {
            0 => $"({x}) + ({y})",
            1 => $"({x}) - ({y})",
            2 => $"({x})*({y})",
            3 => $"({x})/({y})",
            4 => $"({x})^({y})",
            5 => $"min({x}, {y})",
            6 => $"max({x}, {y})",
            7 => $"piecewise({x} < {y}, {x}, {y} >= phi, {y}, {x}*{y})",
            8 => $"piecewise({x} <= 0, {y}, phi > {x}, 2*{x}, {y})",
            _ => $"min(phi, {x}) + max({y}, phi)",
        });
        return Gen.Frequency((1, leaf), (2, unary), (2, binary));
    }

    [Fact]
    public void RandomFormulasOfEveryOperationAgreeBitForBit()
    {
        var p = new Dictionary<string, double> { ["a"] = -0.75 };
        Gen.Select(AllOps(4), Gen.Double[-3, 3], Gen.Int[-6, 6]).Sample((text, x, k) =>
        {
            Formula f;
            try { f = Formula.Parse(text, p); }
            catch (FormulaException) { return; } // e.g. a constant part that is not finite
            Agree(f, x, text);
            Agree(f, k * 0.5, text); // grid points: ties and zeros of min, max, abs, step, piecewise
            Agree(f, -0.75, text);   // phi = a
        }, iter: 400);
    }

    [Fact]
    public void RandomFormulasOfThePropertyGeneratorsAgreeBitForBit()
    {
        var p = new Dictionary<string, double> { ["a"] = -0.75 };
        Gen.Select(FormulaPropertyTests.Any(4), Gen.Double[-3, 3]).Sample((text, x) =>
        {
            Formula f;
            try { f = Formula.Parse(text, p); }
            catch (FormulaException) { return; }
            Agree(f, x, text);
            Agree(f, 0, text);
        }, iter: 200);
        Gen.Select(FormulaPropertyTests.Safe(4), Gen.Double[-1.5, 1.5]).Sample((text, x) => Agree(Formula.Parse(text), x, text), iter: 200);
    }

    [Fact]
    public void OneShapeWithOtherParametersGivesItsOwnValues()
    {
        // The compiled code is shared across parameter values (cached by shape): each formula must keep its own constants.
        const string text = "V0*(1 - exp(-sqrt(2/(3*alpha))*phi))^2";
        var f = Formula.Parse(text, new Dictionary<string, double> { ["V0"] = 1, ["alpha"] = 1 });
        var g = Formula.Parse(text, new Dictionary<string, double> { ["V0"] = 3, ["alpha"] = 0.5 });
        foreach (double x in new[] { 0.3, 1, 5 })
        {
            Agree(f, x, "alpha 1");
            Agree(g, x, "alpha 0.5");
            double e1 = Math.Exp(-Math.Sqrt(2 / 3.0) * x), e2 = Math.Exp(-Math.Sqrt(2 / 1.5) * x);
            Assert.Equal((1 - e1) * (1 - e1), f.Value(x), 1e-14);
            Assert.Equal(3 * (1 - e2) * (1 - e2), g.Value(x), 1e-13);
        }
    }

    [Fact]
    public void SwitchPointsTakeTheRightHandSide()
    {
        // abs at 0 follows phi from above; step(0) = 1; min/max at a tie take the branch that wins just above.
        var abs = Formula.Parse("abs(phi)").Evaluate(0);
        Assert.Equal(new Jet3(0, 1, 0, 0), abs);
        Assert.Equal(1, Formula.Parse("step(phi)").Value(0));
        var min = Formula.Parse("min(phi, 0)").Evaluate(0);
        Assert.Equal(0, min.D1);
        var max = Formula.Parse("max(phi, 0)").Evaluate(0);
        Assert.Equal(1, max.D1);
        var pw = Formula.Parse("piecewise(phi < 0, -phi^3, phi^2)").Evaluate(0);
        Assert.Equal(2, pw.D2);
    }

    [Fact]
    public void ConcurrentEvaluationAgrees()
    {
        var f = Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2 + abs(sin(phi))", new Dictionary<string, double> { ["V0"] = 2, ["alpha"] = 1 });
        Parallel.For(0, 64, i =>
        {
            for (int k = 0; k < 200; k++) Agree(f, (i * 200 + k) * 1e-3 - 6, "concurrent");
        });
    }
}
