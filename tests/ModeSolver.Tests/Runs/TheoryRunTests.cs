using ModeSolver.Decks;
using ModeSolver.Matching;
using ModeSolver.Models;
using ModeSolver.Pipeline;
using ModeSolver.Runs;

namespace ModeSolver.Tests.Runs;

/// <summary>
/// The programmatic API: a theory written in C# in closed form through <see cref="TheoryRun"/>, against the same
/// formula through the deck path (settings -> SpectrumPipeline, which adapts to TheoryRun).
/// </summary>
public class TheoryRunTests
{
    /// <summary>V = m^2 phi^2 / 2 with its exact derivatives (the README's "From C#" example).</summary>
    private sealed class Quadratic(double m) : IInflatonTheory
    {
        public string Description => $"m^2 phi^2 / 2, m = {m}";
        public Jet3 Potential(double phi) => new(0.5 * m * m * phi * phi, m * m * phi, m * m, 0);
        public Jet3 Kinetic(double phi) => Jet3.Constant(1);
        public bool IsCanonical => true;
        public IReadOnlyList<double> NonSmoothPoints => [];
        public (double Min, double Max) ValidRange => (double.NegativeInfinity, double.PositiveInfinity);
    }

    private const string Deck = """
        [model]
        potential = "m^2*phi^2/2"
        parameters = { m = 1e-5 }
        [start]
        phi0 = 17.5
        [pivot]
        efolds = 55
        [modes]
        k_min = 1e-4
        k_max = 1.0
        count = 24
        tolerance = 1e-6
        """;

    private static readonly RunRequest Request = new()
    {
        Phi0 = 17.5,
        PivotEfolds = 55,
        KMin = 1e-4,
        KMax = 1.0,
        KCount = 24,
        Tolerance = 1e-6,
    };

    [Fact]
    public void AClosedFormTheoryGivesTheDeckFormulasNumbers()
    {
        var viaCode = TheoryRun.Run(new Quadratic(1e-5), Request);
        var viaDeck = SpectrumPipeline.Run(SettingsResolver.Resolve(DeckReader.Parse(Deck, "deck.toml")));
        // The formula's interpreter or generated code and the hand-written jets round differently (m^2 phi^2/2 vs
        // 0.5 m m phi phi), so the two agree to the run's tolerance, not bit for bit.
        double tol = 1e-6;
        Assert.Equal(viaDeck.Pivot.NStar, viaCode.Pivot.NStar, 1e-9);
        Assert.True(Math.Abs(viaCode.Pivot.Ns - viaDeck.Pivot.Ns) <= tol, $"n_s {viaCode.Pivot.Ns} vs {viaDeck.Pivot.Ns}");
        Assert.True(Math.Abs(viaCode.Pivot.R / viaDeck.Pivot.R - 1) <= 10 * tol, $"r {viaCode.Pivot.R} vs {viaDeck.Pivot.R}");
        Assert.True(Math.Abs(viaCode.Pivot.As / viaDeck.Pivot.As - 1) <= 10 * tol, $"A_s {viaCode.Pivot.As} vs {viaDeck.Pivot.As}");
        Assert.True(Math.Abs(viaCode.Pivot.VScale / viaDeck.Pivot.VScale - 1) <= 10 * tol);
        Assert.Equal(viaDeck.Spectrum.K.Length, viaCode.Spectrum.K.Length);
        for (int i = 0; i < viaCode.Spectrum.K.Length; i++)
        {
            Assert.Equal(viaDeck.Spectrum.K[i], viaCode.Spectrum.K[i], 1e-12 * viaDeck.Spectrum.K[i]);
            Assert.True(Math.Abs(viaCode.Spectrum.Ps[i] / viaDeck.Spectrum.Ps[i] - 1) <= 10 * tol, $"P_s at k[{i}]");
        }
        Assert.Equal("theory", viaCode.Model.Id);
        Assert.Equal("55", viaCode.Settings.Get("pivot.efolds"));
    }

    [Fact]
    public void TheDeckPathIsTheCoreRunOfTheSameTheoryBitForBit()
    {
        // The adapter adds only the deck's model description and settings list: the numbers are TheoryRun's.
        var settings = SettingsResolver.Resolve(DeckReader.Parse(Deck, "deck.toml"));
        var viaDeck = SpectrumPipeline.Run(settings);
        var viaCore = TheoryRun.Run(TheoryFactory.Build(settings), SpectrumPipeline.RequestFor(settings));
        Assert.Equal(viaDeck.Pivot.Ns, viaCore.Pivot.Ns);
        Assert.Equal(viaDeck.Pivot.R, viaCore.Pivot.R);
        Assert.Equal(viaDeck.Pivot.As, viaCore.Pivot.As);
        Assert.Equal(viaDeck.Spectrum.Ps.ToArray(), viaCore.Spectrum.Ps.ToArray());
        Assert.Equal(viaDeck.Warnings.ToArray(), viaCore.Warnings.ToArray());
        Assert.Equal("formula", viaDeck.Model.Id);
    }

    [Fact]
    public void ReadmeExampleCompilesAndRuns()
    {
        // The README's "From C#" example, verbatim apart from the class being nested here.
        var report = TheoryRun.Run(new Quadratic(1e-5), new RunRequest
        {
            Phi0 = 17.5,                                       // M_pl units
            Reheating = ReheatingHistory.WithTemperature(0, 1e9), // N_* from w = 0 and T_reh = 10^9 GeV
            KMin = 1e-4, KMax = 1.0, KCount = 24,              // 1/Mpc
        });
        Console.WriteLine($"n_s = {report.Pivot.Ns:F5}, r = {report.Pivot.R:F4}, N_* = {report.Pivot.NStar:F2}");
        // The familiar quadratic-inflation numbers (from memory: n_s ~ 1 - 2/N_*, r ~ 8/N_* at N_* ~ 50-60).
        Assert.InRange(report.Pivot.NStar, 45, 65);
        Assert.InRange(report.Pivot.Ns, 1 - 2.2 / report.Pivot.NStar, 1 - 1.8 / report.Pivot.NStar);
        Assert.InRange(report.Pivot.R, 7.0 / report.Pivot.NStar, 9.0 / report.Pivot.NStar);
    }
}
