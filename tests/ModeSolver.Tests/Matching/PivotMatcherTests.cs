using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Matching;
using ModeSolver.Physics;
using ModeSolver.Tests.Background;
using ModeSolver.Estimates;

namespace ModeSolver.Tests.Matching;

public class PivotMatcherTests
{
    private static readonly Lazy<BackgroundSolution> StarobinskyBg = new(() => BackgroundSolverTests.Solve(new Starobinsky(), 5.8, after: 0));

    private static PivotSolution Match(PivotSettings s) => PivotMatcher.Match(StarobinskyBg.Value, s, new SlowRollAmplitude());

    [Fact]
    public void InstantaneousReheatingGivesNStarBetween55And57()
    {
        // Liddle & Leach 2003 (Phys. Rev. D 68, 103503), physics.md section 5: plateau models with instantaneous reheating
        // have N_* of about 55 to 57 at k_* = 0.05/Mpc.
        var m = Match(new PivotSettings());
        Assert.InRange(m.NStar, 55, 57);
        Assert.InRange(m.HStarGeV, 1e13, 1e14);
        Assert.Equal(1.0, SlowRoll.HubbleSecondOrder(m.Background.At(m.NPivot)).Ps / Constants.DefaultScalarAmplitude, 1e-9);
        Assert.Equal(0.0, m.NReh);
        // Fixed point: the pivot k converts back to 0.05/Mpc and leaves the horizon at N_pivot.
        Assert.Equal(m.NPivot, m.Background.NAtHorizonExit(m.ToBackgroundUnits(0.05)), 1e-8);
        Assert.True(m.KMinMpc < 0.05 && m.KMaxMpc > 0.05);
        Assert.Equal("slow-roll-2", m.AmplitudeName);
    }

    [Fact]
    public void MatterDominatedReheatingLowersNStarByAQuarterOfNReh()
    {
        // physics.md section 5: N_* = ln(H_*/k_*) - N_reh + ln a_reh with ln a_reh = const - ln T_reh and
        // T_reh ~ rho_reh^(1/4). For w = 0, rho_reh = rho_end exp(-3 N_reh), so ln a_reh grows by (3/4) N_reh and
        // N_* changes by -N_reh + (3/4) N_reh = -N_reh/4 at fixed H_* and rho_end (leading order).
        // Next order: the pivot moves by dN_* = -N_reh/4, so the unnormalised P_s falls by (1 - n_s) N_reh/4 in ln and the
        // V scale rises by as much; N_* holds ln H_* (1/2 ln V_scale) and ln a_reh (-1/4 ln V_scale, as T_reh ~ rho_end^(1/4)),
        // a net +(1/4)(1 - n_s) N_reh/4 ~ 0.026 here. The drift of H itself (e1 N_reh/4 ~ 1e-3) is left out: 0.005 allowed.
        var inst = Match(new PivotSettings());
        var md = Match(new PivotSettings { Reheating = ReheatingHistory.WithEFolds(0, 12) });
        Assert.Equal(inst.NStar - 12 / 4.0, md.NStar, 0.05);
        double oneMinusNs = 1 - inst.PivotSlowRoll.SecondOrder.Ns;
        Assert.Equal(inst.NStar - 12 / 4.0 + 0.25 * oneMinusNs * 12 / 4.0, md.NStar, 0.005);
        Assert.Equal(12, md.NReh);
        Assert.True(md.TRehGeV < inst.TRehGeV * Math.Exp(-2.9 * 3 / 4.0 * 12 / 3.0) * 10);
    }

    [Fact]
    public void RadiationLikeReheatingDoesNotMoveNStar()
    {
        // physics.md section 5: for w = 1/3, -N_reh + ln a_reh = -(1/4) ln rho_end + const, independent of T_reh.
        var inst = Match(new PivotSettings());
        var rad = Match(new PivotSettings { Reheating = ReheatingHistory.WithTemperature(1.0 / 3.0, 1e6) });
        Assert.Equal(inst.NStar, rad.NStar, 1e-5);
        Assert.Equal(Math.Log(inst.TRehGeV / 1e6), rad.NReh, 1e-5);
    }

    [Fact]
    public void TemperatureInputMatchesEFoldInput()
    {
        var t = Match(new PivotSettings { Reheating = ReheatingHistory.WithTemperature(0.0, 1e9) });
        var n = Match(new PivotSettings { Reheating = ReheatingHistory.WithEFolds(0.0, t.NReh) });
        Assert.Equal(t.NStar, n.NStar, 1e-6);
        Assert.Equal(1e9, n.TRehGeV, 1e9 * 1e-8);
    }

    [Fact]
    public void EnergyScaleFollowsFromAsAndR()
    {
        // physics.md 4f: V_* = (3 pi^2/2) A_s r. From H^2 = V/(3 - e1), P_s = H^2/(8 pi^2 e1)(1 - 2(C+1) e1 - C e2) and
        // r = 16 e1 (1 + C e2) the identity holds up to e1/3 and (C e2)^2 ~ 1e-3 in V, so ~3e-4 in V^(1/4): we allow 1e-3.
        var m = Match(new PivotSettings());
        double r = m.PivotSlowRoll.SecondOrder.R;
        double expected = Math.Pow(1.5 * Math.PI * Math.PI * m.PsPivot * r, 0.25) * Constants.ReducedPlanckMassGeV;
        Assert.Equal(1.0, m.VStarQuarterGeV / expected, 1e-3);
        // and the common-practice rule of thumb V^(1/4) = 1.0e16 GeV (r/0.01)^(1/4) (physics.md 4f), which rounds 1.02e16 to
        // two digits: within 3%.
        Assert.Equal(1.0, m.VStarQuarterGeV / (1.0e16 * Math.Pow(r / 0.01, 0.25)), 0.03);
    }

    [Fact]
    public void GivenEFoldsIsOneRescaling()
    {
        // P_s is exactly proportional to the V scale at fixed N_* (the background's shape does not depend on it):
        // with N_* given the matching is one amplitude evaluation and one rescaling, and the result is normalised.
        var m = Match(new PivotSettings { EFolds = 55 });
        Assert.Equal(1, m.Iterations);
        Assert.Equal(1.0, SlowRoll.HubbleSecondOrder(m.Background.At(m.NPivot)).Ps / Constants.DefaultScalarAmplitude, 1e-12);
    }

    [Theory]
    [InlineData(1.0 / 3.0, double.NaN)]
    [InlineData(0.0, 1e9)]
    public void ReheatingRootSatisfiesTheMatchingEquation(double w, double tReh)
    {
        // physics.md section 5: N_* = ln(H_*/k_*) - N_reh + ln a_reh, here re-evaluated at the returned solution.
        var reh = double.IsNaN(tReh) ? ReheatingHistory.Instantaneous : ReheatingHistory.WithTemperature(w, tReh);
        var s = new PivotSettings { Reheating = reh };
        var m = Match(s);
        double lnHMpc = Math.Log(m.HStar * Constants.ReducedPlanckMassGeV * Constants.GeVInInverseMpc);
        double lnAReh = Math.Log(Math.Pow(s.Gs0 / s.GsReh, 1.0 / 3.0) * s.T0GeV / m.TRehGeV);
        double rhs = lnHMpc - Math.Log(s.KPivot) - m.NReh + lnAReh;
        Assert.True(Math.Abs(rhs - m.NStar) < 2 * s.Tolerance, $"N_* = {m.NStar:R}, equation gives {rhs:R}");
        Assert.True(m.Iterations <= 8, $"{m.Iterations} amplitude evaluations");
    }

    [Fact]
    public void GivenEFoldsAndNoNormalisation()
    {
        var m = Match(new PivotSettings { EFolds = 60 });
        Assert.Equal(60, m.NStar);
        Assert.True(double.IsNaN(m.NReh));
        Assert.Equal(Constants.DefaultScalarAmplitude, m.PsPivot, 1e-20);
        var raw = Match(new PivotSettings { EFolds = 60, ScalarAmplitude = null });
        Assert.Equal(1.0, raw.VScale);
        Assert.Equal("none", raw.AmplitudeName);
        // k unit: the pivot's aH in background units is k_* exp(LnKUnit)
        Assert.Equal(Math.Exp(raw.NPivot) * raw.HStar, raw.ToBackgroundUnits(0.05), 1e-9 * raw.ToBackgroundUnits(0.05));
    }

    [Fact]
    public void Errors()
    {
        var bg = StarobinskyBg.Value;
        var amp = new SlowRollAmplitude();
        Assert.Contains("e-folds of inflation before the end, N_* = ", Assert.Throws<PhysicsException>(() => PivotMatcher.Match(bg, new PivotSettings { EFolds = bg.NTotal + 1 }, amp)).Message);
        var shortBg = BackgroundSolverTests.Solve(new Starobinsky(), 4.0, after: 0);
        Assert.Contains("e-folds of inflation before the end (phi0 = ", Assert.Throws<PhysicsException>(() => PivotMatcher.Match(shortBg, new PivotSettings(), amp)).Message);
        Assert.Contains("Only 1 e-folds of inflation before the pivot leaves the horizon", Assert.Throws<PhysicsException>(() => PivotMatcher.Match(bg, new PivotSettings { EFolds = bg.NTotal - 1 }, amp)).Message);
        Assert.Contains("w = -0.5 is outside", Assert.Throws<PhysicsException>(() => Match(new PivotSettings { Reheating = ReheatingHistory.WithTemperature(-0.5, 1e9) })).Message);
        Assert.Contains("below 0.004 GeV", Assert.Throws<PhysicsException>(() => Match(new PivotSettings { Reheating = ReheatingHistory.WithTemperature(0, 1e-3) })).Message);
        Assert.Contains("above the temperature at the end of inflation", Assert.Throws<PhysicsException>(() => Match(new PivotSettings { Reheating = ReheatingHistory.WithTemperature(0, 1e18) })).Message);
        Assert.Contains("below 0.004 GeV", Assert.Throws<PhysicsException>(() => Match(new PivotSettings { Reheating = ReheatingHistory.WithEFolds(0, 200) })).Message);
    }

    /// <summary>Counts the amplitude evaluations and the distinct (background, k) pairs they were asked for.</summary>
    private sealed class CountingAmplitude(IPivotAmplitude inner) : IPivotAmplitude
    {
        public readonly List<(double VScale, double K)> Calls = new();
        public string Name => inner.Name;
        public double ScalarPower(IBackground background, double kBackgroundUnits)
        {
            Calls.Add((background.VScale, kBackgroundUnits));
            return inner.ScalarPower(background, kBackgroundUnits);
        }
    }

    [Theory]
    [InlineData(0.0, 1e6)]
    [InlineData(0.0, 1e10)]
    [InlineData(1.0 / 3.0, 1e8)]
    [InlineData(0.5, 1e12)]
    public void EachPivotModeIsSolvedOncePerMatchingStep(double w, double tReh)
    {
        // The N_* iteration evaluates the pivot amplitude once per distinct N_*; the final normalisation at the root
        // reuses the step that evaluated it (Brent's method may return an earlier point than its last one).
        var counting = new CountingAmplitude(new SlowRollAmplitude());
        var m = PivotMatcher.Match(StarobinskyBg.Value, new PivotSettings { Reheating = ReheatingHistory.WithTemperature(w, tReh) }, counting);
        var distinct = new HashSet<(double, double)>(counting.Calls);
        Assert.Equal(distinct.Count, counting.Calls.Count);
        Assert.Equal(counting.Calls.Count, m.Iterations);
        Assert.Equal(1.0, SlowRoll.HubbleSecondOrder(m.Background.At(m.NPivot)).Ps / Constants.DefaultScalarAmplitude, 1e-9);
    }
}
