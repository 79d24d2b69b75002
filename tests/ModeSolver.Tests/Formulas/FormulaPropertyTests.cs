using System.Globalization;
using CsCheck;
using ModeSolver.Formulas;

namespace ModeSolver.Tests.Formulas;

/// <summary>
/// Property-based checks (CsCheck): robustness on random text, the sum, product and chain rules of calculus on random
/// well-formed formulas, and print-then-parse giving the same function.
/// </summary>
public class FormulaPropertyTests
{
    private static string R(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    /// <summary>Small trees of safe operations whose values stay moderate for phi in [-1.5, 1.5].</summary>
    internal static Gen<string> Safe(int depth)
    {
        var leaf = Gen.Frequency((2, Gen.Const("phi")), (1, Gen.Double[0.5, 2.0].Select(R)));
        if (depth == 0) return leaf;
        var sub = Safe(depth - 1);
        var unary = Gen.Select(sub, Gen.Int[0, 7], (x, k) => k switch
        {
            0 => $"sin({x})",
            1 => $"cos({x})",
            2 => $"tanh({x})",
            3 => $"atan({x})",
            4 => $"exp(tanh({x}))",
            5 => $"sqrt(1 + ({x})^2)",
            6 => $"log(2 + sin({x}))",
            _ => $"asinh({x})",
        });
        var binary = Gen.Select(sub, sub, Gen.Int[0, 3], (x, y, k) => k switch
        {
            0 => $"({x}) + ({y})",
            1 => $"({x}) - ({y})",
            2 => $"({x})*({y})",
            _ => $"({x})/(2 + cos({y}))",
        });
        return Gen.Frequency((1, leaf), (2, unary), (2, binary));
    }

    private static double[] D(string text, double x, int order = 3)
    {
        var d = new double[order + 1];
        Formula.Parse(text).EvaluateDerivatives(x, d);
        return d;
    }

    private static void Close(double expected, double actual, double scale, string what)
        => Assert.True(Math.Abs(expected - actual) <= 1e-9 * scale + 1e-300, $"{what}: {actual:R} vs rule {expected:R} (scale {scale:R})");

    [Fact]
    public void RandomTextOnlyEverThrowsFormulaException()
    {
        Gen.Char["phi0123456789.eE+-*/^(),<>= sincotaxplgqrbmdw_"].Array[0, 40].Select(a => new string(a)).Sample(text =>
        {
            Formula f;
            try
            {
                f = Formula.Parse(text, new Dictionary<string, double> { ["a"] = 0.5 });
            }
            catch (FormulaException ex)
            {
                Assert.DoesNotContain('\n', ex.Message);
                if (ex.Column > 0) Assert.Equal(2, ex.Pointer.Split('\n').Length);
                return;
            }
            f.Evaluate(0.3);
            f.Value(-1.1);
            _ = f.NonSmoothPoints;
        }, iter: 3000);
    }

    [Fact]
    public void SumRule()
    {
        Gen.Select(Safe(3), Safe(3), Gen.Double[-1.5, 1.5]).Sample((f, g, x) =>
        {
            var s = D($"({f}) + ({g})", x);
            var a = D(f, x);
            var b = D(g, x);
            for (int k = 0; k <= 3; k++) Close(a[k] + b[k], s[k], Math.Abs(a[k]) + Math.Abs(b[k]), $"(f+g)^({k})");
        }, iter: 300);
    }

    [Fact]
    public void ProductRule()
    {
        // Leibniz: (fg)^(n) = sum_k C(n,k) f^(k) g^(n-k).
        int[][] binomial = [[1], [1, 1], [1, 2, 1], [1, 3, 3, 1], [1, 4, 6, 4, 1]];
        Gen.Select(Safe(3), Safe(3), Gen.Double[-1.5, 1.5]).Sample((f, g, x) =>
        {
            var p = D($"({f})*({g})", x, 4);
            var a = D(f, x, 4);
            var b = D(g, x, 4);
            for (int n = 0; n <= 4; n++)
            {
                double sum = 0, scale = 0;
                for (int k = 0; k <= n; k++)
                {
                    double term = binomial[n][k] * a[k] * b[n - k];
                    sum += term;
                    scale += Math.Abs(term);
                }
                Close(sum, p[n], scale, $"(fg)^({n})");
            }
        }, iter: 300);
    }

    [Fact]
    public void ChainRuleThroughExp()
    {
        // (e^f)' = e^f f', (e^f)'' = e^f (f'' + f'^2), (e^f)''' = e^f (f''' + 3 f' f'' + f'^3) (Faa di Bruno).
        Gen.Select(Safe(3), Gen.Double[-1.5, 1.5]).Sample((f, x) =>
        {
            var e = D($"exp({f})", x);
            var a = D(f, x);
            double ef = Math.Exp(a[0]);
            Close(ef, e[0], ef, "exp(f)");
            Close(ef * a[1], e[1], ef * Math.Abs(a[1]), "exp(f)'");
            Close(ef * (a[2] + a[1] * a[1]), e[2], ef * (Math.Abs(a[2]) + a[1] * a[1]), "exp(f)''");
            Close(ef * (a[3] + 3 * a[1] * a[2] + a[1] * a[1] * a[1]), e[3],
                ef * (Math.Abs(a[3]) + Math.Abs(3 * a[1] * a[2]) + Math.Abs(a[1] * a[1] * a[1])), "exp(f)'''");
        }, iter: 300);
    }

    [Fact]
    public void UnrolledThirdOrderPathAgreesWithGeneralRecurrences()
    {
        // Two independent implementations (closed-form third-order chain rule vs. Taylor recurrences) must agree.
        Gen.Select(Safe(3), Gen.Double[-1.5, 1.5]).Sample((text, x) =>
        {
            var f = Formula.Parse(text);
            var d = new double[4];
            f.EvaluateDerivatives(x, d);
            var j = f.Evaluate(x);
            double[] jet = [j.Value, j.D1, j.D2, j.D3];
            double scale = Math.Abs(d[0]) + Math.Abs(d[1]) + Math.Abs(d[2]) + Math.Abs(d[3]);
            for (int k = 0; k <= 3; k++) Close(d[k], jet[k], scale * 1e-3, $"order {k}");
        }, iter: 300);
        foreach (string text in new[] { "phi^phi", "2^phi", "asin(phi/2)", "acos(phi/2)", "acosh(2 + phi^2)", "atanh(phi/2)",
                     "tan(phi)", "log10(2 + phi)", "sinh(phi)*cosh(phi)", "phi^-3 + phi^5", "(2 + phi)^1.7", "3/(2 + phi)" })
        {
            var f = Formula.Parse(text);
            var d = new double[4];
            foreach (double x in new[] { 0.31, 0.77, 1.3 })
            {
                f.EvaluateDerivatives(x, d);
                var j = f.Evaluate(x);
                double[] jet = [j.Value, j.D1, j.D2, j.D3];
                for (int k = 0; k <= 3; k++) Close(d[k], jet[k], Math.Abs(d[k]) * 1e-3, $"{text} order {k}");
            }
        }
    }

    /// <summary>Any well-formed text, with few parentheses so that precedence matters when printing.</summary>
    internal static Gen<string> Any(int depth)
    {
        var leaf = Gen.OneOf(Gen.Const("phi"), Gen.Const("a"), Gen.Const("pi"), Gen.Const("e"),
            Gen.Int[0, 12].Select(i => i.ToString(CultureInfo.InvariantCulture)),
            Gen.Double[1e-3, 50].Select(R));
        if (depth == 0) return leaf;
        var sub = Any(depth - 1);
        var unary = Gen.Select(sub, Gen.Int[0, 6], (x, k) => k switch
        {
            0 => "-" + x,
            1 => "+" + x,
            2 => $"({x})",
            3 => $"sin({x})",
            4 => $"abs({x})",
            5 => $"exp({x})",
            _ => $"sqrt({x})",
        });
        var binary = Gen.Select(sub, sub, Gen.Int[0, 8], (x, y, k) => k switch
        {
            0 => $"{x} + {y}",
            1 => $"{x} - {y}",
            2 => $"{x}*{y}",
            3 => $"{x}/{y}",
            4 => $"{x}^{y}",
            5 => $"min({x}, {y})",
            6 => $"max({x},{y})",
            7 => $"piecewise({x} > {y}, {x}, {y} <= phi, {y}, {x}*{y})",
            _ => $"{x}^2",
        });
        return Gen.Frequency((1, leaf), (2, unary), (3, binary));
    }

    [Fact]
    public void PrintThenParseGivesTheSameFunction()
    {
        var p = new Dictionary<string, double> { ["a"] = -0.75 };
        Gen.Select(Any(4), Gen.Double[-3, 3]).Sample((text, x) =>
        {
            Formula f;
            try { f = Formula.Parse(text, p); }
            catch (FormulaException) { return; } // e.g. a constant part that is not finite
            var g = Formula.Parse(f.ToString(), p);
            var h = Formula.Parse(f.ToString(inlineParameters: true));
            Assert.Equal(f.ToString(), g.ToString());
            var df = new double[6];
            var dg = new double[6];
            var dh = new double[6];
            foreach (double y in new[] { x, 0.5, -1.25 })
            {
                f.EvaluateDerivatives(y, df);
                g.EvaluateDerivatives(y, dg);
                h.EvaluateDerivatives(y, dh);
                Assert.Equal(df, dg); // bitwise (NaN equals NaN)
                Assert.Equal(df, dh);
                Assert.Equal(f.Value(y), g.Value(y));
                Assert.Equal(f.Evaluate(y), h.Evaluate(y));
            }
        }, iter: 1000);
    }
}
