using System.Diagnostics;
using System.Globalization;
using ModeSolver.Sweeps;

namespace ModeSolver.Benchmarks.Sweeps;

/// <summary>
/// `--sweep-scale N [--machinery] [--threads T] [--out DIR]`: a pivot-only T-model sweep of N points (N a multiple of
/// 100: 100 alpha values times N/100 values of N_*, a scenario of our own) through <see cref="SweepRunner"/> with the
/// real evaluator, then the plot, as `modesolver sweep` does. Prints points/s, the peak resident memory (VmHWM) and the
/// resident memory sampled at 10 %, 50 % and 100 % of the points, so that flat memory in N can be read off.
/// `--machinery` replaces the physics by a constant stand-in (not physics) to measure the sweep machinery alone
/// (journal, on-disk index, snapshots, outputs): its time per point is the coordination overhead per point.
/// </summary>
internal static class SweepScaleBenchmark
{
    public static void Run(string[] args)
    {
        long n = long.Parse(args[1], CultureInfo.InvariantCulture);
        bool machinery = args.Contains("--machinery");
        int threads = Option(args, "--threads") is { } t ? int.Parse(t, CultureInfo.InvariantCulture) : Environment.ProcessorCount;
        string dir = Option(args, "--out") ?? Path.Combine(Path.GetTempPath(), $"sweep-scale-{n}-{Environment.ProcessId}");
        if (n < 100 || n % 100 != 0) throw new ArgumentException("N must be a positive multiple of 100");
        string deck = Deck(n / 100);
        var spec = SweepDeck.ParseSpec(deck, "sweep-scale");
        ISweepEvaluator evaluator = machinery ? new ConstantEvaluator() : PipelineSweepEvaluator.FromDeckText(deck, "sweep-scale");
        var samples = new List<string>();
        long next = n / 10;
        var clock = Stopwatch.StartNew();
        var summary = SweepRunner.Run(spec, deck, evaluator, new SweepRunOptions
        {
            OutputDirectory = dir, Threads = threads, Restart = true,
            Progress = p =>
            {
                if (p.Done < next) return;
                samples.Add($"{p.Done} points: {Rss("VmRSS") / 1e6:F0} MB");
                next = next == n / 10 ? n / 2 : long.MaxValue;
            },
            AfterOutputs = () => SweepDensityPlot.Write(dir, spec, SweepResults.Open(dir).Records, new SweepPlotOptions()),
        });
        double seconds = clock.Elapsed.TotalSeconds;
        samples.Add($"end: {Rss("VmRSS") / 1e6:F0} MB");
        Console.WriteLine($"sweep-scale{(machinery ? " (machinery only)" : "")}: {summary.Done} points ({summary.Failed} failed), {threads} threads, "
            + $"{seconds:F1} s wall = {summary.Done / seconds:F0} points/s = {seconds * threads / Math.Max(1, summary.Done) * 1e3:F3} core-ms per point");
        Console.WriteLine($"  peak resident {Rss("VmHWM") / 1e6:F0} MB; resident {string.Join(", ", samples)}");
        foreach (var f in new[] { SweepFiles.Journal, SweepFiles.Csv, SweepFiles.Hdf5, SweepFiles.PlotPng, SweepFiles.PlotSvg })
            Console.WriteLine($"  {f}: {new FileInfo(Path.Combine(dir, f)).Length / 1e6:F1} MB");
        Console.WriteLine($"  output directory: {dir}");
    }

    private static string Deck(long efoldsCount) => $$"""
        # A pivot-only scale scenario of our own: the T-model over alpha and N_*.
        [model]
        catalogue = "t-model"
        [model.parameters]
        alpha = 1.0
        V0 = 1.0e-10
        [start]
        phi0 = 7.5
        [pivot]
        k = 0.05
        efolds = 55
        [normalisation]
        a_s = 2.1e-9
        [sweep]
        families = "efolds"
        [[sweep.axis]]
        key = "param.alpha"
        log = [0.8, 1.25, 100]
        [[sweep.axis]]
        key = "efolds"
        linear = [50, 60, {{efoldsCount}}]
        """;

    private static string? Option(string[] args, string name)
    {
        int i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? args[i + 1] : null;
    }

    /// <summary>A line of /proc/self/status in bytes (Linux), or -1.</summary>
    private static long Rss(string field)
    {
        foreach (var line in File.ReadLines("/proc/self/status"))
            if (line.StartsWith(field + ":", StringComparison.Ordinal))
                return long.Parse(line[(field.Length + 1)..].Trim().Split(' ')[0], CultureInfo.InvariantCulture) * 1024;
        return -1;
    }

    /// <summary>Not physics: fixed formulas of the point's values, so that only the sweep machinery costs time.</summary>
    private sealed class ConstantEvaluator : ISweepEvaluator
    {
        public SweepPointResult Evaluate(SweepPoint point, CancellationToken ct)
        {
            double a = point.Values[0], e = point.Values[1];
            return new SweepPointResult { Ns = 1 - 2 / e, R = 12 * a / (e * e), AlphaS = -2 / (e * e), Nt = -1.5 * a / (e * e), As = 2.1e-9, NStar = e, VScale = 1e-10 * a };
        }
    }
}
