using System.Numerics;
using MathNet.Numerics;
using ModeSolver.Integrators;
using ModeSolver.Perturbations;

namespace ModeSolver.Tests.Perturbations;

/// <summary>The oscillatory-regime propagator (deep starts) against exact power-law modes and reference Bessel functions.</summary>
public class OscillatoryRegimeTests
{
    private static (double Ps, double Pt) LythStewart(PowerLawBackground bg, double k) => ModeTests.LythStewart(bg, k);

    [Theory]
    [InlineData(0.5)]
    [InlineData(0.52)]
    [InlineData(0.7)]
    [InlineData(1.3)]
    [InlineData(1.5)]
    [InlineData(1.52)]
    [InlineData(2.2)]
    public void ModulusPhaseSeriesMatchSteedsMethod(double order)
    {
        // J = M cos(theta), Y = M sin(theta) (Abramowitz & Stegun 9.2.17); reference J, Y from Steed's method
        // (Barnett et al. 1974), itself checked against AMOS in tests/ModeSolver.Tests/Speed.
        foreach (double x in new[] { 30.0, 55.5, 200.0 })
        {
            var (m, s, trunc) = BesselModulusPhase.Evaluate(order, Jet2.Constant(x));
            double mod = Math.Sqrt(2 / (Math.PI * x) * (1 + m.C0));
            double theta = x - (order / 2 + 0.25) * Math.PI + s.C0;
            Assert.True(RealHankel.TryBesselJY(order, x, out double j, out double y, out _, out _));
            double tol = 2e-13 + 2e-16 * x + 10 * trunc; // cos and sin of theta ~ X lose X ulp
            Assert.True(Math.Abs(mod * Math.Cos(theta) - j) < tol * mod, $"J_{order}({x}): {mod * Math.Cos(theta) - j:E2}");
            Assert.True(Math.Abs(mod * Math.Sin(theta) - y) < tol * mod, $"Y_{order}({x}): {mod * Math.Sin(theta) - y:E2}");
        }
    }

    [Theory]
    [InlineData(10.0)]
    [InlineData(100.0)]
    [InlineData(1000.0)]
    [InlineData(1e4)]
    public void PowerLawSpectraFromDeepStartsMatchLythStewart(double depth)
    {
        // Lyth & Stewart 1992, physics.md 4a: P_s, P_t exact; n_s - 1 = n_t = 3 - 2 nu; alpha_s = 0.
        var bg = new PowerLawBackground(0.2, 1e-5, 70);
        var mi = new ModeIntegrator { UseOscillatoryRegime = true };
        var s = new ModeSettings { Tolerance = 1e-6, StartDepth = depth, Derivatives = depth <= 1000 };
        foreach (double lnk in new[] { 20.0, 24.5 })
        {
            double k = 1e-5 * Math.Exp(lnk);
            var m = mi.Solve(bg, k, s);
            var (ps, pt) = LythStewart(bg, k);
            Assert.True(Math.Abs(m.Ps / ps - 1) < 1e-6, $"depth {depth}: P_s off by {m.Ps / ps - 1:E2}");
            Assert.True(Math.Abs(m.Pt / pt - 1) < 1e-6, $"depth {depth}: P_t off by {m.Pt / pt - 1:E2}");
            // k-derivatives: the initial data's derivative blocks (finite differences along the start path) lose
            // alpha_s beyond depth ~300 and n_s beyond ~1e3 whatever the integrator (Runge-Kutta alone does worse).
            if (depth <= 1000)
            {
                Assert.Equal(3 - 2 * bg.Nu, m.NsMinusOne, 1e-6);
                Assert.Equal(3 - 2 * bg.Nu, m.Nt, 1e-6);
            }
            if (depth <= 100) Assert.Equal(0.0, m.AlphaS, 1e-5);
            Assert.True(m.ErrorEstimate < 1e-5, $"depth {depth}: error estimate {m.ErrorEstimate:E2}");
        }
    }

    [Theory]
    [InlineData(1e4, 300.0)]
    [InlineData(1e4, 40.0)]
    [InlineData(1e3, 100.0)]
    public void DeepModeMidEvolutionMatchesHankelFunction(double depth, double xTarget)
    {
        // Exact power-law mode (physics.md 4a): v = (sqrt(pi)/2) exp(i (nu + 1/2) pi/2) sqrt(-tau) H^(1)_nu(-k tau),
        // zeta = v / (a sqrt(2 e1)); the reference Hankel function from MathNet.Numerics (AMOS).
        var bg = new PowerLawBackground(0.2, 1e-5, 70);
        double k = 1e-5 * Math.Exp(22);
        double e1 = bg.Epsilon1;
        double n = bg.CrossingN(k) - Math.Log(xTarget) / (1 - e1);
        var snap = new ModeIntegrator { UseOscillatoryRegime = true }.EvolveTo(bg, k, n, new ModeSettings { Tolerance = 1e-7, StartDepth = depth, Derivatives = false });
        var p = bg.At(n);
        double a = Math.Exp(n), minusTau = 1 / ((1 - e1) * a * p.H);
        Complex pref = Complex.FromPolarCoordinates(0.5 * Math.Sqrt(Math.PI) * Math.Sqrt(minusTau), (bg.Nu + 0.5) * Math.PI / 2);
        Complex v = pref * SpecialFunctions.HankelH1(bg.Nu, new Complex(k * minusTau, 0));
        Complex zeta = v / (a * Math.Sqrt(2 * e1));
        Assert.True((snap.Zeta / zeta - 1).Magnitude < 1e-6, $"zeta at k/aH = {xTarget}: {(snap.Zeta / zeta - 1).Magnitude:E2}");
        Assert.True((snap.H / (2 * v / a) - 1).Magnitude < 1e-6, $"h at k/aH = {xTarget}: {(snap.H / (2 * v / a) - 1).Magnitude:E2}");
    }

    [Fact]
    public void WorkPerModeGrowsLogarithmicallyWithStartDepth()
    {
        // Deterministic work counts (not timings): with the propagator a decade of start depth costs a bounded number of
        // right-hand sides; Runge-Kutta alone pays for every oscillation (about proportional to the depth).
        var bg = new PowerLawBackground(0.2, 1e-5, 70);
        double k = 1e-5 * Math.Exp(22);
        int Rhs(double depth, bool deep) =>
            new ModeIntegrator { UseOscillatoryRegime = deep }.Solve(bg, k, new ModeSettings { Tolerance = 1e-6, StartDepth = depth, Derivatives = false }).RhsEvaluations;
        int r100 = Rhs(100, true), r1000 = Rhs(1000, true), r10000 = Rhs(1e4, true);
        int rk1000 = Rhs(1000, false);
        Assert.True(r10000 - r1000 <= 100 && r1000 - r100 <= 100, $"propagator: {r100}, {r1000}, {r10000} right-hand sides at depths 1e2, 1e3, 1e4");
        Assert.True(rk1000 > 5 * r1000, $"Runge-Kutta alone at depth 1e3: {rk1000}, propagator: {r1000}");
    }
}
