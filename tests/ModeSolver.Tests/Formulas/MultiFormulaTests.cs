using System.Globalization;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Tests.Formulas;

/// <summary>
/// Formulas in several variables (<see cref="MultiFormula"/>): value, gradient, Hessian and third partials against
/// closed forms derived by hand (written out beside each check), against Richardson-extrapolated central differences
/// of the next lower order, invariance under reordering the variables, agreement with the one-variable
/// <see cref="Formula"/>, errors, and allocation-free evaluation.
/// </summary>
public class MultiFormulaTests
{
    private static readonly string[] PhiChi = ["phi", "chi"];

    private static void Near(double expected, double actual, double rel, string what)
    {
        double tol = rel * Math.Max(1e-300, Math.Abs(expected));
        Assert.True(Math.Abs(expected - actual) <= tol,
            $"{what}: expected {expected.ToString("R", CultureInfo.InvariantCulture)}, got {actual.ToString("R", CultureInfo.InvariantCulture)}");
    }

    private static (double F, double[] G, double[] H, double[] T) All(MultiFormula f, params double[] x)
    {
        int n = x.Length;
        var g = new double[n];
        var h = new double[n * n];
        var t = new double[n * n * n];
        double v = f.Evaluate(x, g, h, t);
        return (v, g, h, t);
    }

    [Fact]
    public void ExponentialTimesSquareMatchesHandDerivedPartials()
    {
        // f = exp(2 b phi) chi^2, with E = exp(2 b phi), by hand:
        // f_p = 2b E chi^2, f_c = 2 E chi, f_pp = 4b^2 E chi^2, f_pc = 4b E chi, f_cc = 2 E,
        // f_ppp = 8b^3 E chi^2, f_ppc = 8b^2 E chi, f_pcc = 4b E, f_ccc = 0.
        double b = 0.37;
        var f = Formula.Compile("exp(2*b*phi)*chi^2", PhiChi, new Dictionary<string, double> { ["b"] = b });
        foreach (var (phi, chi) in new[] { (0.3, -1.7), (-2.0, 0.45), (4.1, 3.3), (0.0, 1.0) })
        {
            double E = Math.Exp(2 * b * phi);
            var (v, g, h, t) = All(f, phi, chi);
            string at = $"at ({phi}, {chi})";
            Near(E * chi * chi, v, 1e-15, "f " + at);
            Near(2 * b * E * chi * chi, g[0], 1e-14, "f_phi " + at);
            Near(2 * E * chi, g[1], 1e-14, "f_chi " + at);
            Near(4 * b * b * E * chi * chi, h[0], 1e-14, "f_phi_phi " + at);
            Near(4 * b * E * chi, h[1], 1e-14, "f_phi_chi " + at);
            Near(4 * b * E * chi, h[2], 1e-14, "f_chi_phi " + at);
            Near(2 * E, h[3], 1e-14, "f_chi_chi " + at);
            Near(8 * b * b * b * E * chi * chi, t[0], 1e-14, "f_ppp " + at);
            foreach (int k in new[] { 1, 2, 4 }) Near(8 * b * b * E * chi, t[k], 1e-14, $"f_ppc (slot {k}) " + at);
            foreach (int k in new[] { 3, 5, 6 }) Near(4 * b * E, t[k], 1e-14, $"f_pcc (slot {k}) " + at);
            Assert.Equal(0.0, t[7]);
        }
    }

    [Fact]
    public void SineOfProductAndQuotientMatchHandDerivedPartials()
    {
        // f = sin(x y), s = sin(x y), c = cos(x y), by hand: f_x = y c, f_y = x c, f_xx = -y^2 s, f_xy = c - x y s,
        // f_yy = -x^2 s, f_xxy = -2 y s - x y^2 c, f_xyy = -2 x s - x^2 y c, f_xxx = -y^3 c.
        var f = Formula.Compile("sin(x*y)", ["x", "y"]);
        // g = x / (1 + y^2), D = 1 + y^2: g_x = 1/D, g_y = -2xy/D^2, g_xx = 0, g_xy = -2y/D^2, g_yy = x (6y^2 - 2)/D^3.
        var q = Formula.Compile("x/(1 + y^2)", ["x", "y"]);
        foreach (var (x, y) in new[] { (0.4, 1.3), (-1.1, 0.2), (2.5, -0.8) })
        {
            double s = Math.Sin(x * y), c = Math.Cos(x * y);
            var (v, g, h, t) = All(f, x, y);
            string at = $"at ({x}, {y})";
            Near(s, v, 1e-15, "f " + at);
            Near(y * c, g[0], 1e-14, "f_x " + at);
            Near(x * c, g[1], 1e-14, "f_y " + at);
            Near(-y * y * s, h[0], 1e-14, "f_xx " + at);
            Near(c - x * y * s, h[1], 1e-13, "f_xy " + at);
            Near(-x * x * s, h[3], 1e-14, "f_yy " + at);
            Near(-y * y * y * c, t[0], 1e-14, "f_xxx " + at);
            Near(-2 * y * s - x * y * y * c, t[1], 1e-13, "f_xxy " + at);
            Near(-2 * x * s - x * x * y * c, t[3], 1e-13, "f_xyy " + at);

            double D = 1 + y * y;
            var (qv, qg, qh, _) = All(q, x, y);
            Near(x / D, qv, 1e-15, "g " + at);
            Near(1 / D, qg[0], 1e-15, "g_x " + at);
            Near(-2 * x * y / (D * D), qg[1], 1e-14, "g_y " + at);
            Assert.Equal(0.0, qh[0]);
            Near(-2 * y / (D * D), qh[1], 1e-14, "g_xy " + at);
            Near(x * (6 * y * y - 2) / (D * D * D), qh[3], 1e-13, "g_yy " + at);
        }
    }

    /// <summary>Formulas exercising every kernel (powers, quotients, elementary functions, a general power).</summary>
    private static readonly string[] Mixed =
    [
        "exp(-a*phi)*(1 + chi^2)^1.5 + log(2 + sin(phi*chi))",
        "sqrt(1 + phi^2 + chi^2*u^2) / (3 + cos(u*phi))",
        "tanh(phi - chi)^2 * atan(u) + asinh(phi*u) - acosh(2 + chi^2) + atanh(0.3*u)",
        "(1 + phi^2)^(0.5 + chi^2) * 2^u - 3/(2 + u^2) + log10(5 + chi) + sinh(u)*cosh(phi)",
        "asin(0.2*phi*chi) + acos(0.1*u) + tan(0.3*chi) - u^-2 + phi^5/120",
    ];

    private static readonly string[] Xyz = ["phi", "chi", "u"];

    private static double[] Gradient(MultiFormula f, double[] x)
    {
        var g = new double[x.Length];
        f.Evaluate(x, g, []);
        return g;
    }

    private static double[] Hessian(MultiFormula f, double[] x)
    {
        var g = new double[x.Length];
        var h = new double[x.Length * x.Length];
        f.Evaluate(x, g, h);
        return h;
    }

    /// <summary>d/dx_k of <paramref name="lower"/> by central differences at steps h and h/2, Richardson-extrapolated (error O(h^4)).</summary>
    private static double[] Richardson(Func<double[], double[]> lower, double[] x, int k, double h)
    {
        double[] Central(double step)
        {
            var up = (double[])x.Clone();
            var down = (double[])x.Clone();
            up[k] += step;
            down[k] -= step;
            var a = lower(up);
            var b = lower(down);
            var d = new double[a.Length];
            for (int i = 0; i < a.Length; i++) d[i] = (a[i] - b[i]) / (2 * step);
            return d;
        }
        var coarse = Central(h);
        var fine = Central(h / 2);
        var r = new double[coarse.Length];
        for (int i = 0; i < r.Length; i++) r[i] = (4 * fine[i] - coarse[i]) / 3;
        return r;
    }

    [Fact]
    public void EveryOrderAgreesWithRichardsonDifferencesOfTheOrderBelow()
    {
        var pars = new Dictionary<string, double> { ["a"] = 0.6 };
        double[][] points = [[0.3, -0.4, 0.7], [1.2, 0.5, -0.9], [-0.6, 1.1, 1.4]];
        foreach (var text in Mixed)
        {
            var f = Formula.Compile(text, Xyz, pars);
            foreach (var x in points)
            {
                var (_, g, h, t) = All(f, x);
                int n = x.Length;
                for (int k = 0; k < n; k++)
                {
                    // Central differences with h = 1e-3 and Richardson: truncation ~ h^4 f^(5) ~ 1e-12, rounding ~ 1e-16/h ~ 1e-13.
                    var dv = Richardson(p => [f.Value(p)], x, k, 1e-3);
                    var dg = Richardson(p => Gradient(f, p), x, k, 1e-3);
                    var dh = Richardson(p => Hessian(f, p), x, k, 1e-3);
                    double scale = 1 + Math.Abs(g[k]);
                    Assert.True(Math.Abs(dv[0] - g[k]) <= 1e-8 * scale, $"{text}: f_{k} = {g[k]:R}, differences {dv[0]:R} at [{string.Join(", ", x)}]");
                    for (int i = 0; i < n; i++)
                        Assert.True(Math.Abs(dg[i] - h[i * n + k]) <= 1e-8 * (1 + Math.Abs(h[i * n + k])),
                            $"{text}: f_{i}{k} = {h[i * n + k]:R}, differences {dg[i]:R}");
                    for (int ij = 0; ij < n * n; ij++)
                        Assert.True(Math.Abs(dh[ij] - t[ij * n + k]) <= 1e-7 * (1 + Math.Abs(t[ij * n + k])),
                            $"{text}: third partial slot {ij * n + k} = {t[ij * n + k]:R}, differences {dh[ij]:R}");
                }
            }
        }
    }

    [Fact]
    public void MixedPartialsDoNotDependOnTheOrderOfTheVariables()
    {
        // The same function with its variables listed in reverse order seeds the series differently; the partials
        // must be the same numbers (to rounding) at the permuted indices.
        var pars = new Dictionary<string, double> { ["a"] = 0.6 };
        double[] x = [0.45, -0.35, 0.8];
        foreach (var text in Mixed)
        {
            var f = Formula.Compile(text, Xyz, pars);
            var r = Formula.Compile(text, ["u", "chi", "phi"], pars);
            var (v, g, h, t) = All(f, x);
            var (rv, rg, rh, rt) = All(r, x[2], x[1], x[0]);
            int n = 3;
            Near(v, rv, 1e-15, text + " value");
            for (int i = 0; i < n; i++)
            {
                Near(g[i], rg[n - 1 - i], 1e-14, $"{text} f_{i}");
                for (int j = 0; j < n; j++)
                {
                    Near(h[i * n + j], rh[(n - 1 - i) * n + (n - 1 - j)], 1e-13, $"{text} f_{i}{j}");
                    Assert.Equal(h[i * n + j], h[j * n + i]);
                    for (int k = 0; k < n; k++)
                        Near(t[(i * n + j) * n + k], rt[((n - 1 - i) * n + (n - 1 - j)) * n + (n - 1 - k)], 1e-12, $"{text} f_{i}{j}{k}");
                }
            }
        }
    }

    [Fact]
    public void OneVariableFormulasGiveTheOneVariableResultsBitForBit()
    {
        foreach (var entry in ModelCatalogue.All)
        {
            foreach (var text in new[] { entry.Potential, entry.Coupling, entry.Kinetic })
            {
                if (text is null) continue;
                var single = Formula.Parse(text, entry.DefaultParameters);
                var multi = Formula.Compile(text, ["phi"], entry.DefaultParameters);
                double scale = Math.Max(1, Math.Abs(entry.DefaultPhi0));
                var g = new double[1];
                var h = new double[1];
                var t = new double[1];
                for (int k = -50; k <= 50; k++)
                {
                    double phi = scale * k / 25.0;
                    var j = single.Evaluate(phi);
                    double v = multi.Evaluate([phi], g, h, t);
                    Assert.Equal(BitConverter.DoubleToInt64Bits(j.Value), BitConverter.DoubleToInt64Bits(v));
                    Assert.Equal(BitConverter.DoubleToInt64Bits(j.D1), BitConverter.DoubleToInt64Bits(g[0]));
                    Assert.Equal(BitConverter.DoubleToInt64Bits(j.D2), BitConverter.DoubleToInt64Bits(h[0]));
                    Assert.Equal(BitConverter.DoubleToInt64Bits(j.D3), BitConverter.DoubleToInt64Bits(t[0]));
                    Assert.Equal(BitConverter.DoubleToInt64Bits(single.Value(phi)), BitConverter.DoubleToInt64Bits(multi.Value([phi])));
                }
            }
        }
    }

    [Fact]
    public void TheMultivariateArithmeticAgreesWithTheOneVariableJetOnAFunctionOfOneVariable()
    {
        // Two variables, the second unused: the multivariate series (its own product, quotient and chain rules) must
        // reproduce the one-variable order-3 jet to rounding, and give zero for every partial involving chi.
        foreach (var entry in ModelCatalogue.All)
        {
            string text = entry.Potential;
            var single = Formula.Parse(text, entry.DefaultParameters);
            var multi = Formula.Compile(text, PhiChi, entry.DefaultParameters);
            double scale = Math.Max(1, Math.Abs(entry.DefaultPhi0));
            for (int k = 1; k <= 40; k++)
            {
                double phi = scale * (k + 0.31) / 20.0;
                var j = single.Evaluate(phi);
                if (!double.IsFinite(j.Value) || !double.IsFinite(j.D3)) continue;
                var (v, g, h, t) = All(multi, phi, 0.7);
                string what = $"{entry.Id} '{text}' at {phi}";
                double s0 = Math.Abs(j.Value) + 1e-300;
                Assert.True(Math.Abs(v - j.Value) <= 1e-14 * s0, what + " value");
                Assert.True(Math.Abs(g[0] - j.D1) <= 1e-12 * (Math.Abs(j.D1) + 1e-12 * s0), $"{what} f' {g[0]:R} vs {j.D1:R}");
                Assert.True(Math.Abs(h[0] - j.D2) <= 1e-12 * (Math.Abs(j.D2) + 1e-12 * s0), $"{what} f'' {h[0]:R} vs {j.D2:R}");
                Assert.True(Math.Abs(t[0] - j.D3) <= 1e-11 * (Math.Abs(j.D3) + 1e-12 * s0), $"{what} f''' {t[0]:R} vs {j.D3:R}");
                Assert.Equal(0.0, g[1]);
                Assert.Equal(0.0, h[1]);
                Assert.Equal(0.0, h[3]);
                Assert.Equal(0.0, t[7]);
            }
        }
    }

    [Fact]
    public void SwitchingFunctionsAndPiecewiseWorkInSeveralVariables()
    {
        // abs(phi - chi) + piecewise(phi < chi, phi*chi, phi^2): on the side phi > chi, f = phi - chi + phi^2.
        var f = Formula.Compile("abs(phi - chi) + piecewise(phi < chi, phi*chi, phi^2) + max(phi, 2*chi)", PhiChi);
        var (v, g, h, _) = All(f, 1.5, 0.5);
        Assert.Equal(1.0 + 2.25 + 1.5, v);
        Assert.Equal([1 + 3.0 + 1, -1.0], g);
        Assert.Equal([2.0, 0, 0, 0], h);
        // The other side, phi < chi: f = chi - phi + phi*chi + 2 chi.
        (v, g, h, _) = All(f, 0.5, 1.5);
        Assert.Equal(1.0 + 0.75 + 3.0, v);
        Assert.Equal([-1 + 1.5, 1 + 0.5 + 2.0], g);
        Assert.Equal([0.0, 1, 1, 0], h);
    }

    [Fact]
    public void BadInputGivesOneLineErrors()
    {
        var e = Assert.Throws<FormulaException>(() => Formula.Compile("phi*chi", ["phi", "phi"]));
        Assert.Contains("variable 'phi' is named twice", e.Message);
        e = Assert.Throws<FormulaException>(() => Formula.Compile("phi*chi", PhiChi, new Dictionary<string, double> { ["chi"] = 1 }));
        Assert.Contains("parameter 'chi' has the same name as the variable", e.Message);
        e = Assert.Throws<FormulaException>(() => Formula.Compile("phi*psi", PhiChi));
        Assert.Contains("'psi'", e.Message);
        Assert.Contains("known: phi, chi, pi, e", e.Message);
        e = Assert.Throws<FormulaException>(() => Formula.Compile("phi", []));
        Assert.Contains("no variable names", e.Message);
        e = Assert.Throws<FormulaException>(() => Formula.Compile("exp(x)", ["exp"]));
        Assert.Contains("cannot be the variable name", e.Message);
        var f = Formula.Compile("phi*chi", PhiChi);
        var a = Assert.Throws<ArgumentException>(() => f.Value([1.0]));
        Assert.Contains("point has 1 coordinates, the formula has 2 variables (phi, chi)", a.Message);
        Assert.Throws<ArgumentException>(() => f.Evaluate([1.0, 2.0], new double[2], new double[3]));
    }

    [Fact]
    public void EvaluationAllocatesNothing()
    {
        var f = Formula.Compile(Mixed[0], Xyz, new Dictionary<string, double> { ["a"] = 0.6 });
        Span<double> x = [0.3, -0.4, 0.7];
        Span<double> g = stackalloc double[3], h = stackalloc double[9], t = stackalloc double[27];
        double sum = f.Evaluate(x, g, h, t) + f.Evaluate(x, g, h) + f.Value(x); // warm up: the first call of each order compiles its code
        long before = GC.GetAllocatedBytesForCurrentThread();
        for (int i = 0; i < 100; i++)
        {
            x[0] = 0.3 + 1e-3 * i;
            sum += f.Evaluate(x, g, h, t) + f.Evaluate(x, g, h) + f.Value(x);
        }
        long after = GC.GetAllocatedBytesForCurrentThread();
        Assert.True(double.IsFinite(sum));
        Assert.Equal(0, after - before);
    }
}
