using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Perturbations;
using ModeSolver.Physics;
using ModeSolver.Spectra;
using ModeSolver.Tests.Background;
using ModeSolver.Estimates;

namespace ModeSolver.Tests.Perturbations;

public class SpectrumTests
{
    internal static BackgroundSolution Solve(IInflatonTheory theory, double phi0, double? phiEnd = null) =>
        BackgroundSolver.Solve(theory, new BackgroundSettings
        {
            Phi0 = phi0, PhiEnd = phiEnd, Tolerance = 1e-12, InflationMethod = new DormandPrince853(),
        });

    internal static readonly Lazy<BackgroundSolution> QuadraticBackground = new(() => Solve(new Quadratic(1e-10), 17.5));

    /// <summary>The k (background units) that leaves the horizon <paramref name="efoldsBeforeEnd"/> e-folds before the end.</summary>
    internal static double PivotK(IBackground bg, double efoldsBeforeEnd)
    {
        double n = bg.NEnd - efoldsBeforeEnd;
        return Math.Exp(n) * bg.At(n).H;
    }

    [Fact]
    public void Quadratic_ExactNsAgreesWithSecondOrderSlowRoll()
    {
        // Second-order Hubble-flow slow roll (Stewart & Lyth 1993; Schwarz, Terrero-Escalante & Garcia 2001;
        // physics.md 4c) at N_* = 60: the differences are third order in e_n ~ 1e-2. Found here: n_s(exact) - n_s(SR2)
        // = 2.7e-6, P_s(exact)/P_s(SR2) - 1 = 1.5e-4, r differs by 1.3e-4 relative.
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 60);
        var exact = PivotValues.Compute(bg, k);
        var sr = SlowRoll.HubbleSecondOrder(bg.At(bg.NEnd - 60));
        Assert.True(Math.Abs(exact.Ns - sr.Ns) < 1e-5, $"n_s exact {exact.Ns:F8} vs SR2 {sr.Ns:F8}");
        Assert.True(Math.Abs(exact.Ns - sr.Ns) > 1e-7, "third-order terms should be visible");
        Assert.True(Math.Abs(exact.Ps / sr.Ps - 1) < 1e-3);
        Assert.True(Math.Abs(exact.R / sr.R - 1) < 1e-3);
        Assert.True(Math.Abs(exact.AlphaS / sr.AlphaS - 1) < 0.05, $"alpha_s exact {exact.AlphaS:E4} vs SR2 {sr.AlphaS:E4}");
        Assert.True(exact.RhsEvaluations <= 600, $"{exact.RhsEvaluations} right-hand sides at the pivot");
        // The exact amplitude provider gives the same P_s as the scalar part of the full mode.
        double ps = new ExactAmplitude().ScalarPower(bg, k);
        Assert.True(Math.Abs(ps / exact.Ps - 1) < 2e-6);
    }

    [Fact]
    public void Quadratic_TighterToleranceMovesPLessThanTheReportedError()
    {
        // Self-consistency of the error estimate: a 100x tighter run (deeper start, smaller steps) is the reference.
        var bg = QuadraticBackground.Value;
        var mi = new ModeIntegrator();
        foreach (double before in new[] { 65.0, 60.0, 45.0, 20.0 })
        {
            double k = PivotK(bg, before);
            var loose = mi.Solve(bg, k, new ModeSettings { Tolerance = 1e-6 });
            var tight = mi.Solve(bg, k, new ModeSettings { Tolerance = 1e-8 });
            Assert.True(Math.Abs(loose.Ps / tight.Ps - 1) < loose.ErrorEstimate, $"P_s at N_end - {before}: moved {loose.Ps / tight.Ps - 1:E2}, reported {loose.ErrorEstimate:E2}");
            Assert.True(Math.Abs(loose.Pt / tight.Pt - 1) < loose.ErrorEstimate, $"P_t at N_end - {before}: moved {loose.Pt / tight.Pt - 1:E2}, reported {loose.ErrorEstimate:E2}");
            Assert.True(Math.Abs(loose.Ns - tight.Ns) < 1e-6);
        }
    }

    [Fact]
    public void Spectrum_IsBitIdenticalForAnyNumberOfThreads()
    {
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 60);
        SpectrumSettings S(int threads) => new() { KMin = k * Math.Exp(-4), KMax = k * Math.Exp(4), KCount = 24, ExtraK = new[] { k }, DegreeOfParallelism = threads };
        var one = SpectrumSolver.Compute(bg, S(1));
        var three = SpectrumSolver.Compute(bg, S(3));
        Assert.Equal(one.K, three.K);
        Assert.Equal(one.Ps, three.Ps);
        Assert.Equal(one.Pt, three.Pt);
        Assert.Equal(one.Ns, three.Ns);
        Assert.Equal(one.AlphaS, three.AlphaS);
        Assert.Equal(one.ErrorEstimate, three.ErrorEstimate);
        Assert.Equal(one.RhsEvaluations, three.RhsEvaluations);
        Assert.Contains(k, one.K);
    }

    [Fact]
    public void Spectrum_InterpolatesWithinToleranceAndReportsWork()
    {
        var bg = QuadraticBackground.Value;
        double k = PivotK(bg, 55);
        var spec = SpectrumSolver.Compute(bg, new SpectrumSettings { KMin = k * Math.Exp(-5), KMax = k * Math.Exp(5), KCount = 8, Tolerance = 1e-5 });
        var mi = new ModeIntegrator();
        double worstTrue = 0;
        foreach (double u in new[] { -4.3, -1.7, 0.2, 2.9 })
        {
            double kk = k * Math.Exp(u);
            var m = mi.Solve(bg, kk, new ModeSettings { Tolerance = 1e-7 });
            // An independent, 10^4 times tighter solve off the sample grid: the spectrum's reported error must bound
            // its true error there (interpolation and mode errors together).
            var tight = mi.Solve(bg, kk, new ModeSettings { Tolerance = 1e-9 });
            worstTrue = Math.Max(worstTrue, Math.Max(Math.Abs(spec.InterpolatePs(kk) / tight.Ps - 1), Math.Abs(spec.InterpolatePt(kk) / tight.Pt - 1)));
            Assert.True(Math.Abs(spec.InterpolatePs(kk) / m.Ps - 1) < 1e-5, $"P_s at {u}: {spec.InterpolatePs(kk) / m.Ps - 1:E2}");
            Assert.True(Math.Abs(spec.InterpolatePt(kk) / m.Pt - 1) < 1e-5);
            Assert.Equal(m.Ns, spec.InterpolateNs(kk), 1e-5);
            Assert.Equal(m.Nt, spec.InterpolateNt(kk), 1e-5);
            Assert.Equal(m.AlphaS, spec.InterpolateAlphaS(kk), 1e-5);
        }
        Assert.True(spec.MaxRelativeError < 1e-5 && spec.MaxRelativeError > 0);
        Assert.True(spec.MeanRhsEvaluationsPerMode > 50 && spec.MeanRhsEvaluationsPerMode < 600);
        Assert.True(worstTrue <= spec.MaxRelativeError, $"true error {worstTrue:E2} off the grid above the reported {spec.MaxRelativeError:E2}");
        Assert.Throws<ArgumentOutOfRangeException>(() => spec.InterpolatePs(k * Math.Exp(6)));
    }

    [Fact]
    public void Spectrum_OutsideTheServedRangeThrowsWithTheRange()
    {
        var bg = QuadraticBackground.Value;
        var (kMin, kMax) = SpectrumSolver.ServedRange(bg, new SpectrumSettings { KMin = 1, KMax = 1 });
        var low = Assert.Throws<PhysicsException>(() => SpectrumSolver.Compute(bg, new SpectrumSettings { KMin = kMin / 2, KMax = kMin * 10 }));
        Assert.Contains("serves k in", low.Message);
        var high = Assert.Throws<PhysicsException>(() => SpectrumSolver.Compute(bg, new SpectrumSettings { KMin = kMax / 10, KMax = kMax * 2 }));
        Assert.Contains("has not left the horizon", high.Message);
        Assert.Throws<ArgumentOutOfRangeException>(() => SpectrumSolver.Compute(bg, new SpectrumSettings { KMin = 2, KMax = 1 }));
    }

    [Fact]
    public void LinearKink_MatchesStarobinsky1992()
    {
        // Starobinsky 1992 (JETP Lett. 55, 489), physics.md 4b: V0 = 1, A_plus = 2e-3, A_minus = 2e-4, kink at phi0 = 0;
        // H at the kink from V0 (H^2 = V0/3), y = k/k0 with k0 = aH at the kink; 1e-3 relative over y in [0.02, 30],
        // the deep dip (y ~ 0.5, P down by ~6 from the large-scale plateau) included.
        const double v0 = 1, ap = 2e-3, am = 2e-4;
        var bg = Solve(new LinearKink(v0, ap, am, 0.0), 0.022, phiEnd: -0.0035);
        double nk = Assert.Single(bg.NonSmoothTimes);
        double k0 = Math.Exp(nk) * bg.At(nk).H;
        double h = Math.Sqrt(v0 / 3), d = (am - ap) / ap;
        double Formula(double y)
        {
            double y2 = y * y;
            return 9 * Math.Pow(h, 6) / (4 * Math.PI * Math.PI * am * am) * (1 - 3 * d / y * ((1 - 1 / y2) * Math.Sin(2 * y) + 2 / y * Math.Cos(2 * y))
                + 9 * d * d / (2 * y2) * (1 + 1 / y2) * (1 + 1 / y2 + (1 - 1 / y2) * Math.Cos(2 * y) - 2 / y * Math.Sin(2 * y)));
        }
        var spec = SpectrumSolver.Compute(bg, new SpectrumSettings { KMin = 0.02 * k0, KMax = 30 * k0, KCount = 60, Kinds = ModeKinds.Scalar, ErrorChecks = 2 });
        double worst = 0, dipY = 0, dipP = double.MaxValue;
        for (int i = 0; i < spec.Count; i++)
        {
            double y = spec.K[i] / k0;
            worst = Math.Max(worst, Math.Abs(spec.Ps[i] / Formula(y) - 1));
            if (spec.Ps[i] < dipP) { dipP = spec.Ps[i]; dipY = y; }
        }
        Assert.True(worst < 1e-3, $"worst relative deviation {worst:E2}");
        Assert.InRange(dipY, 0.4, 0.6);
        Assert.True(spec.Ps[0] / dipP > 5, "the dip is deep");
        Assert.True(spec.Count > 60, "refinement added samples in the oscillations");
    }

    /// <summary>
    /// A linear slope s0 with a smooth near-inflection point of width w at phi = 0 (the slope falls to zero there and
    /// V'' = 0): V = V0 [1 + s0 (phi - w atan(phi/w))], so V' = V0 s0 (phi/w)^2 / (1 + (phi/w)^2). The model class
    /// of near-inflection points that produce an ultra-slow-roll phase (Garcia-Bellido &amp; Ruiz Morales 2017, Phys. Dark
    /// Univ. 18, 47); written here in a closed form whose width is easy to set. With w = 0.002 smaller than the
    /// field's travel per e-fold (~ s0 / 3), the field coasts across: e2 reaches -6.
    /// </summary>
    private sealed class NearInflection(double s0, double w) : IInflatonTheory
    {
        public string Description => "linear slope with a near-inflection point";
        public Jet3 Potential(double u)
        {
            double q = u / w, d = 1 + q * q, c = 1e-10 * s0;
            return new(1e-10 + c * (u - w * Math.Atan(q)), c * q * q / d, c * 2 * q / (w * d * d), c * 2 * (1 - 3 * q * q) / (w * w * d * d * d));
        }
        public Jet3 Kinetic(double phi) => new(1, 0, 0, 0);
        public bool IsCanonical => true;
        public IReadOnlyList<double> NonSmoothPoints => Array.Empty<double>();
        public (double Min, double Max) ValidRange => (double.NegativeInfinity, double.PositiveInfinity);
    }

    [Fact]
    public void NearInflection_GrowthBoundedByK4AndSlowRollFails()
    {
        var bg = Solve(new NearInflection(0.02, 0.002), 0.2, phiEnd: -0.3);
        double nUsr = 0, e2Min = 0;
        for (double n = 0; n < bg.NEnd; n += 0.01)
        {
            double e2 = bg.At(n).Epsilon2;
            if (e2 < e2Min) { e2Min = e2; nUsr = n; }
        }
        Assert.True(e2Min < -5, $"ultra-slow roll expected, min e2 = {e2Min}");
        double kc = Math.Exp(nUsr) * bg.At(nUsr).H;
        var spec = SpectrumSolver.Compute(bg, new SpectrumSettings { KMin = kc * Math.Exp(-4), KMax = kc * Math.Exp(4), KCount = 40, Kinds = ModeKinds.Scalar, ErrorChecks = 2 });
        int peak = 0;
        for (int i = 0; i < spec.Count; i++) if (spec.Ps[i] > spec.Ps[peak]) peak = i;
        int dip = 0;
        for (int i = 0; i < peak; i++) if (spec.Ps[i] < spec.Ps[dip]) dip = i;
        Assert.True(spec.Ps[peak] / spec.Ps[dip] > 10, "a real peak");
        double steepest = 0;
        for (int i = dip; i <= peak; i++) steepest = Math.Max(steepest, spec.Ns[i] - 1);
        // Byrnes, Cole & Patil 2019 (JCAP 06, 028), physics.md 4e: the growth from the dip to the peak is no steeper
        // than about k^4 (a small margin for this fairly sharp feature; found here: 3.2, peak/dip = 19).
        Assert.InRange(steepest, 2.0, 4.3);
        // Second-order slow roll (physics.md 4c) at the peak misses by far more than 10% (found: it gives 0.13 of it).
        var sr = SlowRoll.HubbleSecondOrder(bg.At(bg.NAtHorizonExit(spec.K[peak])));
        Assert.True(Math.Abs(sr.Ps / spec.Ps[peak] - 1) > 0.1, $"slow roll / exact = {sr.Ps / spec.Ps[peak]:F3}");
        // Far from the feature slow roll is fine again (1e-2).
        var srFar = SlowRoll.HubbleSecondOrder(bg.At(bg.NAtHorizonExit(spec.K[0])));
        Assert.True(Math.Abs(srFar.Ps / spec.Ps[0] - 1) < 1e-2);
    }
}
