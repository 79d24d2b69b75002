using ModeSolver.Background;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Tests.Background;

public class FieldBackgroundTests
{
    /// <summary>Canonical V = m1^2 phi^2/2 + m2^2 chi^2/2 in Cartesian fields, closed-form derivatives.</summary>
    internal static MetricFieldTheory DoubleQuadratic(double m1, double m2)
    {
        double a = m1 * m1, b = m2 * m2;
        return new MetricFieldTheory(new[] { "phi", "chi" },
            p => 0.5 * a * p[0] * p[0] + 0.5 * b * p[1] * p[1],
            gradient: (p, g) => { g[0] = a * p[0]; g[1] = b * p[1]; },
            hessian: (p, h) => { h[0] = a; h[1] = 0; h[2] = 0; h[3] = b; },
            description: "double quadratic");
    }

    /// <summary>The same theory in polar fields (r, theta) on the flat plane: G = diag(1, r^2).</summary>
    internal static MetricFieldTheory PolarDoubleQuadratic(double m1, double m2, bool closedForm)
    {
        double a = m1 * m1, b = m2 * m2;
        return new MetricFieldTheory(new[] { "r", "theta" },
            p => { double c = Math.Cos(p[1]), s = Math.Sin(p[1]); return 0.5 * p[0] * p[0] * (a * c * c + b * s * s); },
            metric: (p, g) => { g[0] = 1; g[1] = 0; g[2] = 0; g[3] = p[0] * p[0]; },
            gradient: closedForm ? (p, g) =>
            {
                double c = Math.Cos(p[1]), s = Math.Sin(p[1]);
                g[0] = p[0] * (a * c * c + b * s * s);
                g[1] = p[0] * p[0] * (b - a) * s * c;
            } : null,
            metricDerivative: closedForm ? (p, d) => { d.Clear(); d[3] = 2 * p[0]; } : null,
            metricSecondDerivative: closedForm ? (p, d) => { d.Clear(); d[3] = 2; } : null,
            description: "double quadratic, polar fields");
    }

    private static BackgroundSettings Settings(double[] start, double tol = 1e-12, double after = 0, FieldSurface? end = null)
        => new() { Fields0 = start, Tolerance = tol, EFoldsAfterEnd = after, EndSurface = end };

    public static TheoryData<string> SingleFieldCases => new() { "quadratic", "pole", "kink", "starobinsky" };

    private static (IInflatonTheory Theory, BackgroundSettings Settings) SingleFieldCase(string name) => name switch
    {
        "quadratic" => (new Quadratic(), new BackgroundSettings { Phi0 = 16, EFoldsAfterEnd = 2 }),
        "pole" => (new PoleTModel(1.0), new BackgroundSettings { Phi0 = 2.3, EFoldsAfterEnd = 2 }),
        "kink" => (new LinearKink(1.0, 2e-3, 2e-4, 0.0), new BackgroundSettings { Phi0 = 0.1, PhiEnd = -0.02 }),
        _ => (new Starobinsky(), new BackgroundSettings { Phi0 = 5.5, DPhi0 = -0.01, EFoldsAfterEnd = 1 }),
    };

    [Theory]
    [MemberData(nameof(SingleFieldCases))]
    public void SingleFieldAdapter_GivesTheSingleFieldBackgroundBitForBit(string name)
    {
        var (theory, settings) = SingleFieldCase(name);
        var single = BackgroundSolver.Solve(theory, settings);
        var field = FieldBackgroundSolver.Solve(new SingleFieldTheory(theory), settings);
        Assert.Equal(single.NEnd, field.NEnd);
        Assert.Equal(single.NStop, field.NStop);
        Assert.Equal(single.EndCrossings, field.EndCrossings);
        Assert.Equal(single.NonSmoothTimes, field.NonSmoothTimes);
        Assert.Equal(single.SegmentCount, field.SegmentCount);
        Assert.Equal(single.EndedAtPhiEnd, field.EndedAtSurface);
        var phi = new double[1];
        var dphi = new double[1];
        for (int i = 0; i <= 40; i++)
        {
            double n = single.NStart + (single.NStop - single.NStart) * i / 40.0;
            var a = single.At(n);
            var b = field.At(n, phi, dphi);
            Assert.Equal(a.Phi, phi[0]);
            Assert.Equal(a.DPhi, dphi[0]);
            // H and epsilon_1 from the same state with the sums in another order: equal to round-off.
            Assert.Equal(a.H, b.H, 1e-14 * a.H);
            Assert.Equal(a.Epsilon1, b.Epsilon1, 1e-14 * Math.Max(1e-300, a.Epsilon1));
            Assert.Equal(a.Epsilon2, b.Epsilon2, 1e-9 * Math.Max(1.0, Math.Abs(a.Epsilon2)));
        }
    }

    [Fact]
    public void OneFieldOnTheCovariantEquations_AgreesWithTheSingleFieldFastPath()
    {
        // The covariant equations of physics.md section 7 with n = 1, G = K, reduce to the section-2 equation: the pole
        // kinetic term run as a general one-field metric theory follows the single-field solution to the integration tolerance.
        var inner = new PoleTModel(1.0);
        var covariant = new MetricFieldTheory(new[] { "phi" }, p => inner.Potential(p[0]).Value,
            metric: (p, g) => g[0] = inner.Kinetic(p[0]).Value,
            gradient: (p, g) => g[0] = inner.Potential(p[0]).D1,
            metricDerivative: (p, d) => d[0] = inner.Kinetic(p[0]).D1,
            boundaries: new SingleFieldTheory(inner).Boundaries);
        var settings = new BackgroundSettings { Phi0 = 2.3, Tolerance = 1e-12, EFoldsAfterEnd = 0 };
        var single = BackgroundSolver.Solve(inner, settings);
        var field = FieldBackgroundSolver.Solve(covariant, settings);
        Assert.Equal(single.NEnd, field.NEnd, 1e-8);
        var phi = new double[1];
        var dphi = new double[1];
        for (double n = 0; n < single.NEnd; n += single.NEnd / 13)
        {
            var pt = field.At(n, phi, dphi);
            Assert.Equal(single.At(n).Phi, phi[0], 1e-9);
            Assert.Equal(single.At(n).Epsilon1, pt.Epsilon1, 1e-9);
        }
    }

    [Fact]
    public void EqualMasses_RadialStart_IsExactlySingleFieldQuadratic()
    {
        // physics.md section 7 oracle: V = m^2 (phi^2 + chi^2)/2 started radially (the attractor velocity is radial) stays on
        // the ray chi/phi = const and its radius follows the single-field quadratic from r0.
        var two = FieldBackgroundSolver.Solve(DoubleQuadratic(1, 1), Settings(new[] { 12.0, 9.0 }));
        var one = BackgroundSolver.Solve(new Quadratic(), new BackgroundSettings { Phi0 = 15.0, Tolerance = 1e-12, EFoldsAfterEnd = 0 });
        Assert.Equal(one.NEnd, two.NEnd, 1e-8);
        var phi = new double[2];
        var dphi = new double[2];
        for (double n = 0; n <= one.NEnd; n += one.NEnd / 17)
        {
            var pt = two.At(n, phi, dphi);
            Assert.Equal(0.75, phi[1] / phi[0], 1e-12);
            double r = Math.Sqrt(phi[0] * phi[0] + phi[1] * phi[1]);
            var s = one.At(n);
            Assert.Equal(s.Phi, r, 1e-9 * Math.Max(1, s.Phi));
            Assert.Equal(s.H, pt.H, 1e-9 * s.H);
            Assert.Equal(s.Epsilon1, pt.Epsilon1, 1e-9);
        }
    }

    [Fact]
    public void DoubleQuadratic_FollowsTheSlowRollTrajectory()
    {
        // Slow roll (physics.md section 7 with D_N phi' neglected): phi'^I = -V_I / V, so for V = m1^2 phi^2/2 + m2^2 chi^2/2
        // d ln phi / m1^2 = d ln chi / m2^2 = -dN / V: the invariant I = ln(phi)/m1^2 - ln(chi)/m2^2 is constant
        // (phi^(1/m1^2) / chi^(1/m2^2) = const), and d(phi^2 + chi^2)/dN = -4, i.e. N = sum_I (phi_I0^2 - phi_I^2)/4, the
        // sum-separable slow-roll e-fold count of Vernizzi & Wands 2006 (JCAP 05, 019, section 2; from memory). The exact
        // trajectory departs from these by slow-roll corrections of relative order epsilon_1 ~ 2/(phi^2 + chi^2) per e-fold.
        const double m1 = 1, m2 = 2;
        double[] start = { 13.0, 8.0 };
        var bg = FieldBackgroundSolver.Solve(DoubleQuadratic(m1, m2), Settings(start));
        double I(double[] p) => Math.Log(p[0]) / (m1 * m1) - Math.Log(p[1]) / (m2 * m2);
        var phi = new double[2];
        var dphi = new double[2];
        double i0 = I(start), r0sq = start[0] * start[0] + start[1] * start[1];
        double lastN = bg.NEnd - 10;
        double worstI = 0, worstN = 0;
        for (double n = 0; n <= lastN; n += 0.5)
        {
            var pt = bg.At(n, phi, dphi);
            worstI = Math.Max(worstI, Math.Abs(I(phi) - i0));
            worstN = Math.Max(worstN, Math.Abs((r0sq - phi[0] * phi[0] - phi[1] * phi[1]) / 4 - n));
            // The velocity is the slow-roll one to order epsilon_1.
            Assert.Equal(-m1 * m1 * phi[0] / (0.5 * m1 * m1 * phi[0] * phi[0] + 0.5 * m2 * m2 * phi[1] * phi[1]), dphi[0], 2 * pt.Epsilon1 * Math.Abs(dphi[0]));
        }
        // Integrated over ~N e-folds, the drift stays at the level of epsilon_1 at the last point checked (about 0.02 there).
        var last = bg.At(lastN, phi, dphi);
        Assert.True(worstI < last.Epsilon1, $"slow-roll invariant drifted by {worstI} (epsilon_1 = {last.Epsilon1})");
        // The e-fold count misses by the integral of the slow-roll corrections, order one e-fold over the run (measured 0.39 here).
        Assert.True(worstN < 1.0, $"slow-roll e-fold count off by {worstN} e-folds");
        // And the trajectory really bends: chi falls much faster than phi (chi/chi0 = (phi/phi0)^(m2^2/m1^2)).
        Assert.True(phi[1] / start[1] < 0.5 * phi[0] / start[0]);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void PolarFields_GiveTheCartesianTrajectory(bool closedForm)
    {
        // Coordinate invariance (physics.md section 7): on a flat field space the covariant equations in polar fields
        // (G = diag(1, r^2), Gamma^r_thth = -r, Gamma^th_r th = 1/r) give the Cartesian trajectory, the attractor start
        // -G^IJ V_J / V being a vector. The numerical-derivative form is held to its derivative accuracy.
        const double m1 = 1, m2 = 2.5;
        double x0 = 10, y0 = 6;
        var cart = FieldBackgroundSolver.Solve(DoubleQuadratic(m1, m2), Settings(new[] { x0, y0 }));
        var polar = FieldBackgroundSolver.Solve(PolarDoubleQuadratic(m1, m2, closedForm),
            Settings(new[] { Math.Sqrt(x0 * x0 + y0 * y0), Math.Atan2(y0, x0) }));
        double tol = closedForm ? 1e-8 : 1e-6;
        Assert.Equal(cart.NEnd, polar.NEnd, tol * cart.NEnd);
        var c = new double[2];
        var p = new double[2];
        var dc = new double[2];
        var dp = new double[2];
        for (double n = 0; n < cart.NEnd; n += cart.NEnd / 19)
        {
            var a = cart.At(n, c, dc);
            var b = polar.At(n, p, dp);
            Assert.Equal(c[0], p[0] * Math.Cos(p[1]), tol * 10);
            Assert.Equal(c[1], p[0] * Math.Sin(p[1]), tol * 10);
            Assert.Equal(a.H, b.H, tol * a.H);
            Assert.Equal(a.Epsilon1, b.Epsilon1, tol);
        }
    }

    [Fact]
    public void AttractorStart_IsMinusInverseMetricTimesGradientOverV()
    {
        // physics.md section 7: the default start velocity is -G^IJ V_J / V, here on the hyperbolic disk in (phi, theta).
        const double alpha = 1.0;
        double a = 1.5 * alpha, c = Math.Sqrt(2.0 / (3.0 * alpha));
        var disk = new MetricFieldTheory(new[] { "phi", "theta" },
            p => Math.Tanh(p[0] / Math.Sqrt(6)) * Math.Tanh(p[0] / Math.Sqrt(6)) * (1 + 0.1 * Math.Cos(p[1])),
            metric: (p, g) => { double s = Math.Sinh(c * p[0]); g[0] = 1; g[1] = 0; g[2] = 0; g[3] = a * s * s; });
        double[] start = { 6.0, 1.0 };
        var bg = FieldBackgroundSolver.Solve(disk, Settings(start, tol: 1e-10));
        var grad = new double[2];
        double v = disk.PotentialGradient(start, grad);
        var phi = new double[2];
        var dphi = new double[2];
        bg.At(0, phi, dphi);
        double s0 = Math.Sinh(c * start[0]);
        Assert.Equal(-grad[0] / v, dphi[0], 1e-15);
        Assert.Equal(-grad[1] / (a * s0 * s0) / v, dphi[1], 1e-15);
        Assert.True(bg.NTotal > 10);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void EndSurface_EndsInflationWhereItIsCrossed(bool coordinate)
    {
        var end = coordinate ? FieldSurface.Coordinate(1, 0.5) : FieldSurface.FromFunction("phi + chi = 9", p => p[0] + p[1] - 9);
        var bg = FieldBackgroundSolver.Solve(DoubleQuadratic(1, 2), Settings(new[] { 13.0, 8.0 }, end: end));
        Assert.True(bg.EndedAtSurface);
        var at = bg.FieldsAt(bg.NEnd);
        Assert.Equal(0.0, end.Value(at), 1e-9);
        Assert.True(bg.At(bg.NEnd, new double[2], new double[2]).Epsilon1 < 1);
    }

    /// <summary>G = diag(1, phi - 5): positive definite only for phi &gt; 5; chi = 0 stays 0, so the run reaches phi = 5 before its end.</summary>
    private static MetricFieldTheory DegeneratingMetric()
        => new(new[] { "phi", "chi" }, p => 0.5 * p[0] * p[0] + 0.5 * p[1] * p[1],
            metric: (p, g) => { g[0] = 1; g[1] = 0; g[2] = 0; g[3] = p[0] - 5; });

    [Fact]
    public void MetricThatStopsBeingPositiveDefinite_IsAOneLineErrorNamingTheFields()
    {
        var ex = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(DegeneratingMetric(), Settings(new[] { 8.0, 0.0 }, tol: 1e-10)));
        Assert.DoesNotContain('\n', ex.Message);
        Assert.Contains("not positive definite", ex.Message);
        Assert.Matches(@"\(phi, chi\) = \(4\.99|\(phi, chi\) = \(5[,.]", ex.Message);
    }

    [Fact]
    public void BadStarts_AreOneLineErrors()
    {
        var notPd = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(DegeneratingMetric(), Settings(new[] { 4.0, 0.0 })));
        Assert.Contains("not positive definite at the start, (phi, chi) = (4, 0)", notPd.Message);
        var count = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(DoubleQuadratic(1, 2), Settings(new[] { 13.0 })));
        Assert.Contains("1 field value(s) but the theory has 2 field(s) (phi, chi)", count.Message);
        var velocity = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(DoubleQuadratic(1, 2),
            new BackgroundSettings { Fields0 = new[] { 13.0, 8.0 }, Velocity0 = new[] { 0.0 } }));
        Assert.Contains("start velocity gives 1 value(s)", velocity.Message);
        var missing = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(DoubleQuadratic(1, 2), new BackgroundSettings()));
        Assert.Contains("needs the field values (phi, chi)", missing.Message);
        foreach (var e in new[] { notPd, count, velocity, missing }) Assert.DoesNotContain('\n', e.Message);
    }
    /// <summary>V = (phi^2 + chi^2)/2 + 0.5 max(0, s(phi, chi)): the slope changes on the surface s = 0.</summary>
    private static MetricFieldTheory KinkedQuadratic(FieldSurface kink)
        => new(new[] { "phi", "chi" }, p => 0.5 * (p[0] * p[0] + p[1] * p[1]) + 0.5 * Math.Max(0.0, kink.Value(p)),
            gradient: (p, g) =>
            {
                double sign = kink.Value(p) >= 0 ? 0.5 : 0.0;
                // ds/dphi = 1 and ds/dchi = 1 for both surfaces used below (phi - 10, and phi + chi - 17).
                g[0] = p[0] + sign;
                g[1] = p[1] + (kink.IsCoordinate ? 0 : sign);
            },
            nonSmooth: new[] { kink });

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void NonSmoothSurface_StopsAndRestartsOnIt(bool coordinate)
    {
        // The run stops on the kink surface and restarts there (a coordinate surface is snapped onto exactly,
        // a general one located to the tolerance); the velocity is continuous through it.
        var kink = coordinate ? FieldSurface.Coordinate(0, 10.0, name: "phi = 10") : FieldSurface.FromFunction("phi + chi = 17", p => p[0] + p[1] - 17);
        var bg = FieldBackgroundSolver.Solve(KinkedQuadratic(kink), Settings(new[] { 12.0, 9.0 }, tol: 1e-11));
        double nk = Assert.Single(bg.NonSmoothTimes);
        Assert.True(bg.SegmentCount >= 2);
        var at = bg.FieldsAt(nk);
        if (coordinate) Assert.Equal(10.0, at[0]);
        else Assert.True(Math.Abs(kink.Value(at)) < 1e-9, $"g = {kink.Value(at)} at the restart");
        var before = new double[2];
        var after = new double[2];
        bg.At(nk - 1e-7, new double[2], before);
        bg.At(nk + 1e-7, new double[2], after);
        Assert.Equal(before[0], after[0], 1e-8);
        Assert.Equal(before[1], after[1], 1e-8);
        Assert.True(bg.NEnd > nk);
    }

    [Fact]
    public void LeavingTheValidRegion_IsAOneLineError()
    {
        // The double quadratic with m2 = 2 m1 bends towards the phi axis (chi falls like phi^4) and crosses phi = 2 chi.
        var theory = new MetricFieldTheory(new[] { "phi", "chi" }, p => 0.5 * p[0] * p[0] + 2 * p[1] * p[1],
            boundaries: new[] { FieldSurface.FromFunction("phi - 2 chi = 0", p => p[0] - 2 * p[1], SurfaceCrossing.Rising) });
        var ex = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(theory, Settings(new[] { 10.0, 8.0 })));
        Assert.DoesNotContain('\n', ex.Message);
        Assert.Contains("left the theory's valid range", ex.Message);
        Assert.Contains("phi - 2 chi = 0", ex.Message);
        var outside = Assert.Throws<PhysicsException>(() => FieldBackgroundSolver.Solve(theory, Settings(new[] { 12.0, 3.0 })));
        Assert.Contains("outside the theory's valid region", outside.Message);
    }
}
