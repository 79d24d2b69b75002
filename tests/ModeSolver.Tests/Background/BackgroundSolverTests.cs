using ModeSolver.Background;
using ModeSolver.Physics;

namespace ModeSolver.Tests.Background;

public class BackgroundSolverTests
{
    internal static BackgroundSolution Solve(ModeSolver.Models.IInflatonTheory theory, double phi0, double? dphi0 = null,
        double tol = 1e-10, double? phiEnd = null, double after = 2, double maxEFolds = 5000)
        => BackgroundSolver.Solve(theory, new BackgroundSettings
        {
            Phi0 = phi0, DPhi0 = dphi0, Tolerance = tol, PhiEnd = phiEnd, EFoldsAfterEnd = after, MaxEFolds = maxEFolds,
        });

    [Fact]
    public void PowerLaw_AttractorHasConstantEpsilon1AndZeroEpsilon2()
    {
        // Lucchin & Matarrese 1985 (Phys. Rev. D 32, 1316), physics.md 4a: on the attractor phi' = lambda,
        // e1 = lambda^2/2 exactly and e2 = 0.
        const double lambda = 0.3;
        var bg = Solve(new Exponential(lambda), 0.0, phiEnd: 15, tol: 1e-12);
        Assert.True(bg.EndedAtPhiEnd);
        Assert.Equal(15.0 / lambda, bg.NEnd, 1e-6);
        for (double n = 0; n <= bg.NEnd; n += bg.NEnd / 17)
        {
            var p = bg.At(n);
            Assert.Equal(lambda * lambda / 2, p.Epsilon1, 1e-10);
            Assert.True(Math.Abs(p.Epsilon2) < 1e-10, $"e2 = {p.Epsilon2} at N = {n}");
            Assert.Equal(lambda * n, p.Phi, 1e-8);
        }
    }

    [Fact]
    public void PowerLaw_OffAttractorStartConverges()
    {
        // Lucchin & Matarrese 1985: the power-law solution is the attractor; phi' - lambda decays like exp(-(3 - e1) N).
        const double lambda = 0.3;
        var bg = Solve(new Exponential(lambda), 0.0, dphi0: 0.5 * lambda, phiEnd: 6);
        var p = bg.At(10);
        Assert.Equal(lambda * lambda / 2, p.Epsilon1, 1e-10);
        Assert.True(Math.Abs(bg.At(1).DPhi - lambda) > 1e-3); // it did start off the attractor
    }

    [Fact]
    public void Quadratic_EndOfInflationConvergesAndDiffersFromSlowRollEstimate()
    {
        // m^2 phi^2 / 2: the slow-roll estimate is phi_end = sqrt(2) (epsilon_V = 2/phi^2 = 1); the exact
        // epsilon_1 = 1 happens later, near phi ~ 1 (from memory). Converged value found here: phi_end = 1.0093427015 (tolerances 1e-12 and 1e-13 agree to 3e-12).
        var a = Solve(new Quadratic(), 16.0, tol: 1e-10);
        var b = Solve(new Quadratic(), 16.0, tol: 1e-12);
        double phiA = a.At(a.NEnd).Phi, phiB = b.At(b.NEnd).Phi;
        Assert.Equal(phiB, phiA, 1e-8);
        Assert.Equal(1.0, a.At(a.NEnd).Epsilon1, 1e-9);
        Assert.Equal(QuadraticPhiEnd, phiB, 1e-9);
        Assert.True(Math.Sqrt(2) - phiB > 0.3, "exact end lies well below the slow-roll estimate");
        // Slow roll: N_total = (phi0^2 - phi_end^2)/4 to within about an e-fold.
        Assert.InRange(a.NTotal, (256 - 2) / 4.0 - 1.5, (256 - 2) / 4.0 + 1.5);
    }

    /// <summary>Converged phi at epsilon_1 = 1 for V = m^2 phi^2/2 (this solver, tolerances 1e-10 and 1e-12 agree to 1e-8).</summary>
    internal const double QuadraticPhiEnd = 1.0093427015;

    [Fact]
    public void HubbleFlowParametersMatchDifferencesOfTheDenseOutput()
    {
        // Definition check (physics.md section 2): e2 = d ln e1/dN and e3 = d ln|e2|/dN, computed analytically, must agree with
        // central differences of the dense output (canonical quadratic and the non-canonical pole kinetic term).
        foreach (var bg in new[] { Solve(new Quadratic(), 16.0, tol: 1e-12), Solve(new PoleTModel(1.0), 2.44, tol: 1e-12) })
        {
            foreach (double back in new[] { 50.0, 20.0, 3.0, 0.5 })
            {
                double n = bg.NEnd - back;
                if (n < 1) continue;
                var p = bg.At(n);
                double e2Fd = Derivative(x => Math.Log(bg.At(x).Epsilon1), n);
                double e3Fd = Derivative(x => Math.Log(Math.Abs(bg.At(x).Epsilon2)), n);
                double e1Fd = -Derivative(x => Math.Log(bg.At(x).H), n); // H from the constraint: e1 = -d ln H / dN
                Assert.True(Math.Abs(p.Epsilon1 - e1Fd) < 1e-8 * Math.Abs(p.Epsilon1), $"e1 {p.Epsilon1} vs {e1Fd}");
                Assert.True(Math.Abs(p.Epsilon2 - e2Fd) < 1e-7 * Math.Abs(p.Epsilon2), $"e2 {p.Epsilon2} vs {e2Fd} at N_end - {back}");
                Assert.True(Math.Abs(p.Epsilon3 - e3Fd) < 1e-6 * Math.Abs(p.Epsilon3), $"e3 {p.Epsilon3} vs {e3Fd} at N_end - {back}");
            }
        }
    }

    /// <summary>Central difference with one Richardson step (error O(h^4)).</summary>
    private static double Derivative(Func<double, double> f, double x)
    {
        const double h = 2e-3;
        double d1 = (f(x + h) - f(x - h)) / (2 * h);
        double d2 = (f(x + h / 2) - f(x - h / 2)) / h;
        return (4 * d2 - d1) / 3;
    }

    [Fact]
    public void PoleKineticTermMatchesTheCanonicalTModel()
    {
        // Kallosh, Linde & Roest 2013 (physics.md section 1): K = (1 - phi^2/(6 alpha))^-2 with V = phi^2/(6 alpha) is the
        // T-model in chi, phi = sqrt(6 alpha) tanh(chi / sqrt(6 alpha)). Same e1(N) and mapped field.
        const double alpha = 1.0;
        double c = Math.Sqrt(6 * alpha);
        double chi0 = 6.0;
        var canon = Solve(new TModel(alpha), chi0, tol: 1e-12, after: 0);
        var pole = Solve(new PoleTModel(alpha), c * Math.Tanh(chi0 / c), tol: 1e-12, after: 0);
        Assert.Equal(canon.NEnd, pole.NEnd, 1e-6);
        foreach (double n in new[] { 1.0, 10.0, canon.NEnd - 40, canon.NEnd - 5, canon.NEnd - 0.5 })
        {
            var a = canon.At(n);
            var b = pole.At(n);
            Assert.Equal(c * Math.Tanh(a.Phi / c), b.Phi, 1e-8);
            Assert.Equal(a.Epsilon1, b.Epsilon1, 1e-9);
            Assert.Equal(a.Epsilon2, b.Epsilon2, 1e-7);
            Assert.Equal(1.0, b.H / a.H, 1e-8);
        }
    }

    [Fact]
    public void KineticStartReachesTheAttractorAndShapeIsScaleFree()
    {
        // physics.md section 2: a poor start decays onto the attractor within a few e-folds; phi(N) does not depend on the
        // scale of V while H scales with its square root.
        var kinetic = Solve(new Quadratic(), 18.0, dphi0: -2.3, after: 0);
        Assert.True(kinetic.At(0).Epsilon1 > 2.6);
        Assert.Contains(kinetic.EndCrossings, n => n < 2); // the fall of e1 through 1 at the start
        var attractor = Solve(new Quadratic(), 17.0, after: 0);
        // The deviation from the attractor decays like exp(-3N) from an initial relative size ~ 20: ~2e-5 at N = 5, ~3e-9 at N = 8.
        foreach (var (nK, rel) in new[] { (5.0, 1e-4), (8.0, 1e-7) })
        {
            double nMatch = attractor.NAtPhi(kinetic.At(nK).Phi);
            Assert.Equal(attractor.At(nMatch).DPhi, kinetic.At(nK).DPhi, rel * Math.Abs(kinetic.At(nK).DPhi));
        }

        var small = Solve(new Quadratic(1e-10), 18.0, dphi0: -2.3, after: 0);
        Assert.Equal(kinetic.NEnd, small.NEnd, 1e-8);
        foreach (double n in new[] { 0.3, 3.0, 30.0, kinetic.NEnd - 1 })
        {
            Assert.Equal(kinetic.At(n).Phi, small.At(n).Phi, 1e-8);
            Assert.Equal(kinetic.At(n).Epsilon1, small.At(n).Epsilon1, 1e-9);
            Assert.Equal(1e5, kinetic.At(n).H / small.At(n).H, 1e-4);
        }
        // WithVScale is the same rescaling.
        var view = kinetic.WithVScale(1e-10);
        Assert.Equal(small.At(30).H, view.At(30).H, 1e-9 * small.At(30).H);
    }

    [Fact]
    public void LinearKink_StopsAndRestartsExactlyAtTheKink()
    {
        // Starobinsky 1992 (physics.md 4b): V_phi jumps at phi0; the integration stops and restarts exactly there.
        var theory = new LinearKink(1.0, 2e-3, 2e-4, 0.0);
        var bg = Solve(theory, 0.1, phiEnd: -0.02);
        Assert.Single(bg.NonSmoothTimes);
        double nk = bg.NonSmoothTimes[0];
        Assert.True(Math.Abs(bg.At(nk).Phi) < 1e-12, $"phi at the kink = {bg.At(nk).Phi}");
        Assert.True(bg.SegmentCount >= 2);
        // phi' is continuous through the kink, phi'' is not: just before, the field rolls at ~ -A_plus/V0.
        var before = bg.At(nk - 1e-7);
        var after = bg.At(nk + 1e-7);
        Assert.Equal(before.DPhi, after.DPhi, 1e-9);
        Assert.Equal(-2e-3, before.DPhi, 2e-5);
        // Long after the kink it rolls at ~ -A_minus/V0.
        Assert.Equal(-2e-4, bg.At(nk + 10).DPhi, 2e-6);
    }

    [Fact]
    public void HorizonExitAndKRange()
    {
        var bg = Solve(new Quadratic(), 16.0).WithVScale(1e-10);
        double n = bg.NEnd - 50;
        double k = Math.Exp(n) * bg.At(n).H;
        Assert.Equal(n, bg.NAtHorizonExit(k), 1e-10);
        Assert.Equal(n, HorizonExit.Find(new Wrapped(bg), k), 1e-9);
        var (kMin, kMax) = bg.KRange(100, 1e-3);
        Assert.Equal(100 * bg.At(0).H, kMin, 1e-9 * kMin);
        Assert.Equal(1e-3 * Math.Exp(bg.NEnd) * bg.At(bg.NEnd).H, kMax, 1e-9 * kMax);
        Assert.False(bg.TryNAtHorizonExit(kMax * 1e4, out _));
        Assert.Throws<PhysicsException>(() => bg.NAtHorizonExit(bg.At(0).H * 0.5));
        Assert.Equal(bg.NEnd - 50, bg.NAtPhi(bg.At(bg.NEnd - 50).Phi), 1e-9);
        Assert.Equal(bg.VScale * 0.5 * Math.Pow(bg.At(3).Phi, 2), bg.V(3), 1e-20);
    }

    [Fact]
    public void DenseOutputAndHorizonExitDoNotAllocate()
    {
        // The mode solver calls At(N) thousands of times per mode (brief: allocation-free hot path).
        var bg = Solve(new Quadratic(), 16.0, after: 2).WithVScale(1e-10);
        double k = Math.Exp(bg.NEnd - 50) * bg.At(bg.NEnd - 50).H;
        double sum = bg.At(1).H + bg.NAtHorizonExit(k); // warm up
        long before = GC.GetAllocatedBytesForCurrentThread();
        for (int i = 0; i < 2000; i++)
        {
            double n = bg.NStop * i / 2000.0;
            sum += bg.At(n).Epsilon3;
        }
        sum += bg.NAtHorizonExit(k);
        long allocated = GC.GetAllocatedBytesForCurrentThread() - before;
        Assert.Equal(0, allocated);
    }

    private sealed class Wrapped(IBackground inner) : IBackground
    {
        public double NStart => inner.NStart;
        public double NStop => inner.NStop;
        public double NEnd => inner.NEnd;
        public IReadOnlyList<double> EndCrossings => inner.EndCrossings;
        public IReadOnlyList<double> NonSmoothTimes => inner.NonSmoothTimes;
        public double VScale => inner.VScale;
        public BackgroundPoint At(double n) => inner.At(n);
    }

    [Fact]
    public void InflationThatStopsAndResumesReportsBothCrossings()
    {
        // physics.md section 2: some models cross epsilon_1 = 1 more than once; report every crossing. A shallow exponential
        // (e1 = 0.02) with a steep band (lambda = 2, attractor e1 = 2) in 2 < phi < 4: inflation stops in the band and resumes
        // after it (Lucchin & Matarrese attractors on each piece).
        var theory = new PiecewiseExponential(new[] { 2.0, 4.0 }, new[] { 0.2, 2.0, 0.2 });
        var bg = Solve(theory, 0.0, phiEnd: 6.0);
        Assert.Equal(2, bg.NonSmoothTimes.Count);
        Assert.Single(bg.RisingCrossings);
        Assert.Equal(2, bg.EndCrossings.Count);
        double up = bg.EndCrossings[0], down = bg.EndCrossings[1];
        Assert.True(bg.NonSmoothTimes[0] < up && up < bg.NonSmoothTimes[1] && bg.NonSmoothTimes[1] < down);
        Assert.Equal(1.0, bg.At(up).Epsilon1, 1e-9);
        Assert.Equal(1.0, bg.At(down).Epsilon1, 1e-9);
        Assert.True(bg.EndedAtPhiEnd);
        Assert.Equal(6.0, bg.At(bg.NEnd).Phi, 1e-10);
        Assert.Equal(0.02, bg.At(bg.NEnd).Epsilon1, 1e-8); // back on the shallow attractor
        Assert.Equal(bg.NEnd, bg.NStop);
    }

    [Fact]
    public void ContinuesThroughOscillationsWithoutCountingThemAsEnds()
    {
        // After the end the field oscillates; epsilon_1 dips below 1 near each turning point, which must not count as
        // inflation resuming (physics.md section 2: report every crossing of the inflationary history).
        var bg = Solve(new Quadratic(), 16.0, after: 4);
        Assert.Single(bg.RisingCrossings);
        Assert.InRange(bg.NStop, bg.NEnd + 4, bg.NEnd + 5);
        Assert.True(bg.At(bg.NStop).Phi < 0.2, "the field has fallen into the minimum");
        double rho0 = 3 * Math.Pow(bg.At(bg.NEnd).H, 2), rho4 = 3 * Math.Pow(bg.At(bg.NStop).H, 2);
        // Averaged over oscillations the energy density of a massive field falls like a^-3 (common practice); after 4 e-folds
        // the ratio is within a factor of a few of exp(-12).
        Assert.InRange(Math.Log(rho0 / rho4), 9, 13);

        // Plateau models with faster oscillations (the switching method handles the continuation).
        foreach (var (theory, phi0) in new (ModeSolver.Models.IInflatonTheory, double)[] { (new Starobinsky(), 5.5), (new TModel(0.01), 1.0) })
        {
            var p = Solve(theory, phi0, after: 3);
            Assert.Single(p.RisingCrossings);
            // a dip of epsilon_1 below 1 near the planned stop is followed until it ends (at most the 1 e-fold re-entry window)
            Assert.InRange(p.NStop, p.NEnd + 3, p.NEnd + 4);
            Assert.True(Math.Abs(p.At(p.NStop).Phi) < 0.5 * Math.Abs(p.At(p.NEnd).Phi), theory.Description);
        }
    }
}
