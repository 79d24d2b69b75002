using System.Collections.Immutable;
using ModeSolver.Diagnostics;
using ModeSolver.Output;
using ModeSolver.Report;
using ModeSolver.Results;
using ModeSolver.Spectra;

namespace ModeSolver.Tests.Output;

/// <summary>
/// A synthetic run (demo numbers of our own, not physics): power-law slow-roll spectra, an exact spectrum equal to
/// them times (1 + a Gaussian bump in ln k), and a background with epsilon_1 = 0.5/(N_end - N + 0.5).
/// </summary>
internal static class SyntheticReport
{
    public const double KPivot = 0.05;
    public const double As = 2.1e-9;
    public const double Ns = 0.965;
    public const double R = 0.004;
    public const double BumpK = 1e-3;
    public const double BumpWidth = 0.3;   // in ln k
    public const double BumpHeight = 0.03; // relative
    public const double NEnd = 62.0;

    public static double Bump(double k, double height = BumpHeight) =>
        height * Math.Exp(-Math.Pow(Math.Log(k / BumpK), 2) / (2 * BumpWidth * BumpWidth));

    public static RunReport Create(double bumpHeight = BumpHeight, int modes = 160)
    {
        var k = Log(1e-5, 1.0, modes);
        double nt = -R / 8;
        var ps2 = k.Select(x => As * Math.Pow(x / KPivot, Ns - 1)).ToArray();
        var pt2 = k.Select(x => R * As * Math.Pow(x / KPivot, nt)).ToArray();
        var ps1 = ps2.Select(p => p * 1.002).ToArray();
        var pt1 = pt2.Select(p => p * 0.999).ToArray();
        var ps = k.Select((x, i) => ps2[i] * (1 + Bump(x, bumpHeight))).ToArray();
        var pt = pt2.ToArray();

        int nb = 400;
        var n = Enumerable.Range(0, nb).Select(i => i * (NEnd + 0.25) / (nb - 1)).ToArray();
        var e1 = n.Select(x => 0.5 / (NEnd - x + 0.5)).ToArray();
        var e2 = n.Select(x => 1.0 / (NEnd - x + 0.5)).ToArray();
        var e3 = e2.ToArray();
        var phi = n.Select(x => Math.Sqrt(2 * (NEnd - x + 0.5))).ToArray();
        var dphi = n.Select(x => -1.0 / Math.Sqrt(2 * (NEnd - x + 0.5))).ToArray();
        var h = n.Select(x => 1e-5 * Math.Sqrt(NEnd - x + 0.5)).ToArray();

        var tableK = WavenumberGrid.LogSpaced(1e-6, 10.0);
        var tablePs = tableK.Select(x => As * Math.Pow(x / KPivot, Ns - 1) * (1 + Bump(x, bumpHeight))).ToArray();
        var tablePt = tableK.Select(x => R * As * Math.Pow(x / KPivot, nt)).ToArray();

        var pivot = new PivotResults(Ns, -6.5e-4, R, nt, As, KPivot, NStar: 55.2, PhiStar: 10.6, HStar: 2.3e-5,
            EnergyScaleGeV: 1.38e16, VScale: 4.1e-10, NTotal: 61.75, NReh: 0.0, MaxRelError: 3.2e-6, RhsEvaluationsPerMode: 1834.5);
        var sr = new PivotSlowRoll(
            new ModeSolver.Estimates.SlowRollPrediction("hubble-1", 2.08e-9, 0.00402 * 2.08e-9, 0.9652, 0.00402, -0.000502, double.NaN),
            new ModeSolver.Estimates.SlowRollPrediction("hubble-2", 2.1e-9, 0.00399 * 2.1e-9, 0.96505, 0.00399, -0.0005, -6.3e-4),
            new ModeSolver.Estimates.SlowRollPrediction("potential", 2.09e-9, 0.0041 * 2.09e-9, 0.9648, 0.0041, -0.00051, -6.6e-4));
        var background = new BackgroundSamples(
            [.. n], [.. phi], [.. dphi], [.. h], [.. e1], [.. e2], [.. e3],
            NEnd, NPivot: NEnd - 55.2, WindowStart: 3.0, WindowEnd: 12.2, Epsilon1Crossings: [NEnd]);
        var spectrum = new SpectrumSamples([.. k], [.. ps], [.. pt], [.. ps.Select((p, i) => pt[i] / p)],
            [.. k.Select(_ => Ns)], [.. k.Select(_ => nt)], [.. k.Select(_ => -6.5e-4)], [.. k.Select((_, i) => 1e-6 * (1 + i % 3))]);
        var srs = new SlowRollSpectra([.. k], [.. ps1], [.. pt1], [.. ps2], [.. pt2], [.. k.Select(_ => 0.9652)], [.. k.Select(_ => 0.96505)]);
        var flagSettings = FlagSettings.Default;
        var flags = Flags.Evaluate(pivot, sr, spectrum, srs, background, flagSettings);
        var settings = new ReportSettings(
            [new Setting("k_min", "1e-05"), new Setting("k_max", "1"), new Setting("modes", modes.ToString()), new Setting("tolerance", "1e-06"),
             new Setting("reheating", "instant")],
            flagSettings);
        var model = new ModelInfo("demo-plateau", "Synthetic plateau for output tests", "V0*(1 - exp(-sqrt(2/3)*phi))^2", "1", null,
            [new ModeSolver.Models.ModelParameter("V0", 1e-10)], TheoryFrame.Einstein);
        return new RunReport(model, settings, pivot, sr, background, spectrum, srs,
            new PrimordialTable([.. tableK], [.. tablePs], [.. tablePt]), flags, "exact",
            new RunStatistics(1.25, [new StageTiming("background", 0.05), new StageTiming("modes", 1.1)], modes, 293520, 2),
            ["demo warning: synthetic data"]);
    }

    public static double[] Log(double a, double b, int n) =>
        Enumerable.Range(0, n).Select(i => Math.Exp(Math.Log(a) + i * (Math.Log(b) - Math.Log(a)) / (n - 1))).ToArray();

    public static string TempDir()
    {
        string d = Path.Combine(Path.GetTempPath(), "ms-out-" + Guid.NewGuid().ToString("N")[..10]);
        Directory.CreateDirectory(d);
        return d;
    }
}
