using ModeSolver.Background;
using ModeSolver.Estimates;
using ModeSolver.Models;
using ModeSolver.Numerics;
using ModeSolver.Physics;
using ModeSolver.Tests.Background;
using Xunit.Abstractions;

namespace ModeSolver.Tests.Estimates;

public class DeltaNTests(ITestOutputHelper output)
{
    private const double L1 = 0.1, L2 = 0.05;

    /// <summary>
    /// V = exp(-L1 sinh(psi) - L2 chi) on G = diag(cosh^2 psi, 1): the exponential potential exp(-lambda . x) of the flat
    /// fields x = (sinh psi, chi) in curvilinear coordinates. Its slow-roll attractor -G^IJ V_J / V is the exact power-law
    /// solution x' = lambda (Lucchin &amp; Matarrese 1985, Phys. Rev. D 32, 1316), and H^2 is proportional to exp(-lambda . x) on
    /// it, so from any start on the attractor N to the slice lambda . x = S is exactly (S - lambda . x0)/|lambda|^2: N_psi =
    /// -L1 cosh psi / |lambda|^2, N_chi = -L2 / |lambda|^2, d_psi d_psi N = -L1 sinh psi / |lambda|^2, the rest 0, and the
    /// covariant N_;IJ = 0 (N is linear in the flat fields). Inflation never ends; the surface lambda . x = end stops it.
    /// </summary>
    private static MetricFieldTheory CurvilinearExponential()
        => new(new[] { "psi", "chi" }, p => Math.Exp(-L1 * Math.Sinh(p[0]) - L2 * p[1]),
            metric: (p, g) => { double c = Math.Cosh(p[0]); g[0] = c * c; g[1] = 0; g[2] = 0; g[3] = 1; },
            gradient: (p, g) =>
            {
                double v = Math.Exp(-L1 * Math.Sinh(p[0]) - L2 * p[1]);
                g[0] = -L1 * Math.Cosh(p[0]) * v;
                g[1] = -L2 * v;
            },
            hessian: (p, h) =>
            {
                double v = Math.Exp(-L1 * Math.Sinh(p[0]) - L2 * p[1]), c = Math.Cosh(p[0]);
                h[0] = (L1 * L1 * c * c - L1 * Math.Sinh(p[0])) * v;
                h[1] = h[2] = L1 * L2 * c * v;
                h[3] = L2 * L2 * v;
            },
            metricDerivative: (p, d) => { d.Clear(); d[0] = Math.Sinh(2 * p[0]); },
            metricSecondDerivative: (p, d) => { d.Clear(); d[0] = 2 * Math.Cosh(2 * p[0]); },
            description: "exponential in curvilinear fields");

    [Fact]
    public void ErrorBars_BoundTheTrueErrorOfAnExactCase()
    {
        double lsq = L1 * L1 + L2 * L2;
        double[] start = { 0.5, 0.0 };
        double x0 = L1 * Math.Sinh(start[0]) + L2 * start[1];
        double end = x0 + 20 * lsq; // 20 e-folds on the attractor
        var settings = new BackgroundSettings
        {
            Fields0 = start, Tolerance = 1e-12, EFoldsAfterEnd = 0,
            EndSurface = FieldSurface.FromFunction("lambda . x = end", p => L1 * Math.Sinh(p[0]) + L2 * p[1] - end),
        };
        var theory = CurvilinearExponential();
        var bg = FieldBackgroundSolver.Solve(theory, settings);
        Assert.Equal(20.0, bg.NEnd, 1e-8);
        const double exitN = 2.0;
        var r = DeltaN.Compute(bg, settings, exitN, new DeltaNSettings { SliceOffset = -1 });
        var phi = bg.FieldsAt(exitN);
        double c = Math.Cosh(phi[0]), s = Math.Sinh(phi[0]);
        double[] ni = { -L1 * c / lsq, -L2 / lsq };
        double[] nij = { -L1 * s / lsq, 0, 0, 0 };
        Assert.Equal(17.0, r.NRemaining, 1e-8);
        for (int i = 0; i < 2; i++)
        {
            double err = Math.Abs(r.Gradient[i] - ni[i]);
            output.WriteLine($"N_{i}: {r.Gradient[i]:R} exact {ni[i]:R} error {err:E2} bar {r.GradientError[i]:E2}");
            Assert.True(err <= r.GradientError[i], $"N_{i} off by {err:E2}, bar {r.GradientError[i]:E2}");
            Assert.True(r.GradientError[i] < 1e-6 * Math.Abs(ni[i]), $"N_{i} bar {r.GradientError[i]:E2} is loose");
        }
        for (int k = 0; k < 4; k++)
        {
            double err = Math.Abs(r.CoordinateHessian[k] - nij[k]);
            double cov = Math.Abs(r.Hessian[k]);
            output.WriteLine($"N_,{k}: {r.CoordinateHessian[k]:R} exact {nij[k]:R} error {err:E2}; N_;{k} = {r.Hessian[k]:E2} bar {r.HessianError[k]:E2}");
            Assert.True(err <= r.HessianError[k], $"d d N [{k}] off by {err:E2}, bar {r.HessianError[k]:E2}");
            Assert.True(cov <= r.HessianError[k], $"N_;IJ [{k}] = {cov:E2} exceeds its bar {r.HessianError[k]:E2}");
            Assert.True(r.HessianError[k] < 1e-4 * (L1 * c / lsq), $"N_;IJ [{k}] bar {r.HessianError[k]:E2} is loose");
        }
        // f_NL is exactly 0 here (covariant N_;IJ = 0) and P_zeta is (H/2 pi)^2 |lambda|^-2 (G^IJ N_I N_J = 1/|lambda|^2).
        Assert.True(Math.Abs(r.FNL) <= r.FNLError, $"f_NL = {r.FNL:E2} beyond its bar {r.FNLError:E2}");
        double pz = r.H * r.H / (4 * Math.PI * Math.PI) / lsq;
        Assert.True(Math.Abs(r.Pzeta - pz) <= r.PzetaError, $"P_zeta off by {Math.Abs(r.Pzeta - pz) / pz:E2} relative, bar {r.PzetaError / pz:E2}");
        Assert.Equal(2 + 3 * (2 * 2 * 2), r.Backgrounds); // N(0) at two tolerances, 3 levels x 2 n^2
    }

    [Fact]
    public void SingleField_GivesTheSlowRollAmplitudeAtExit()
    {
        // Single field on its attractor: N(phi) = int dphi / (-phi'), so N_phi^2 = 1/phi'^2 = 1/(2 epsilon_1) and delta N's
        // P_zeta = (H/2 pi)^2 N_phi^2 is H^2/(8 pi^2 epsilon_1) with the exact epsilon_1 at exit (the slow-roll amplitude of
        // physics.md section 4 at k = aH, Stewart & Lyth 1993 at first order). With the default start velocity the remainder is
        // the slope error of the slow-roll velocity field, O(epsilon_1^2); the frozen background velocity (delta phi' = 0) misses
        // the attractor's slope dphi'/dphi = epsilon_1 (quadratic, slow roll) and changes N_phi by about epsilon_1/3.
        var settings = new BackgroundSettings { Phi0 = 16, Tolerance = 1e-12, EFoldsAfterEnd = 2 };
        var bg = FieldBackgroundSolver.Solve(new SingleFieldTheory(new Quadratic()), settings);
        double exitN = bg.NEnd - 55;
        var pt = bg.At(exitN, new double[1], new double[1]);
        double sr = pt.H * pt.H / (8 * Math.PI * Math.PI * pt.Epsilon1);
        var attractor = DeltaN.Compute(bg, settings, exitN);
        var frozen = DeltaN.Compute(bg, settings, exitN, new DeltaNSettings { Velocity = ExitVelocity.Background });
        var slowRoll = DeltaN.Compute(bg, settings, exitN, new DeltaNSettings { Velocity = ExitVelocity.SlowRoll });
        double e = pt.Epsilon1;
        double dA = attractor.Pzeta / sr - 1, dF = frozen.Pzeta / sr - 1, dS = slowRoll.Pzeta / sr - 1;
        output.WriteLine($"eps {e:E3}: attractor {dA:E3} (bar {attractor.PzetaError / sr:E2}), frozen {dF:E3}, slow roll {dS:E3}; f_NL {attractor.FNL:E4} +- {attractor.FNLError:E1}");
        Assert.True(Math.Abs(dA) < e * e, $"attractor start: P_zeta/P_SR - 1 = {dA:E3}, epsilon_1^2 = {e * e:E2}");
        Assert.True(Math.Abs(dS) < e * e, $"slow-roll start: P_zeta/P_SR - 1 = {dS:E3}");
        // Frozen velocity: the displaced universe starts off the attractor by epsilon_1 delta phi and drifts back, delta phi/3 of
        // extra displacement per unit slope (the off-attractor velocity decays like exp(-3N)): N_phi^2 lower by 2 epsilon_1/3.
        Assert.True(Math.Abs(dF + 2 * e / 3) < e * e, $"frozen velocity: P_zeta/P_SR - 1 = {dF:E3}, -2 epsilon_1/3 = {-2 * e / 3:E3}");
        // Single-field f_NL from delta N: (5/6) N_phiphi / N_phi^2, for the quadratic in slow roll (5/6)(1/2)/(phi^2/4) = 5/(3 phi^2)
        // (Lyth & Rodriguez 2005): slow-roll small, O(epsilon_1).
        double phiX = bg.FieldsAt(exitN)[0];
        Assert.Equal(5 / (3 * phiX * phiX), attractor.FNL, 2 * e * 5 / (3 * phiX * phiX));
    }

    /// <summary>
    /// The slow-roll delta N of Vernizzi &amp; Wands 2006 (JCAP 05, 019, section 3) for the sum-separable V = U(phi) + W(chi)
    /// with U = a phi^2/2, W = b chi^2/2: N = int_c^* U/U' dphi + int_c^* W/W' dchi = (phi*^2 + chi*^2 - phi_c^2 - chi_c^2)/4,
    /// the end point c on the uniform-density slice V = V_c and on the slow-roll trajectory through the start, which keeps
    /// C = int dphi/U' - int dchi/W' = ln(phi)/a - ln(chi)/b fixed.
    /// </summary>
    private sealed class SumSeparableQuadratic(double a, double b, double vc)
    {
        public (double Phi, double Chi) End(double phi, double chi)
        {
            double c = Math.Log(phi) / a - Math.Log(chi) / b;
            double ChiOf(double x) => Math.Exp(b * (Math.Log(x) / a - c));
            double G(double x) { double y = ChiOf(x); return 0.5 * a * x * x + 0.5 * b * y * y - vc; }
            double x = Roots.Brent(G, 1e-8, phi, G(1e-8), G(phi), 1e-15);
            return (x, ChiOf(x));
        }

        public double N(double phi, double chi)
        {
            var (pc, cc) = End(phi, chi);
            return (phi * phi + chi * chi - pc * pc - cc * cc) / 4;
        }

        /// <summary>Vernizzi &amp; Wands's closed form N_phi = (U* + Z_c)/U'*, N_chi = (W* - Z_c)/W'*, Z_c = (W_c eps_phi - U_c eps_chi)/eps at c.</summary>
        public (double Nphi, double Nchi) Gradient(double phi, double chi)
        {
            var (pc, cc) = End(phi, chi);
            double up = a * pc, wp = b * cc;
            double z = (0.5 * b * cc * cc * up * up - 0.5 * a * pc * pc * wp * wp) / (up * up + wp * wp);
            return ((0.5 * a * phi * phi + z) / (a * phi), (0.5 * b * chi * chi - z) / (b * chi));
        }

        /// <summary>N_I and N_IJ by Richardson-extrapolated central differences of the closed-form N (smooth to round-off).</summary>
        public (double[] Ni, double[] Nij) Derivatives(double phi, double chi)
        {
            double[] x = { phi, chi };
            double F(double dx, double dy) => N(x[0] + dx, x[1] + dy);
            double[] ni = new double[2], nij = new double[4];
            double D1(int i, double h) => (i == 0 ? F(h, 0) - F(-h, 0) : F(0, h) - F(0, -h)) / (2 * h);
            double D2(int i, double h) => (i == 0 ? F(h, 0) - 2 * F(0, 0) + F(-h, 0) : F(0, h) - 2 * F(0, 0) + F(0, -h)) / (h * h);
            double Dm(double h) => (F(h, h) - F(h, -h) - F(-h, h) + F(-h, -h)) / (4 * h * h);
            const double h0 = 1e-2;
            for (int i = 0; i < 2; i++)
            {
                ni[i] = (4 * D1(i, h0 / 2) - D1(i, h0)) / 3;
                nij[3 * i] = (4 * D2(i, h0 / 2) - D2(i, h0)) / 3;
            }
            nij[1] = nij[2] = (4 * Dm(h0 / 2) - Dm(h0)) / 3;
            return (ni, nij);
        }
    }

    [Theory]
    [InlineData(2.0, 13.0, 8.0)]
    [InlineData(4.0, 14.0, 6.0)]
    public void DoubleQuadratic_AgreesWithTheSlowRollDeltaNOfVernizziWands(double massRatio, double phi0, double chi0)
    {
        var theory = FieldBackgroundTests.DoubleQuadratic(1, massRatio);
        var settings = new BackgroundSettings { Fields0 = new[] { phi0, chi0 }, Tolerance = 1e-12, EFoldsAfterEnd = 2 };
        var bg = FieldBackgroundSolver.Solve(theory, settings);
        const double exitN = 2.0;
        var r = DeltaN.Compute(bg, settings, exitN);
        var x = bg.FieldsAt(exitN);
        double hEnd = bg.At(bg.NEnd, new double[2], new double[2]).H;
        var oracle = new SumSeparableQuadratic(1, massRatio * massRatio, 3 * hEnd * hEnd);
        var (ni, nij) = oracle.Derivatives(x[0], x[1]);
        var (vw0, vw1) = oracle.Gradient(x[0], x[1]);
        double e = r.Epsilon1;
        double pzSr = r.H * r.H / (4 * Math.PI * Math.PI) * (ni[0] * ni[0] + ni[1] * ni[1]);
        double fSr = 5.0 / 6 * (ni[0] * ni[0] * nij[0] + 2 * ni[0] * ni[1] * nij[1] + ni[1] * ni[1] * nij[3]) / Math.Pow(ni[0] * ni[0] + ni[1] * ni[1], 2);
        output.WriteLine($"eps {e:E3} fields ({x[0]:F3}, {x[1]:F3}); N_I {r.Gradient[0]:F6} {r.Gradient[1]:F6} vs SR {ni[0]:F6} {ni[1]:F6} (closed form {vw0:F6} {vw1:F6})");
        output.WriteLine($"N_IJ {r.Hessian[0]:F6} {r.Hessian[1]:F6} {r.Hessian[3]:F6} vs SR {nij[0]:F6} {nij[1]:F6} {nij[3]:F6}");
        output.WriteLine($"P_zeta/P_SR - 1 = {r.Pzeta / pzSr - 1:E3} (bar {r.PzetaError / pzSr:E1}); f_NL {r.FNL:E4} +- {r.FNLError:E1} vs SR {fSr:E4}: {r.FNL / fSr - 1:E3}");
        // The oracle's finite differences reproduce Vernizzi & Wands's closed form (the end-point term Z_c included).
        Assert.Equal(ni[0], vw0, 1e-8 * Math.Abs(ni[0]));
        Assert.Equal(ni[1], vw1, 1e-8 * Math.Abs(ni[1]));
        // The slow-roll delta N is first order in slow roll at exit: its N_I, N_IJ and so P_zeta and f_NL carry relative errors
        // of order epsilon_1 at exit (Vernizzi & Wands 2006, section 3: the slow-roll trajectory and the neglected velocity);
        // measured 0.4-0.6 epsilon_1 for P_zeta, 0.25-0.65 epsilon_1 for f_NL in these two cases. The exact bars are far below.
        Assert.True(Math.Abs(r.Pzeta / pzSr - 1) < e, $"P_zeta/P_zeta^SR - 1 = {r.Pzeta / pzSr - 1:E3}, epsilon_1 = {e:E3}");
        Assert.True(Math.Abs(r.FNL / fSr - 1) < e, $"f_NL/f_NL^SR - 1 = {r.FNL / fSr - 1:E3}, epsilon_1 = {e:E3}");
        Assert.True(r.PzetaError < 1e-3 * e * r.Pzeta && r.FNLError < 1e-3 * e * Math.Abs(r.FNL));
        // Both fields matter at exit: the start is not a single-field case.
        Assert.True(Math.Abs(r.Gradient[1]) > 0.3 * Math.Abs(r.Gradient[0]));
    }

    [Theory]
    [InlineData(ExitVelocity.SlowRoll)]
    [InlineData(ExitVelocity.Attractor)]
    public void CartesianAndPolarFields_GiveTheSameDeltaN(ExitVelocity velocity)
    {
        // Coordinate invariance (physics.md section 7): P_zeta = (H/2 pi)^2 G^IJ N_I N_J and f_NL with the covariant N_;IJ are
        // scalars, so the double quadratic in polar fields (Gamma^r_thth = -r, Gamma^th_rth = 1/r) gives the Cartesian values.
        // The slow-roll start velocity is a vector field, so the two agree to their error bars; the default start adds the
        // exit correction (exact minus slow-roll velocity, O(epsilon^2)) parallel-transported to first order in the step, so
        // its remaining chart dependence (second order in the step times epsilon^2) lies below the bars too.
        const double m1 = 1, m2 = 2.5;
        double x0 = 10, y0 = 6;
        var cs = new BackgroundSettings { Fields0 = new[] { x0, y0 }, Tolerance = 1e-12, EFoldsAfterEnd = 2 };
        var ps = cs with { Fields0 = new[] { Math.Sqrt(x0 * x0 + y0 * y0), Math.Atan2(y0, x0) } };
        // Half an e-fold before the end: the polar chart is singular at r = 0, which the oscillations after the end cross.
        var opts = new DeltaNSettings { Velocity = velocity, SliceOffset = -0.5 };
        var cart = DeltaN.Compute(FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(m1, m2), cs), cs, 1.0, opts);
        var polar = DeltaN.Compute(FieldBackgroundSolver.Solve(FieldBackgroundTests.PolarDoubleQuadratic(m1, m2, closedForm: true), ps), ps, 1.0, opts);
        double dp = Math.Abs(cart.Pzeta - polar.Pzeta), df = Math.Abs(cart.FNL - polar.FNL);
        output.WriteLine($"{velocity}: P {cart.Pzeta:E10} vs {polar.Pzeta:E10} (diff {dp / cart.Pzeta:E2}, bars {cart.PzetaError / cart.Pzeta:E1} {polar.PzetaError / cart.Pzeta:E1}); f_NL {cart.FNL:E6} vs {polar.FNL:E6} (diff {df:E2}, bars {cart.FNLError:E1} {polar.FNLError:E1})");
        Assert.True(dp <= cart.PzetaError + polar.PzetaError, $"P_zeta differs by {dp / cart.Pzeta:E2} relative");
        Assert.True(df <= cart.FNLError + polar.FNLError, $"f_NL differs by {df:E2}");
        Assert.True(Math.Abs(cart.FNL) > 1e-3);
    }

    [Fact]
    public void EndOfInflationSlice_AgreesWithTheUniformDensitySliceOnceTheFlowIsAdiabatic()
    {
        // With the heavy field settled by the end (double quadratic, m_chi = 2 m_phi) every universe ends on the same single-field
        // attractor, so its own epsilon_1 = 1 crossing is a uniform-density slice up to exp(-3 N)-suppressed isocurvature:
        // the two slices give the same N_I (delta N is slice-independent once the perturbation is adiabatic).
        var settings = new BackgroundSettings { Fields0 = new[] { 13.0, 8.0 }, Tolerance = 1e-12, EFoldsAfterEnd = 2 };
        var bg = FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(1, 2), settings);
        var uniform = DeltaN.Compute(bg, settings, 2.0);
        var own = DeltaN.Compute(bg, settings, 2.0, new DeltaNSettings { Slice = DeltaNSlice.EndOfInflation });
        Assert.True(double.IsNaN(own.SliceH));
        Assert.Equal(uniform.Pzeta, own.Pzeta, 1e-6 * uniform.Pzeta);
        Assert.Equal(uniform.FNL, own.FNL, 1e-4 * Math.Abs(uniform.FNL));
    }

    [Fact]
    public void BadRequests_AreOneLineErrors()
    {
        var settings = new BackgroundSettings { Fields0 = new[] { 13.0, 8.0 }, Tolerance = 1e-10, EFoldsAfterEnd = 0 };
        var bg = FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(1, 2), settings);
        var late = Assert.Throws<PhysicsException>(() => DeltaN.Compute(bg, settings, bg.NEnd + 1));
        Assert.Contains("lies outside inflation", late.Message);
        var slice = Assert.Throws<PhysicsException>(() => DeltaN.Compute(bg, settings, 2, new DeltaNSettings { SliceOffset = 3 }));
        Assert.Contains("not between the exit", slice.Message);
        var step = Assert.Throws<ArgumentException>(() => DeltaN.Compute(bg, settings, 2, new DeltaNSettings { Step = 0 }));
        Assert.Contains("Step must lie in (0, 1]", step.Message);
        foreach (var e in new Exception[] { late, slice, step }) Assert.DoesNotContain('\n', e.Message);
    }

    [Fact]
    public void ThreeEqualMasses_StartedRadially_GiveTheSingleFieldDeltaN()
    {
        // physics.md section 7 oracle: equal masses started radially are exactly the single-field quadratic in the radius, so
        // N depends on the radius only: G^IJ N_I N_J = N_r^2 and f_NL equal the one-field values at the same radius (three
        // fields exercise every mixed second difference and the n > 2 turn rate, which is 0 on the ray).
        var three = new MetricFieldTheory(new[] { "a", "b", "c" }, p => 0.5 * (p[0] * p[0] + p[1] * p[1] + p[2] * p[2]),
            gradient: (p, g) => { g[0] = p[0]; g[1] = p[1]; g[2] = p[2]; });
        double[] start = { 10.0, 8.0, 6.0 };
        double r0 = Math.Sqrt(200.0);
        var s3 = new BackgroundSettings { Fields0 = start, Tolerance = 1e-12, EFoldsAfterEnd = 2 };
        var s1 = new BackgroundSettings { Phi0 = r0, Tolerance = 1e-12, EFoldsAfterEnd = 2 };
        var b3 = FieldBackgroundSolver.Solve(three, s3);
        var b1 = FieldBackgroundSolver.Solve(new SingleFieldTheory(new Quadratic()), s1);
        var d3 = DeltaN.Compute(b3, s3, 5.0);
        var d1 = DeltaN.Compute(b1, s1, 5.0);
        Assert.Equal(d1.Pzeta, d3.Pzeta, 1e-7 * d1.Pzeta + d1.PzetaError + d3.PzetaError);
        Assert.Equal(d1.FNL, d3.FNL, 1e-6 * Math.Abs(d1.FNL) + d1.FNLError + d3.FNLError);
        // N_I points along the ray: N_I = N_r phi^I / r.
        var x = b3.FieldsAt(5.0);
        double r = Math.Sqrt(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]);
        for (int i = 0; i < 3; i++) Assert.Equal(d1.Gradient[0] * x[i] / r, d3.Gradient[i], 1e-7 * Math.Abs(d1.Gradient[0]));
        Assert.True(new ModeSolver.Trajectories.TrajectoryKinematics(three).At(b3, 5.0).TurnRate < 1e-12);
        Assert.Equal(2 + 3 * 2 * 9, d3.Backgrounds);
    }

    [Fact]
    public void RunStage_CountsToTheEndSurfaceWhenInflationEndsOnOne()
    {
        // The exponential of the exact case ends only on its surface lambda . x = end, which is also a uniform-density
        // surface on the attractor: the run's delta N counts to each universe's end there and keeps the exact N_I.
        double lsq = L1 * L1 + L2 * L2;
        double[] start = { 0.5, 0.0 };
        double end = L1 * Math.Sinh(start[0]) + 20 * lsq;
        var settings = new BackgroundSettings
        {
            Fields0 = start, Tolerance = 1e-12, EFoldsAfterEnd = 0,
            EndSurface = FieldSurface.FromFunction("lambda . x = end", p => L1 * Math.Sinh(p[0]) + L2 * p[1] - end),
        };
        var bg = FieldBackgroundSolver.Solve(CurvilinearExponential(), settings);
        var (m, _) = ModeSolver.Runs.MultiFieldStage.Compute(bg, settings, origin: 0, nPivot: 2.0, vScale: 1, windowStart: 1.0,
            modesPzeta: double.NaN, modesPzetaError: 0, kPivot: 0.05);
        var d = Assert.IsType<ModeSolver.Results.DeltaNPivot>(m.DeltaN);
        Assert.Equal(DeltaNSlice.EndOfInflation, d.Raw.Slice);
        double c = Math.Cosh(bg.FieldsAt(2.0)[0]);
        Assert.Equal(-L1 * c / lsq, d.Gradient[0], d.Raw.GradientError[0] + 1e-9);
        Assert.Equal(18.0, d.Raw.NRemaining, 1e-8);
    }
}
