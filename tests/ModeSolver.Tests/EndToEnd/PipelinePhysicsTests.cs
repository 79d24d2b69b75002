using ModeSolver.Decks;
using ModeSolver.Diagnostics;
using ModeSolver.Output;
using ModeSolver.Pipeline;
using ModeSolver.Tests.Decks;
using ModeSolver.Report;
using ModeSolver.Results;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>The whole pipeline (library entry point, no files) on models whose slow-roll spectrum must be flagged.</summary>
public class PipelinePhysicsTests
{
    private static RunReport RunDeck(string? deck, RunInput overrides) =>
        SpectrumPipeline.Run(SettingsResolver.Load(deck, overrides), new PipelineOptions { BackgroundSamples = 3000 });

    /// <summary>Linear interpolation of <paramref name="y"/> at <paramref name="x0"/> on increasing <paramref name="x"/>.</summary>
    private static double Interp(IReadOnlyList<double> x, IReadOnlyList<double> y, double x0)
    {
        for (int i = 0; i + 1 < x.Count; i++)
            if (x[i] <= x0 && x0 <= x[i + 1]) return y[i] + (y[i + 1] - y[i]) * (x0 - x[i]) / (x[i + 1] - x[i]);
        throw new ArgumentOutOfRangeException(nameof(x0));
    }

    [Fact]
    public void StepFeatureDeck_FlagsTheKRangeOfTheFeature()
    {
        // The demo deck with a coarser k grid over the part of the window that holds the feature.
        var report = RunDeck(DeckTests.RepoFile("runs/step-feature.toml"), new RunInput
        {
            KMin = new(1e-4, "test"), KMax = new(0.1, "test"), KCount = new(60, "test"), OutDir = new(Path.GetTempPath(), "test"),
        });
        double phiStep = report.Model.Parameters.Single(p => p.Name == "phi_s").Value;
        var bg = report.Background;
        // N where phi crosses the step (phi decreases), and k = aH there relative to the pivot (a = exp N).
        int j = Enumerable.Range(0, bg.N.Length - 1).First(i => bg.Phi[i] >= phiStep && bg.Phi[i + 1] < phiStep);
        double nStep = bg.N[j] + (bg.N[j + 1] - bg.N[j]) * (bg.Phi[j] - phiStep) / (bg.Phi[j] - bg.Phi[j + 1]);
        double hStep = Interp(bg.N, bg.H, nStep), hPivot = Interp(bg.N, bg.H, bg.NPivot);
        double kStep = report.Pivot.KPivot * Math.Exp(nStep - bg.NPivot) * hStep / hPivot;
        Assert.InRange(kStep, 1e-4, 0.05); // the deck puts the feature inside the window, before the pivot

        var spectrumFlags = report.Flags.Where(f => f.Kind == FlagKinds.SpectrumDeviation && f.Quantity == "P_s").ToList();
        Assert.Contains(spectrumFlags, f => f.Lower <= kStep && kStep <= f.Upper);
        // The ringing is large: the worst deviation is tens of percent (the step excites the modes strongly).
        Assert.Contains(spectrumFlags, f => Math.Abs(f.Difference) > 0.2);
        // The background leaves slow roll while crossing the step: |epsilon_2| > 1 around N_step.
        Assert.Contains(report.Flags, f => f.Kind == FlagKinds.BackgroundPhase && f.Quantity.Contains("epsilon_2")
            && f.Lower - 0.3 <= nStep && nStep <= f.Upper + 0.3);
        // Far from the feature (the pivot and above) the spectra agree and nothing is flagged there.
        Assert.DoesNotContain(spectrumFlags, f => f.Upper >= report.Pivot.KPivot);
    }

    [Fact]
    public void InflectionPoint_GrowthBoundAndSlowRollFailureAreReported()
    {
        // Catalogue `inflection` (Garcia-Bellido & Ruiz Morales 2017): an ultra-slow-roll phase about 30 e-folds
        // before the end enhances P_s by ~1e3 - 1e4 at k ~ 1e8 - 1e10 /Mpc (for the default pivot matching).
        var report = RunDeck(null, new RunInput
        {
            ModelId = new("inflection", "test"), KMin = new(2e7, "test"), KMax = new(3e9, "test"), KCount = new(16, "test"),
            Tolerance = new(1e-4, "test"),
        });
        var s = report.Spectrum;
        int dip = 0;
        for (int i = 1; i < s.K.Length; i++) if (s.Ps[i] < s.Ps[dip]) dip = i;
        double kDip = s.K[dip];
        Assert.True(s.Ps[^1] / s.Ps[dip] > 1e4, $"no enhancement: P_s from {s.Ps[dip]:E3} at the dip to {s.Ps[^1]:E3}");
        Assert.True(s.Ps[^1] / s.Ps[0] > 100, "P_s must end well above its level before the dip");

        // Byrnes, Cole & Patil 2019 (JCAP 06, 028): P_s of a single canonical field grows no faster than ~k^4. Right after
        // the interference dip the local index of |A - B k^2|^2 ~ (1 - x^2)^2, x = k/k_dip, is 2 d ln|1 - x^2|/d ln x =
        // 4 x^2/(x^2 - 1) (algebra): above 4 by 4/(x^2 - 1), i.e. 4.5 at x = 3 and falling towards 4 beyond. So compare
        // n_s - 1 with 4.5 from 3 k_dip on; nearer the dip it is dominated by the near-zero of P_s and is not a growth rate.
        double maxSlope = double.NegativeInfinity;
        for (int i = dip; i < s.K.Length; i++)
            if (s.K[i] >= 3 * kDip) maxSlope = Math.Max(maxSlope, s.Ns[i] - 1);
        Assert.True(maxSlope > 2.5, $"the growth after the dip should be steep (max d ln P/d ln k = {maxSlope:F3})");
        Assert.True(maxSlope <= 4.5, $"d ln P_s / d ln k reaches {maxSlope:F3} beyond 3 k_dip");

        // Slow roll is flagged over the enhanced range and the ultra-slow-roll phase is reported.
        Assert.Contains(report.Flags, f => f.Kind == FlagKinds.SpectrumDeviation && f.Quantity == "P_s"
            && f.Lower <= kDip && 3 * kDip <= f.Upper);
        var usr = Assert.Single(report.Flags, f => f.Kind == FlagKinds.BackgroundPhase && f.Quantity.Contains("epsilon_2"));
        Assert.True(usr.Exact > 3, $"peak |epsilon_2| = {usr.Exact} should show ultra-slow roll (> 3)");
    }
}
