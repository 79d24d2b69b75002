using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Matching;
using ModeSolver.Models;
using ModeSolver.Pipeline;
using ModeSolver.Spectra;

namespace ModeSolver.Tests.Models;

/// <summary>
/// The checked jet table behind the double-double Jordan-frame map (<see cref="FieldJetTable"/>): the table against
/// the exact evaluation off its grid, the closed-form Palatini slope, the fallback where a check fails, and a whole
/// Palatini pivot run with and without the table.
/// </summary>
public class FieldJetTableTests
{
    private static JordanFrameTheory Palatini(double xi)
    {
        var pars = new Dictionary<string, double> { ["xi"] = xi, ["lambda"] = 0.1 };
        return JordanFrameTheory.FromFormulas(Formula.Parse("1 + xi * phi^2", pars), null, Formula.Parse("lambda * phi^4 / 4", pars), palatini: true)
            .WithExtendedPrecision();
    }

    /// <summary>|a - b| against the scale of the exact jet's orders up to <paramref name="order"/>, phi-derivatives taken to u = ln phi.</summary>
    private static double Miss(Jet3 table, Jet3 exact, double phi, int order)
    {
        double[] a = [table.Value, phi * table.D1, phi * phi * table.D2, phi * phi * phi * table.D3];
        double[] e = [exact.Value, phi * exact.D1, phi * phi * exact.D2, phi * phi * phi * exact.D3];
        double scale = 0;
        for (int j = order == 0 ? 0 : 1; j <= order; j++) scale = Math.Max(scale, Math.Abs(e[j]));
        return Math.Abs(a[order] - e[order]) / scale;
    }

    [Theory]
    [InlineData(1e4)]
    [InlineData(1e9)]
    [InlineData(1e12)]
    public void TableAgreesWithTheExactMapOffItsGrid(double xi)
    {
        var theory = Palatini(xi);
        Assert.True(theory.UsesJetTable);
        // From well past the end of inflation (xi phi^2 = 0.01) up to phi = 30, at points that are not grid nodes.
        double lo = Math.Log(0.1 / Math.Sqrt(xi)), hi = Math.Log(30);
        double[] worst = new double[4];
        const int samples = 4000;
        for (int i = 0; i < samples; i++)
        {
            double phi = Math.Exp(lo + (hi - lo) * (i + 0.3183) / samples);
            var t = theory.Jets(phi);
            var e = theory.ExactJets(phi);
            for (int order = 0; order < 4; order++)
                worst[order] = Math.Max(worst[order], Math.Max(Miss(t.Potential, e.Potential, phi, order), Miss(t.Kinetic, e.Kinetic, phi, order)));
        }
        // The build checks' tolerances (quarter points and midpoints), with a factor 3 for points between them.
        Assert.True(worst[0] <= 3 * FieldJetTable.ValueTolerance, $"value {worst[0]:E2}");
        Assert.True(worst[1] <= 3 * FieldJetTable.SlopeTolerance, $"slope {worst[1]:E2}");
        Assert.True(worst[2] <= 3 * FieldJetTable.CurvatureTolerance, $"curvature {worst[2]:E2}");
        Assert.True(worst[3] <= 3 * FieldJetTable.ThirdTolerance, $"third {worst[3]:E2}");
        // Every interval met passed its check: the whole range is served by the table, not by the fallback.
        var (built, failed) = theory.JetTableStatistics();
        Assert.True(built > 1000, $"{built} intervals");
        Assert.Equal(0, failed);
    }

    [Theory]
    [InlineData(1e9)]
    [InlineData(1e12)]
    public void PalatiniSlopeFromTheTableMatchesTheClosedForm(double xi)
    {
        // V = lambda phi^4 / (4 Omega^4), K = 1/Omega^2 with Omega^2 = 1 + xi phi^2: V_phi / (K V) = 4/phi exactly, by
        // hand (the cancellation the double-double map exists for; ExtendedPrecisionTests).
        var theory = Palatini(xi);
        foreach (double phi in new[] { 25.3, 21.7, 3.1, 0.5, 10 / Math.Sqrt(xi) })
        {
            var j = theory.Jets(phi);
            double slope = j.Potential.D1 / (j.Kinetic.Value * j.Potential.Value);
            Assert.True(Math.Abs(slope * phi / 4 - 1) < 3 * FieldJetTable.SlopeTolerance, $"phi = {phi}: {slope * phi / 4 - 1:E2}");
        }
    }

    [Fact]
    public void FailedChecksAndPointsOffTheGridFallBackToTheExactEvaluation()
    {
        // V oscillates 200 times per unit of ln phi above phi = 2 (no quintic on a step of 1/128 follows it) and is NaN
        // below phi = 0.5; between, a smooth power law that the table serves.
        static JetPair Exact(double phi)
        {
            if (phi < 0.5) return new JetPair(new Jet3(double.NaN, double.NaN, double.NaN, double.NaN), Jet3.Constant(1));
            double w = phi > 2 ? 200 : 0;
            double u = Math.Log(phi), s = Math.Sin(w * u), c = Math.Cos(w * u);
            // f = phi^2 (2 + sin(w ln phi)); derivatives in phi by hand.
            double f = phi * phi * (2 + s);
            double f1 = phi * (2 * (2 + s) + w * c);
            double f2 = 2 * (2 + s) + 3 * w * c - w * w * s;
            double f3 = (2 * w * c - 3 * w * w * s - w * w * w * c) / phi;
            return new JetPair(new Jet3(f, f1, f2, f3), new Jet3(1 + phi * phi, 2 * phi, 2, 0));
        }
        var table = new FieldJetTable(Exact);
        foreach (double phi in new[] { 2.5, 3.7, 0.3, 0.0, -1.0, 1e-30, 1e8, double.NaN })
        {
            Assert.False(table.TryInterpolate(phi, out _), $"phi = {phi}");
            var got = table.Evaluate(phi);
            var want = Exact(phi);
            // Bit for bit (NaN included): the exact evaluation answered.
            Assert.Equal(BitConverter.DoubleToInt64Bits(want.Potential.Value), BitConverter.DoubleToInt64Bits(got.Potential.Value));
            Assert.Equal(BitConverter.DoubleToInt64Bits(want.Potential.D1), BitConverter.DoubleToInt64Bits(got.Potential.D1));
        }
        Assert.True(table.TryInterpolate(1.3, out var served));
        Assert.True(Math.Abs(served.Potential.D1 / Exact(1.3).Potential.D1 - 1) < 3 * FieldJetTable.SlopeTolerance);
        var (built, failed) = table.Statistics();
        Assert.True(failed >= 3 && built > failed, $"{built} built, {failed} failed");
    }

    [Fact]
    public void PalatiniPivotRunAgreesWithAndWithoutTheTable()
    {
        // The default run of higgs-like-palatini at xi = 1e9 (N_* from reheating, normalised to A_s) through the table,
        // against the same stages with every V, K evaluated by the double-double map.
        var input = new RunInput { ModelId = new("higgs-like-palatini", "--model") };
        input.Parameters["xi"] = new(1e9, "--param");
        var settings = SettingsResolver.Resolve(input);
        var run = SpectrumPipeline.RunPivot(settings);
        var tabled = Assert.IsType<JordanFrameTheory>(run.Theory);
        Assert.True(tabled.UsesJetTable);
        var direct = tabled.WithoutJetTable();
        Assert.False(direct.UsesJetTable);

        double tolerance = settings.KRange.Tolerance;
        var background = SpectrumPipeline.SolveBackground(direct, settings);
        var pivot = PivotMatcher.Match(background, SpectrumPipeline.PivotSettingsFor(settings), new ExactAmplitude(Math.Min(tolerance, 1e-6)));
        var exact = PivotValues.Compute(pivot.Background, pivot.ToBackgroundUnits(pivot.KPivot), Math.Min(tolerance, 1e-6));

        var a = run.Exact;
        var (ea, eb) = (a.Errors, exact.Errors);
        Assert.True(Math.Abs(pivot.NStar - run.Pivot.NStar) < 1e-6, $"N_* {run.Pivot.NStar} vs {pivot.NStar}");
        Assert.True(Math.Abs(a.Ns - exact.Ns) <= ea.Ns + eb.Ns, $"n_s {a.Ns} vs {exact.Ns} (errors {ea.Ns:E1}, {eb.Ns:E1})");
        Assert.True(Math.Abs(a.R - exact.R) <= ea.R + eb.R, $"r {a.R} vs {exact.R} (errors {ea.R:E1}, {eb.R:E1})");
        Assert.True(Math.Abs(a.AlphaS - exact.AlphaS) <= ea.AlphaS + eb.AlphaS, $"alpha_s {a.AlphaS} vs {exact.AlphaS} (errors {ea.AlphaS:E1}, {eb.AlphaS:E1})");
        Assert.True(Math.Abs(a.Nt - exact.Nt) <= ea.Nt + eb.Nt, $"n_t {a.Nt} vs {exact.Nt} (errors {ea.Nt:E1}, {eb.Nt:E1})");
        Assert.True(Math.Abs(a.Ps / exact.Ps - 1) <= (ea.As + eb.As) / a.Ps, $"P_s {a.Ps} vs {exact.Ps}");
    }
}
