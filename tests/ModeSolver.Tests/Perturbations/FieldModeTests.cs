using ModeSolver.Background;
using ModeSolver.Models;
using ModeSolver.Perturbations;
using ModeSolver.Spectra;
using ModeSolver.Tests.Background;
using Xunit.Abstractions;

namespace ModeSolver.Tests.Perturbations;

/// <summary>The n x n covariant mode system against the oracles of physics.md section 7.</summary>
public class FieldModeTests(ITestOutputHelper output)
{
    private static readonly ModeSettings Tight = new() { Tolerance = 1e-8, Derivatives = false };

    private static BackgroundSettings Start(double[] fields, double[]? velocity = null) =>
        new() { Fields0 = fields, Velocity0 = velocity, Tolerance = 1e-12, EFoldsAfterEnd = 0 };

    /// <summary>V = m1^2 phi^2/2 + m2^2 chi^2/2 in polar fields with every derivative in closed form (G = diag(1, r^2)).</summary>
    internal static MetricFieldTheory PolarDoubleQuadratic(double m1, double m2)
    {
        double a = m1 * m1, b = m2 * m2;
        return new MetricFieldTheory(new[] { "r", "theta" },
            p => { double c = Math.Cos(p[1]), s = Math.Sin(p[1]); return 0.5 * p[0] * p[0] * (a * c * c + b * s * s); },
            metric: (p, g) => { g[0] = 1; g[1] = 0; g[2] = 0; g[3] = p[0] * p[0]; },
            gradient: (p, g) =>
            {
                double c = Math.Cos(p[1]), s = Math.Sin(p[1]);
                g[0] = p[0] * (a * c * c + b * s * s);
                g[1] = p[0] * p[0] * (b - a) * s * c;
            },
            hessian: (p, h) =>
            {
                double c = Math.Cos(p[1]), s = Math.Sin(p[1]);
                h[0] = a * c * c + b * s * s;
                h[1] = h[2] = 2 * p[0] * (b - a) * s * c;
                h[3] = p[0] * p[0] * (b - a) * (c * c - s * s);
            },
            metricDerivative: (p, d) => { d.Clear(); d[3] = 2 * p[0]; },
            metricSecondDerivative: (p, d) => { d.Clear(); d[3] = 2; },
            description: "double quadratic, polar fields");
    }

    /// <summary>k (background units) leaving the horizon <paramref name="efolds"/> after the start.</summary>
    private static double KAt(IBackground bg, double efolds) => Math.Exp(bg.NStart + efolds) * bg.At(bg.NStart + efolds).H;

    [Fact]
    public void EqualMasses_RadialStart_EqualSingleFieldQuadratic()
    {
        // physics.md 7 oracle: V = m^2 (phi^2 + chi^2)/2 started radially is exactly the single-field quadratic
        // (the radial field is the inflaton; the angular perturbation is uncorrelated with R).
        var two = AdiabaticBackground.Of(FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(1, 1), Start([12.0, 9.0])));
        var one = BackgroundSolver.Solve(new Quadratic(), new BackgroundSettings { Phi0 = 15.0, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        double k = KAt(one, 20);
        var single = new ModeIntegrator().Solve(one, k, Tight with { Derivatives = true });
        var field = new FieldModeIntegrator(two).Solve(two, k, Tight);
        output.WriteLine($"P single {single.Ps:R} two-field {field.Pr:R} rel {field.Pr / single.Ps - 1:E3}; P_S {field.Ps:E4} C_RS {field.Crs:E3} T_RS {field.Trs:E3}; rhs {single.RhsEvaluations} vs {field.RhsEvaluations}");
        Assert.Equal(1.0, field.Pr / single.Ps, 1e-6);
        Assert.Equal(1.0, field.Pt / single.Pt, 1e-6);
        Assert.True(Math.Abs(field.CosDelta) < 1e-6, $"cos Delta = {field.CosDelta}");
        // No conversion after exit: T_RS = 0 to its resolution (FieldModeIntegrator.ExitEFolds: about 1e-2).
        Assert.True(field.Trs < 2e-2, $"T_RS = {field.Trs}");
    }

    [Fact]
    public void ThreeEqualMasses_RadialStart_EqualSingleFieldQuadratic()
    {
        // The same oracle with n = 3 (physics.md 7): V = m^2 |phi|^2/2 from a radial start at |phi| = 15.
        var theory = new MetricFieldTheory(new[] { "a", "b", "c" }, p => 0.5 * (p[0] * p[0] + p[1] * p[1] + p[2] * p[2]),
            gradient: (p, g) => { g[0] = p[0]; g[1] = p[1]; g[2] = p[2]; },
            hessian: (p, h) => { h.Clear(); h[0] = h[4] = h[8] = 1; });
        var three = AdiabaticBackground.Of(FieldBackgroundSolver.Solve(theory, Start([10.0, 10.0, 5.0])));
        var one = BackgroundSolver.Solve(new Quadratic(), new BackgroundSettings { Phi0 = 15.0, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        double k = KAt(one, 20);
        var single = new ModeIntegrator().Solve(one, k, Tight with { Derivatives = true });
        var field = new FieldModeIntegrator(three).Solve(three, k, Tight);
        output.WriteLine($"P single {single.Ps:R} three-field {field.Pr:R} rel {field.Pr / single.Ps - 1:E3}; P_S {field.Ps:E4}; C_RS {field.Crs}");
        Assert.Equal(1.0, field.Pr / single.Ps, 1e-6);
        Assert.True(double.IsNaN(field.Crs), "C_RS is defined for two fields only");
        Assert.True(field.Ps > 0);
    }

    [Fact]
    public void CartesianAndPolarFields_GiveTheSameSpectra()
    {
        // physics.md 7: in curvilinear coordinates on a flat field space every result equals the Cartesian one.
        // A light second field (mass 0.05 of the first): the trajectory turns a little, R and S are correlated and the
        // isocurvature survives to the end of inflation.
        double x0 = 10, y0 = 9;
        var cart = AdiabaticBackground.Of(FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(1, 0.05), Start([x0, y0])));
        var polar = AdiabaticBackground.Of(FieldBackgroundSolver.Solve(PolarDoubleQuadratic(1, 0.05), Start([Math.Sqrt(x0 * x0 + y0 * y0), Math.Atan2(y0, x0)])));
        double k = KAt(cart, 10);
        var (vc, ic) = FieldPivotValues.Compute(cart, k, 1e-6);
        var (vp, ip) = FieldPivotValues.Compute(polar, k, 1e-6);
        output.WriteLine($"P_R {vc.Ps:R} / {vp.Ps:R}; P_S {ic.Ps:R} / {ip.Ps:R}; C_RS {ic.Crs:R} / {ip.Crs:R}; n_s {vc.Ns:R} / {vp.Ns:R} (+- {vc.Errors.Ns:E2}); T_RS {ic.Trs:G6}; beta {ic.BetaIso:G6}");
        Assert.Equal(1.0, vp.Ps / vc.Ps, 1e-6);
        Assert.Equal(1.0, ip.Ps / ic.Ps, 1e-6);
        Assert.Equal(ic.Crs / Math.Sqrt(ic.Ps * vc.Ps), ip.Crs / Math.Sqrt(ip.Ps * vp.Ps), 1e-6);
        Assert.Equal(vc.Ns, vp.Ns, 1e-6);
        Assert.Equal(ic.Trs, ip.Trs, 1e-6);
        Assert.True(ic.Ps > 1e-3 * vc.Ps && Math.Abs(ic.CosDelta) > 1e-3, "the test needs a real, correlated isocurvature");
    }

    [Fact]
    public void HeavyFieldAtItsMinimum_LeavesSingleFieldUnchanged()
    {
        // physics.md 7 oracle: a field of mass 10 H sitting at its minimum leaves the single-field results unchanged.
        var one = BackgroundSolver.Solve(new Quadratic(), new BackgroundSettings { Phi0 = 15.0, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        double k = KAt(one, 20);
        double heavy = 10 * one.At(one.NAtHorizonExit(k)).H, b = heavy * heavy;
        var theory = new MetricFieldTheory(new[] { "phi", "chi" }, p => 0.5 * p[0] * p[0] + 0.5 * b * p[1] * p[1],
            gradient: (p, g) => { g[0] = p[0]; g[1] = b * p[1]; }, hessian: (p, h) => { h[0] = 1; h[1] = h[2] = 0; h[3] = b; });
        var two = AdiabaticBackground.Of(FieldBackgroundSolver.Solve(theory, Start([15.0, 0.0])));
        var single = new ModeIntegrator().Solve(one, k, Tight with { Derivatives = true });
        var field = new FieldModeIntegrator(two).Solve(two, k, Tight);
        output.WriteLine($"P single {single.Ps:R} two-field {field.Pr:R} rel {field.Pr / single.Ps - 1:E3}; P_S/P_R {field.Ps / field.Pr:E3}; frozen {field.Frozen} at N = {field.NFinal:G6} (end {two.NEnd:G6})");
        Assert.Equal(1.0, field.Pr / single.Ps, 1e-6);
        Assert.True(field.Ps < 1e-10 * field.Pr, $"P_S/P_R = {field.Ps / field.Pr}");
    }

    [Fact]
    public void MasslessSpectator_HasIsocurvatureEqualToCurvatureAtExit()
    {
        // physics.md 7: a light spectator (flat direction, no turn) has P_S at horizon exit equal to P_R there,
        // (H/2 pi)^2/(2 epsilon_1). The spectator's delta chi is exactly frozen outside the horizon (massless), so
        // P_S(exit) = P_S(end) e1(end)/e1(exit); the two agree up to slow-roll corrections at exit, of order
        // epsilon_1 ~ 1e-2 here (common practice: a tolerance of a few epsilon_1).
        var theory = new MetricFieldTheory(new[] { "phi", "chi" }, p => 0.5 * p[0] * p[0],
            gradient: (p, g) => { g[0] = p[0]; g[1] = 0; }, hessian: (p, h) => { h[0] = 1; h[1] = h[2] = h[3] = 0; });
        var bg = AdiabaticBackground.Of(FieldBackgroundSolver.Solve(theory, Start([15.0, 0.0])));
        double k = KAt(bg, 20);
        var m = new FieldModeIntegrator(bg).Solve(bg, k, Tight);
        double e1Exit = bg.At(bg.NAtHorizonExit(k)).Epsilon1, e1End = bg.At(m.NFinal).Epsilon1;
        double psExit = m.Ps * e1End / e1Exit;
        output.WriteLine($"P_R {m.Pr:G8}, P_S(exit) {psExit:G8}, ratio {psExit / m.Pr:G6}, e1 at exit {e1Exit:G4}; cos Delta {m.CosDelta:E2}; frozen {m.Frozen}");
        Assert.False(m.Frozen); // the isocurvature never decays: the mode runs to the end of inflation
        Assert.Equal(1.0, psExit / m.Pr, 3 * e1Exit);
        Assert.True(Math.Abs(m.CosDelta) < 1e-6, "no turn: R and S stay uncorrelated");
    }
}
