using ModeSolver.Background;
using ModeSolver.Formulas;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Tests.Models;

public class FormulaFieldTheoryTests
{
    private static readonly string[] PhiChi = ["phi", "chi"];

    private static void Close(double expected, double actual, double rel, string what)
        => Assert.True(Math.Abs(actual - expected) <= rel * Math.Max(1e-300, Math.Abs(expected)), $"{what}: {actual} against {expected}");

    [Theory]
    [InlineData(1.0)]
    [InlineData(0.1)]
    [InlineData(7.0)]
    public void HyperbolicDisk_RicciScalarIsMinusFourOverThreeAlpha(double alpha)
    {
        // physics.md section 7 (Achucarro, Kallosh, Linde, Wang & Welling 2018, JCAP 04, 028): the disk
        // ds^2 = d phi^2 + (3 alpha/2) sinh^2(sqrt(2/(3 alpha)) phi) d theta^2 has R_fs = -4/(3 alpha) everywhere.
        var theory = FormulaFieldTheory.Einstein(["phi", "theta"], "V0*tanh(phi/sqrt(6*alpha))^2",
            [["1", "0"], ["0", "1.5*alpha*sinh(sqrt(2/(3*alpha))*phi)^2"]], new Dictionary<string, double> { ["alpha"] = alpha, ["V0"] = 1 });
        Assert.False(theory.IsCanonical);
        foreach (double phi in new[] { 0.3, 1.2, 4.0 })
            Close(-4 / (3 * alpha), FieldGeometry.RicciScalar(theory, new[] { phi, 0.8 }), 1e-11, $"R at phi = {phi}");
    }

    [Fact]
    public void Einstein_GradientAndHessianAreTheClosedForms()
    {
        // Hand derivatives of V = m^2 phi^2/2 + g phi^2 chi^2 + exp(b chi) (exact to rounding).
        var pars = new Dictionary<string, double> { ["m"] = 0.7, ["g"] = 0.3, ["b"] = 0.4 };
        var theory = FormulaFieldTheory.Einstein(PhiChi, "m^2*phi^2/2 + g*phi^2*chi^2 + exp(b*chi)", null, pars);
        Assert.True(theory.IsCanonical);
        double p = 1.3, c = -0.6;
        var grad = new double[2];
        var hess = new double[4];
        double v = theory.PotentialGradient(new[] { p, c }, grad);
        theory.PotentialHessian(new[] { p, c }, hess);
        Close(0.49 * p * p / 2 + 0.3 * p * p * c * c + Math.Exp(0.4 * c), v, 1e-15, "V");
        Close(0.49 * p + 0.6 * p * c * c, grad[0], 1e-14, "V_phi");
        Close(0.6 * p * p * c + 0.4 * Math.Exp(0.4 * c), grad[1], 1e-14, "V_chi");
        Close(0.49 + 0.6 * c * c, hess[0], 1e-14, "V_phiphi");
        Close(1.2 * p * c, hess[1], 1e-14, "V_phichi");
        Assert.Equal(hess[1], hess[2]);
        Close(0.6 * p * p + 0.16 * Math.Exp(0.4 * c), hess[3], 1e-14, "V_chichi");
    }

    public static TheoryData<string, string?, bool> OneFieldJordanCases() => new()
    {
        { "1 + xi*phi^2", null, false },
        { "1 + xi*phi^2", null, true },
        { "1 + xi*phi^2 + 0.1*phi^3", "1 + 0.2*phi^2", false },
        { "exp(0.3*phi)", "2 + sin(phi)", true },
    };

    [Theory]
    [MemberData(nameof(OneFieldJordanCases))]
    public void OneFieldJordan_IsTheSingleFieldJordanTheory(string omega2, string? kinetic, bool palatini)
    {
        // One field: the n-field map must reduce to the single-field Jordan-frame map of physics.md section 1 (our
        // JordanFrameTheory, itself checked against the closed forms): V, V', V'' and K, K', K'' to round-off.
        var pars = new Dictionary<string, double> { ["xi"] = 30.0, ["lambda"] = 0.1 };
        const string vj = "lambda*phi^4/4";
        var single = JordanFrameTheory.FromFormulas(Formula.Parse(omega2, pars), kinetic is null ? null : Formula.Parse(kinetic, pars), Formula.Parse(vj, pars), palatini);
        var multi = FormulaFieldTheory.Jordan(["phi"], vj, omega2, kinetic is null ? null : [[kinetic]], palatini, pars);
        var g = new double[1];
        var h = new double[1];
        var dg = new double[1];
        var ddg = new double[1];
        foreach (double phi in new[] { 0.05, 0.4, 1.7, 5.0 })
        {
            var x = new[] { phi };
            var vs = single.Potential(phi);
            var ks = single.Kinetic(phi);
            double v = multi.PotentialGradient(x, g);
            multi.PotentialHessian(x, h);
            Close(vs.Value, v, 1e-13, $"V({phi})");
            Close(vs.D1, g[0], 1e-12, $"V'({phi})");
            Close(vs.D2, h[0], 1e-11, $"V''({phi})");
            var gm = new double[1];
            multi.Metric(x, gm);
            multi.MetricDerivative(x, dg);
            multi.MetricSecondDerivative(x, ddg);
            Close(ks.Value, gm[0], 1e-13, $"K({phi})");
            Close(ks.D1, dg[0], 1e-12, $"K'({phi})");
            Close(ks.D2, ddg[0], 1e-11, $"K''({phi})");
        }
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void TwoFieldJordan_DerivativesAgreeWithDifferencesOfTheMap(bool palatini)
    {
        // The hand-differentiated map against Richardson differences of its own values (NumericalDerivatives documents
        // about 1e-10 relative for first and 1e-8 for second derivatives): an independent check of every index.
        var pars = new Dictionary<string, double> { ["xi"] = 5.0, ["xc"] = 2.0, ["l"] = 0.01 };
        var t = FormulaFieldTheory.Jordan(PhiChi, "l*(phi^2 + chi^2)^2/4 + 0.1*phi*chi^3", "1 + xi*phi^2 + xc*chi^2 + 0.3*phi*chi",
            [["1", "0.1*chi"], ["0.1 * chi", "1 + phi^2"]], palatini, pars);
        var x = new[] { 0.8, -0.45 };
        var dg = new double[8];
        var ddg = new double[16];
        t.MetricDerivative(x, dg);
        t.MetricSecondDerivative(x, ddg);
        var ndg = new double[8];
        var nddg = new double[16];
        NumericalDerivatives.Jacobian((p, r) => t.Metric(p, r), 4, x, ndg, transposed: true);
        NumericalDerivatives.SecondDerivatives((p, r) => t.Metric(p, r), 4, x, nddg);
        for (int i = 0; i < 8; i++) Assert.True(Math.Abs(dg[i] - ndg[i]) <= 1e-8 * (1 + Math.Abs(ndg[i])), $"dG[{i}] = {dg[i]}, differences {ndg[i]}");
        for (int i = 0; i < 16; i++) Assert.True(Math.Abs(ddg[i] - nddg[i]) <= 1e-6 * (1 + Math.Abs(nddg[i])), $"ddG[{i}] = {ddg[i]}, differences {nddg[i]}");
        var grad = new double[2];
        var hess = new double[4];
        var ngrad = new double[2];
        var nhess = new double[4];
        t.PotentialGradient(x, grad);
        t.PotentialHessian(x, hess);
        NumericalDerivatives.Gradient(p => t.Potential(p), x, ngrad);
        NumericalDerivatives.Hessian(p => t.Potential(p), x, nhess);
        for (int i = 0; i < 2; i++) Assert.True(Math.Abs(grad[i] - ngrad[i]) <= 1e-9 * (1e-3 + Math.Abs(ngrad[i])), $"V_{i} = {grad[i]}, differences {ngrad[i]}");
        for (int i = 0; i < 4; i++) Assert.True(Math.Abs(hess[i] - nhess[i]) <= 1e-6 * (1e-3 + Math.Abs(nhess[i])), $"V_{i} = {hess[i]}, differences {nhess[i]}");
        // The metric term of physics.md section 7 by hand at this point: G_phiphi = 1/W + (3/2)(W_phi/W)^2 (metric only).
        double w = 1 + 5 * 0.64 + 2 * 0.2025 + 0.3 * 0.8 * -0.45, wphi = 10 * 0.8 + 0.3 * -0.45;
        var gm = new double[4];
        t.Metric(x, gm);
        Close(1 / w + (palatini ? 0 : 1.5 * wphi * wphi / (w * w)), gm[0], 1e-14, "G_phiphi");
        Assert.Equal(["Omega^2 = 0", "G_IJ not positive definite: smallest Cholesky pivot = 0"], t.Boundaries.Select(b => b.Name));
        Assert.All(t.Boundaries, b => Assert.True(b.IsInside(x)));
    }

    [Fact]
    public void Metric_WrongSizeOrNotSymmetric_IsOneClearLine()
    {
        var e = Assert.Throws<TheoryException>(() => FormulaFieldTheory.Einstein(PhiChi, "phi^2", [["1", "0"]]));
        Assert.Contains("1 row(s) but the theory has 2 field(s) (phi, chi)", e.Message, StringComparison.Ordinal);
        e = Assert.Throws<TheoryException>(() => FormulaFieldTheory.Einstein(PhiChi, "phi^2", [["1", "0"], ["0"]]));
        Assert.Contains("row 2 (chi)", e.Message, StringComparison.Ordinal);
        e = Assert.Throws<TheoryException>(() => FormulaFieldTheory.Einstein(PhiChi, "phi^2", [["1", "chi"], ["phi", "1"]]));
        Assert.Contains("not symmetric: entry [phi][chi] = \"chi\" but [chi][phi] = \"phi\"", e.Message, StringComparison.Ordinal);
        var f = Assert.Throws<FormulaException>(() => FormulaFieldTheory.Einstein(PhiChi, "phi^2 + psi^2"));
        Assert.Contains("'psi'", f.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', e.Message);
    }

    [Fact]
    public void SwitchingArguments_AreNonSmoothSurfaces()
    {
        var t = FormulaFieldTheory.Einstein(PhiChi, "phi^2 + abs(chi - c)", [["1", "0"], ["0", "max(1, phi)"]], new Dictionary<string, double> { ["c"] = 0.5 });
        Assert.Equal(2, t.NonSmoothSurfaces.Count);
        Assert.Equal(0.0, t.NonSmoothSurfaces[0].Value(new[] { 3.0, 0.5 }));
        Assert.Equal(0.0, t.NonSmoothSurfaces[1].Value(new[] { 1.0, 7.0 }));
    }

    [Fact]
    public void DoubleQuadratic_BackgroundEndsAndMatchesTheRadialSingleFieldQuadratic()
    {
        // physics.md section 7 oracle: equal masses started radially are exactly the single-field quadratic
        // (rotational symmetry), so N_total from (phi, chi) = (a, a) equals the single-field N_total from sqrt(2) a.
        var t = FormulaFieldTheory.Einstein(PhiChi, "m^2*(phi^2 + chi^2)/2", null, new Dictionary<string, double> { ["m"] = 1e-5 });
        var two = FieldBackgroundSolver.Solve(t, new BackgroundSettings { Fields0 = [11.0, 11.0], EFoldsAfterEnd = 0 });
        var one = BackgroundSolver.Solve(new EinsteinFrameTheory(Formula.Parse("m^2*phi^2/2", new Dictionary<string, double> { ["m"] = 1e-5 }), null, ""),
            new BackgroundSettings { Phi0 = 11.0 * Math.Sqrt(2), EFoldsAfterEnd = 0 });
        Close(one.NEnd - one.NStart, two.NTotal, 1e-7, "N_total");
    }

    [Fact]
    public void Evaluations_AllocateNothingPerCall()
    {
        // The right-hand-side calls (V and its gradient, the metric, the Christoffel symbols, the Hessian, the Riemann
        // tensor) of a Jordan-frame theory, the longest path: 1000 more calls must not allocate 1000 more bytes (any
        // allocation costs at least 24 bytes; the margin is for the runtime's own one-off allocations).
        var t = FormulaFieldTheory.Jordan(PhiChi, "l*(phi^2 + chi^2)^2/4", "1 + xi*phi^2 + xc*chi^2", [["1", "0"], ["0", "1 + phi^2"]],
            false, new Dictionary<string, double> { ["xi"] = 5.0, ["xc"] = 2.0, ["l"] = 0.01 });
        var x = new[] { 0.8, -0.45 };
        var grad = new double[2];
        var m = new double[4];
        var gamma = new double[8];
        var riemann = new double[16];
        long Measure(int calls)
        {
            long before = GC.GetAllocatedBytesForCurrentThread();
            for (int i = 0; i < calls; i++)
            {
                t.PotentialGradient(x, grad);
                t.PotentialHessian(x, m);
                t.Metric(x, m);
                t.Christoffel(x, gamma);
                t.Riemann(x, riemann);
            }
            return GC.GetAllocatedBytesForCurrentThread() - before;
        }
        Measure(50); // warm-up (JIT, pool)
        long few = Measure(10), many = Measure(1010);
        Assert.True(many - few < 1000, $"allocation grew by {many - few} bytes over 1000 extra calls");
    }

    [Fact]
    public void MetricNotPositiveDefiniteAlongTheRun_NamesTheFieldValuesAndN()
    {
        // G_chichi = chi - 1/2 vanishes as chi rolls down from 3: the run stops there in one line with the place.
        var t = FormulaFieldTheory.Einstein(PhiChi, "m^2*phi^2/2 + m^2*chi^2", [["1", "0"], ["0", "chi - 0.5"]], new Dictionary<string, double> { ["m"] = 1e-5 });
        Assert.Single(t.Boundaries);
        Assert.True(t.SmallestMetricPivot(new[] { 15.0, 3.0 }) > 0);
        Assert.True(t.SmallestMetricPivot(new[] { 15.0, 0.4 }) < 0);
        var e = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(t, new BackgroundSettings { Fields0 = [15.0, 3.0] }));
        Assert.Matches(@"not positive definite at \(phi, chi\) = \([0-9.]+, 0\.49999", e.Message);
        Assert.Contains("N = ", e.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', e.Message);
    }

    [Fact]
    public void MetricNotPositiveDefiniteAtTheStart_NamesTheFieldValues()
    {
        var t = FormulaFieldTheory.Einstein(PhiChi, "phi^2 + chi^2", [["1", "0"], ["0", "1 - chi"]]);
        var e = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(t, new BackgroundSettings { Fields0 = [10.0, 2.0] }));
        Assert.Contains("not positive definite", e.Message, StringComparison.Ordinal);
        Assert.Contains("(phi, chi) = (10, 2)", e.Message, StringComparison.Ordinal);
    }
}
