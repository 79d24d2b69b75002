using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Integrators;
using ModeSolver.Perturbations;

namespace ModeSolver.Tests.Perturbations;

/// <summary>
/// Resonant features: a linear potential with a small oscillating term, V = V0 (phi + b f cos(phi/f)) (monotonic for
/// b &lt; 1). The Hubble-flow parameters oscillate at omega = |phi'|/f = 1/(f phi) per e-fold (slow roll on the linear
/// part), modes resonate with them at -k tau ~ omega/2, and P_s(k) carries a log-periodic modulation of frequency
/// omega in ln k.
/// </summary>
public class ResonantFeatureTests
{
    private const double Phi0 = 12.0;
    private const double PhiMid = 11.0; // modes leave the horizon near here (about 60 e-folds before the end)

    private sealed record Case(BackgroundSolution Bg, double F, double B, double NMid, double KMid);

    private static readonly Dictionary<double, Lazy<Case>> Cases = new()
    {
        [1e-2] = new(() => Build(1e-2, 0.01)),
        [1e-3] = new(() => Build(1e-3, 0.003)),
    };

    private static Case Build(double f, double b)
    {
        var pars = new Dictionary<string, double> { ["V0"] = 1e-10, ["b"] = b, ["f"] = f };
        var theory = TheoryFactory.Build(new ModelSpec(null, "V0 * (phi + b * f * cos(phi / f))", null, null, false, pars, null));
        // The linear potential turns negative after the end: stop there.
        var bg = BackgroundSolver.Solve(theory, new BackgroundSettings
        {
            Phi0 = Phi0, Tolerance = 1e-12, EFoldsAfterEnd = 0, InflationMethod = new DormandPrince853(),
        });
        double nMid = CrossingN(bg, PhiMid);
        return new Case(bg, f, b, nMid, Math.Exp(nMid) * bg.At(nMid).H);
    }

    private static double CrossingN(IBackground bg, double phi)
    {
        double a = bg.NStart, c = bg.NEnd;
        for (int i = 0; i < 200; i++)
        {
            double m = 0.5 * (a + c);
            if (bg.At(m).Phi > phi) a = m; else c = m;
        }
        return 0.5 * (a + c);
    }

    /// <summary>Slow-roll frequency of the background oscillation on the linear part: |phi'|/f = 1/(f phi).</summary>
    private static double Omega(Case c, double n) => 1.0 / (c.F * c.Bg.At(n).Phi);

    [Theory]
    [InlineData(1e-2)]
    [InlineData(1e-3)]
    public void OscillationFrequencyIsMeasuredFromTheBackground(double f)
    {
        var c = Cases[f].Value;
        var scan = FrictionScan.FromStart(c.Bg);
        double omega = scan.MaxOscillationFrequency(c.NMid - 0.5, c.NMid + 0.5);
        double expected = Omega(c, c.NMid);
        // Counting extrema over a 2 e-fold window resolves omega to pi/2; omega drifts by ~1% over the window.
        Assert.True(Math.Abs(omega - expected) <= Math.PI / FrictionScan.FrequencyWindow + 0.02 * expected,
            $"measured omega = {omega:G4}, |phi'|/f = {expected:G4}");
        Assert.False(scan.OscillationUnresolved(omega));
        // A smooth model has no oscillation: the quadratic background of the spectrum tests.
        var smooth = FrictionScan.FromStart(SpectrumTests.Solve(new ModeSolver.Tests.Background.Quadratic(1e-10), 17.5));
        Assert.Equal(0.0, smooth.MaxOscillationFrequency(0, 50));
    }

    [Theory]
    [InlineData(1e-2, 0.0)]
    [InlineData(1e-2, 0.35)]
    [InlineData(1e-2, 0.7)]
    [InlineData(1e-3, 0.0)]
    [InlineData(1e-3, 0.35)]
    [InlineData(1e-3, 0.7)]
    public void ModesStartBeyondTheResonanceAndMatchABruteForceDeepStart(double f, double phaseFraction)
    {
        // Self-consistency (no outside source): the automatic start against the same explicit Runge-Kutta started
        // four times deeper than the rule asks, at the same tolerance; they must agree within the sum of the reported
        // errors. phaseFraction places k across one period of the modulation in ln k.
        var c = Cases[f].Value;
        double omega = Omega(c, c.NMid);
        double k = c.KMid * Math.Exp(phaseFraction * 2 * Math.PI / omega);
        var mi = new ModeIntegrator();
        var s = new ModeSettings { Tolerance = 1e-6, Derivatives = false };
        var mode = mi.Solve(c.Bg, k, s);
        Assert.True(mode.StartDepth >= 0.95 * ModeIntegrator.ResonanceStartFactor * omega,
            $"start depth {mode.StartDepth:G4} below {ModeIntegrator.ResonanceStartFactor} x omega = {omega:G4}");
        var deep = mi.Solve(c.Bg, k, s with { StartDepth = 4 * mode.StartDepth });
        double dev = Math.Abs(mode.Ps / deep.Ps - 1);
        Assert.True(dev <= mode.ErrorEstimate + deep.ErrorEstimate,
            $"P_s off the deep start (k/aH {deep.StartDepth:G4}) by {dev:E2}; reported {mode.ErrorEstimate:E2} + {deep.ErrorEstimate:E2}");
    }

    [Fact]
    public void APivotModeStartedBeyondTheCheckedDepthSaysItsRunningIsNotBounded()
    {
        // The f = 1e-3 resonance forces the pivot mode to start deeper than the depth to which alpha_s was checked against
        // fits, so the pivot values must say so; the same potential without its oscillation starts at the default depth.
        var c = Cases[1e-3].Value;
        var deep = Spectra.PivotValues.Compute(c.Bg, c.KMid, 1e-6);
        Assert.True(deep.StartDepth > Spectra.PivotValues.RunningDepthLimit, $"start depth {deep.StartDepth:G4}");
        Assert.Contains("not bounded", deep.DeepStartWarning());
        var smooth = Build(1e-2, 0.0); // the linear potential without its oscillation
        var shallow = Spectra.PivotValues.Compute(smooth.Bg, smooth.KMid, 1e-6);
        Assert.True(shallow.StartDepth <= Spectra.PivotValues.RunningDepthLimit, $"start depth {shallow.StartDepth:G4}");
        Assert.Null(shallow.DeepStartWarning());
    }

    [Fact]
    public void AModeTheBackgroundCannotStartBeyondTheResonanceIsRefused()
    {
        // k/aH = 100 at the background's start is enough for the plain rule (7) but not for 2 omega = 2 x 83 there.
        var c = Cases[1e-3].Value;
        double k = 100 * Math.Exp(c.Bg.NStart) * c.Bg.At(c.Bg.NStart).H;
        var e = Assert.Throws<ModeSolver.Physics.PhysicsException>(() => new ModeIntegrator().Solve(c.Bg, k, new ModeSettings { Derivatives = false }));
        Assert.Contains("oscillation frequency", e.Message);
        Assert.Contains("phi0", e.Message);
    }

    [Theory]
    [InlineData(1e-2)]
    [InlineData(1e-3)]
    public void ModulationAmplitudeMatchesTheResonantFormula(double f)
    {
        // Flauger, McAllister, Pajer, Westphal & Xu 2010 (JCAP 06, 009), from memory: for V = mu^3 phi + Lambda^4 cos(phi/f),
        // b = Lambda^4/(mu^3 f) (here b as in the formula), P_s(k) = P0(k) [1 + delta n_s cos(phi_k/f)] with
        // delta n_s = 3 b sqrt(2 pi) (f phi_*)^(1/2). Our own first-order derivation agrees: delta eps/eps = 6 b /
        // sqrt(omega^2 + 9) cos, and the stationary phase at -k tau = omega/2 gives 3 b sqrt(2 pi / omega), omega =
        // 1/(f phi_*). Valid to first order in b, for omega >> 1 (stationary phase; next terms of relative size
        // ~1/omega) and slow roll; we allow 2/omega + 9/(2 omega^2) + delta n_s relative (twice the first neglected
        // stationary-phase order, the sqrt(omega^2 + 9) factor, and the second order in b).
        var c = Cases[f].Value;
        double omega = Omega(c, c.NMid);
        double phiStar = c.Bg.At(c.NMid).Phi;
        double expected = 3 * c.B * Math.Sqrt(2 * Math.PI) * Math.Sqrt(f * phiStar);
        // Two periods in ln k, 16 points per period; fit ln P = c0 + c1 u + c2 u^2 + A cos(omega u) + B sin(omega u).
        const int n = 33;
        double span = 2 * 2 * Math.PI / omega;
        var mi = new ModeIntegrator();
        var s = new ModeSettings { Tolerance = 1e-6, Derivatives = false, Kinds = ModeKinds.Scalar };
        var rows = new double[n][];
        var rhs = new double[n];
        for (int i = 0; i < n; i++)
        {
            double u = -0.5 * span + span * i / (n - 1);
            var m = mi.Solve(c.Bg, c.KMid * Math.Exp(u), s);
            rows[i] = [1, u, u * u, Math.Cos(omega * u), Math.Sin(omega * u)];
            rhs[i] = Math.Log(m.Ps);
        }
        var design = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfRowArrays(rows);
        var coef = design.Solve(MathNet.Numerics.LinearAlgebra.Vector<double>.Build.Dense(rhs));
        double amplitude = Math.Sqrt(coef[3] * coef[3] + coef[4] * coef[4]);
        double allowed = 2 / omega + 9 / (2 * omega * omega) + expected;
        Assert.True(Math.Abs(amplitude / expected - 1) <= allowed,
            $"omega = {omega:G4}: fitted delta n_s = {amplitude:E4}, formula {expected:E4} (off by {amplitude / expected - 1:P2}, allowed {allowed:P1})");
    }
}
