using System.Globalization;
using CsCheck;
using ModeSolver.Formulas;

namespace ModeSolver.Tests.Formulas;

/// <summary>
/// The generated straight-line code behind <see cref="MultiFormula.Value"/> and <see cref="MultiFormula.Evaluate(ReadOnlySpan{double}, Span{double}, Span{double}, Span{double})"/>
/// against the multi-variable interpreter (the reference): the same kernels on the same operands in the same order, so
/// value, gradient, Hessian and third partials must be identical to the last bit (NaN where the interpreter gives NaN),
/// at every order, on random formulas in two and three variables using every operation of the language.
/// </summary>
public class MultiFormulaGeneratedCodeTests
{
    private static string R(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    private static void Same(double expected, double actual, string what) => FormulaGeneratedCodeTests.Same(expected, actual, what);

    private static void Agree(MultiFormula f, double[] x, string text)
    {
        if (!f.IsGenerated) return;
        int n = x.Length;
        string at = $"'{text}' at ({string.Join(", ", x.Select(R))})";
        Same(f.ValueInterpreted(x), f.Value(x), "value " + at);
        for (int order = 1; order <= 3; order++)
        {
            var (gi, hi, ti) = (new double[n], new double[order >= 2 ? n * n : 0], new double[order >= 3 ? n * n * n : 0]);
            var (gg, hg, tg) = (new double[n], new double[hi.Length], new double[ti.Length]);
            Same(f.EvaluateInterpreted(x, gi, hi, ti), f.Evaluate(x, gg, hg, tg), $"order {order} f " + at);
            for (int i = 0; i < n; i++) Same(gi[i], gg[i], $"order {order} gradient[{i}] " + at);
            for (int i = 0; i < hi.Length; i++) Same(hi[i], hg[i], $"order {order} hessian[{i}] " + at);
            for (int i = 0; i < ti.Length; i++) Same(ti[i], tg[i], $"order {order} third[{i}] " + at);
        }
    }

    [Fact]
    public void GeneratedCodeIsUsedWhereTheRuntimeCompiles()
    {
        var f = Formula.Compile("exp(2*b*phi)*chi^2 + V0*tanh(chi)", ["phi", "chi"], new Dictionary<string, double> { ["b"] = 0.3, ["V0"] = 2 });
        Assert.Equal(System.Runtime.CompilerServices.RuntimeFeature.IsDynamicCodeCompiled, f.IsGenerated);
        Assert.False(Formula.Compile("phi^2", ["phi"]).IsGenerated); // one variable: the one-variable Formula's own path
    }

    [Fact]
    public void RandomFormulasInTwoVariablesAgreeBitForBit()
    {
        var p = new Dictionary<string, double> { ["a"] = -0.75 };
        string[] vars = ["phi", "chi"];
        Gen.Select(FormulaGeneratedCodeTests.AllOps(4, vars), Gen.Double[-3, 3], Gen.Double[-3, 3], Gen.Int[-6, 6]).Sample((text, x, y, k) =>
        {
            MultiFormula f;
            try { f = Formula.Compile(text, vars, p); }
            catch (FormulaException) { return; } // e.g. a constant part that is not finite
            Agree(f, [x, y], text);
            Agree(f, [k * 0.5, -k * 0.5], text); // grid points: ties and zeros of min, max, abs, step, piecewise
            Agree(f, [-0.75, 0], text);          // phi = a
        }, iter: 300);
    }

    [Fact]
    public void RandomFormulasInThreeVariablesAgreeBitForBit()
    {
        var p = new Dictionary<string, double> { ["a"] = -0.75 };
        string[] vars = ["phi", "chi", "psi"];
        Gen.Select(FormulaGeneratedCodeTests.AllOps(3, vars), Gen.Double[-3, 3], Gen.Double[-3, 3], Gen.Double[-3, 3]).Sample((text, x, y, z) =>
        {
            MultiFormula f;
            try { f = Formula.Compile(text, vars, p); }
            catch (FormulaException) { return; }
            Agree(f, [x, y, z], text);
            Agree(f, [0, 0, 0], text);
            Agree(f, [x, x, -0.75], text);
        }, iter: 200);
    }

    [Fact]
    public void SpecialPointsAgreeBitForBit()
    {
        // Switch points, zeros, overflow and NaN inputs through every switching function and a few elementary ones.
        string[] vars = ["phi", "chi"];
        string[] texts =
        [
            "abs(phi*chi) + min(phi, chi)^2 - max(phi^2, chi)", "step(phi - chi)*exp(chi) + piecewise(phi < chi, sin(phi), cos(chi))",
            "phi^chi + 2^phi + log(abs(chi) + 1)", "sqrt(phi^2 + chi^2) / (1 + atan(phi)*asinh(chi))", "(phi*chi)^-2 + tanh(phi)^3",
        ];
        double[] specials = [0, -0.0, 1, -1, 0.5, 2, 1e-300, 30, 800, double.NaN, double.PositiveInfinity];
        foreach (string text in texts)
        {
            var f = Formula.Compile(text, vars);
            foreach (double x in specials)
                foreach (double y in specials)
                    Agree(f, [x, y], text);
        }
    }

    [Fact]
    public void OneShapeWithOtherParametersGivesItsOwnValues()
    {
        // The compiled code is shared across parameter values (cached by shape): each formula must keep its own constants.
        const string text = "V0*exp(-b*phi)*(1 + chi^2)";
        var f = Formula.Compile(text, ["phi", "chi"], new Dictionary<string, double> { ["V0"] = 1, ["b"] = 1 });
        var g = Formula.Compile(text, ["phi", "chi"], new Dictionary<string, double> { ["V0"] = 3, ["b"] = 0.5 });
        double[] x = [0.7, -1.2];
        Agree(f, x, "b 1");
        Agree(g, x, "b 0.5");
        Assert.Equal(Math.Exp(-0.7) * (1 + 1.44), f.Value(x), 1e-14);
        Assert.Equal(3 * Math.Exp(-0.35) * (1 + 1.44), g.Value(x), 1e-14);
    }

    [Fact]
    public void ConcurrentEvaluationAgrees()
    {
        var f = Formula.Compile("exp(2*b*phi)*chi^2 + abs(sin(phi*chi))", ["phi", "chi"], new Dictionary<string, double> { ["b"] = 0.37 });
        Parallel.For(0, 32, i =>
        {
            for (int k = 0; k < 100; k++) Agree(f, [(i * 100 + k) * 1e-3 - 1.6, 0.5 - k * 1e-2], "concurrent");
        });
    }
}
