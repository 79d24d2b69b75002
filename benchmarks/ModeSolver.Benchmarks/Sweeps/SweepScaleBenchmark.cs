using System.Diagnostics;
using System.Globalization;
using ModeSolver.Cluster;
using ModeSolver.Sweeps;

namespace ModeSolver.Benchmarks.Sweeps;

/// <summary>
/// `--sweep-scale N [--machinery] [--spectra M] [--threads T] [--out DIR]` (also under mpirun): a pivot-only T-model sweep of N points (N a multiple of
/// 100: 100 alpha values times N/100 values of N_*, a scenario of our own) through <see cref="SweepRunner"/> with the
/// real evaluator, then the plot, as `modesolver sweep` does. Prints points/s, the peak resident memory (VmHWM) and the
/// resident memory sampled at 10 %, 50 % and 100 % of the points, so that flat memory in N can be read off.
/// `--machinery` replaces the physics by a constant stand-in (not physics) to measure the sweep machinery alone
/// (journal, on-disk index, snapshots, outputs): its time per point is the coordination overhead per point.
/// `--spectra M` makes it a `spectra = true` sweep with M wavenumbers per point (with `--machinery`, stand-in arrays).
/// Under `mpirun -np R` (give `--out`, the same directory for every rank) each rank runs its share and prints its own
/// line: points it evaluated, its CPU time and its peak resident memory; rank 0 then prints the sweep's line.
/// </summary>
internal static class SweepScaleBenchmark
{
    public static void Run(string[] args)
    {
        long n = long.Parse(args[1], CultureInfo.InvariantCulture);
        bool machinery = args.Contains("--machinery");
        using var comm = MessagePassing.Create();
        int threads = Option(args, "--threads") is { } t ? int.Parse(t, CultureInfo.InvariantCulture) : DefaultThreads(comm);
        string dir = Option(args, "--out") ?? Path.Combine(Path.GetTempPath(), $"sweep-scale-{n}-{Environment.ProcessId}");
        if (n < 100 || n % 100 != 0) throw new ArgumentException("N must be a positive multiple of 100");
        if (comm.Size > 1 && Option(args, "--out") is null) throw new ArgumentException("under mpirun give --out DIR (the same for every rank)");
        int spectra = Option(args, "--spectra") is { } m ? int.Parse(m, CultureInfo.InvariantCulture) : 0;
        string deck = Deck(n / 100, spectra);
        var spec = SweepDeck.ParseSpec(deck, "sweep-scale");
        var evaluator = new CountingEvaluator(machinery ? new ConstantEvaluator(spectra) : PipelineSweepEvaluator.FromDeckText(deck, "sweep-scale"));
        var samples = new List<string>();
        long next = n / comm.Size / 10;
        var clock = Stopwatch.StartNew();
        var summary = SweepRunner.Run(spec, deck, evaluator, new SweepRunOptions
        {
            OutputDirectory = dir, Threads = threads, Restart = true,
            Progress = p =>
            {
                if (p.Done < next) return;
                samples.Add($"{p.Done} points: {Rss("VmRSS") / 1e6:F0} MB");
                next = next == n / comm.Size / 10 ? n / comm.Size / 2 : long.MaxValue;
            },
            AfterOutputs = () => SweepDensityPlot.Write(dir, spec, SweepResults.Open(dir).Records, new SweepPlotOptions()),
        }, comm);
        double seconds = clock.Elapsed.TotalSeconds;
        double cpu = Process.GetCurrentProcess().TotalProcessorTime.TotalSeconds;
        samples.Add($"end: {Rss("VmRSS") / 1e6:F0} MB");
        string what = machinery ? " (machinery only)" : "";
        if (comm.Size > 1)
        {
            // One line per rank, gathered so that they print in rank order.
            string line = $"  rank {comm.Rank}: {evaluator.Count} points evaluated, {threads} threads, {cpu:F1} s CPU, peak resident {Rss("VmHWM") / 1e6:F0} MB";
            var lines = comm.GatherStrings(line, 0);
            if (comm.Rank != 0) return;
            Console.WriteLine($"sweep-scale{what}: {summary.Done} points ({summary.Failed} failed), {comm.Size} ranks, {seconds:F1} s wall = {summary.Done / seconds:F0} points/s");
            foreach (string l in lines!) Console.WriteLine(l);
            Console.WriteLine($"  rank 0 resident {string.Join(", ", samples)}");
        }
        else
        {
            Console.WriteLine($"sweep-scale{what}: {summary.Done} points ({summary.Failed} failed), {threads} threads, "
                + $"{seconds:F1} s wall = {summary.Done / seconds:F0} points/s; {cpu:F1} s CPU = {cpu / Math.Max(1, summary.Done) * 1e3:F3} CPU-ms per point");
            Console.WriteLine($"  peak resident {Rss("VmHWM") / 1e6:F0} MB; resident {string.Join(", ", samples)}");
        }
        foreach (var f in new[] { SweepFiles.Journal, SweepFiles.Csv, SweepFiles.Hdf5, SweepFiles.PlotPng, SweepFiles.PlotSvg })
            Console.WriteLine($"  {f}: {new FileInfo(Path.Combine(dir, f)).Length / 1e6:F1} MB");
        Console.WriteLine($"  output directory: {dir}");
    }

    /// <summary>All cores, shared between the ranks of one node under mpirun (as `modesolver sweep` does).</summary>
    private static int DefaultThreads(IMessagePassing comm)
    {
        if (comm.Size == 1) return Environment.ProcessorCount;
        int perNode = int.TryParse(Environment.GetEnvironmentVariable("OMPI_COMM_WORLD_LOCAL_SIZE"), out int k) && k > 0 ? k : 1;
        return Math.Max(1, Environment.ProcessorCount / perNode);
    }

    private static string Deck(long efoldsCount, int spectra) => $$"""
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
        {{(spectra > 0 ? $"[modes]\nk_min = 1e-4\nk_max = 1.0\ncount = {spectra}" : "")}}
        [sweep]
        families = "efolds"
        spectra = {{(spectra > 0 ? "true" : "false")}}
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

    /// <summary>Counts the points this process evaluated (its share under MPI).</summary>
    private sealed class CountingEvaluator(ISweepEvaluator inner) : ISweepEvaluator
    {
        private long _count;

        public long Count => Interlocked.Read(ref _count);

        public SweepRecord Evaluate(SweepPoint point, CancellationToken ct)
        {
            Interlocked.Increment(ref _count);
            return inner.Evaluate(point, ct);
        }
    }

    /// <summary>Not physics: fixed formulas of the point's values, so that only the sweep machinery costs time.</summary>
    private sealed class ConstantEvaluator(int count) : ISweepEvaluator
    {
        private int Count { get; } = Math.Max(2, count);

        public SweepRecord Evaluate(SweepPoint point, CancellationToken ct)
        {
            double a = point.Values[0], e = point.Values[1];
            double[]? k = null, ps = null, pt = null;
            if (point.WantSpectrum)
            {
                k = new double[Count]; ps = new double[Count]; pt = new double[Count];
                for (int i = 0; i < Count; i++) { k[i] = 1e-4 * Math.Pow(1e4, i / (Count - 1.0)); ps[i] = 2.1e-9 * Math.Pow(k[i] / 0.05, -2 / e); pt[i] = 12 * a / (e * e) * ps[i]; }
            }
            return new SweepRecord { Index = point.Index, Ok = true, Ns = 1 - 2 / e, R = 12 * a / (e * e), AlphaS = -2 / (e * e), Nt = -1.5 * a / (e * e), As = 2.1e-9, NStar = e, VScale = 1e-10 * a, K = k, Ps = ps, Pt = pt };
        }
    }
}
