using System.Collections.Concurrent;
using ModeSolver.Sweeps;
using PureHDF;

namespace ModeSolver.Tests.Sweeps;

/// <summary>
/// A synthetic deterministic evaluator (NOT physics, no outside source): n_s = 1 - 2/N, r = 12 alpha / N^2 with
/// N = "efolds" and alpha = "param.alpha"; the point with alpha == <see cref="FailAlpha"/> and N == <see cref="FailEfolds"/>
/// throws a physics error (a failed point). Optional jitter shuffles the finishing order; optional cancellation after a number of points.
/// </summary>
internal sealed class SyntheticEvaluator : ISweepEvaluator
{
    public const double FailAlpha = 1.0, FailEfolds = 55;
    private readonly int _seed;
    private readonly int _cancelAfter;
    private readonly CancellationTokenSource? _cts;
    private int _calls;

    public SyntheticEvaluator(int jitterSeed = 0, int cancelAfter = -1, CancellationTokenSource? cts = null)
    {
        _seed = jitterSeed;
        _cancelAfter = cancelAfter;
        _cts = cts;
    }

    public ConcurrentBag<long> Evaluated { get; } = [];

    public SweepRecord Evaluate(SweepPoint point, CancellationToken ct)
    {
        if (_seed != 0)
        {
            int ms = new Random(HashCode.Combine(_seed, point.Index)).Next(0, 3);
            if (ms > 0) Thread.Sleep(ms);
        }
        int call = Interlocked.Increment(ref _calls);
        if (_cancelAfter >= 0 && call > _cancelAfter)
        {
            _cts!.Cancel();
            ct.ThrowIfCancellationRequested();
        }
        Evaluated.Add(point.Index);
        double n = point["efolds"], alpha = point.TryGet("param.alpha", out var a) ? a : 1.0;
        if (alpha == FailAlpha && n == FailEfolds) throw new ModeSolver.Physics.PhysicsException("synthetic failure at alpha=1, N=55\nsecond line");
        double ns = 1 - 2 / n, r = 12 * alpha / (n * n);
        double[]? k = null, ps = null, pt = null;
        if (point.WantSpectrum)
        {
            k = [0.001, 0.01, 0.05, 0.1];
            ps = k.Select(x => 2.1e-9 * Math.Pow(x / 0.05, ns - 1)).ToArray();
            pt = ps.Select(x => r * x).ToArray();
        }
        return new SweepRecord
        {
            Index = point.Index, Ok = true,
            Ns = ns, R = r, AlphaS = -2 / (n * n), Nt = -r / 8, As = 2.1e-9, NStar = n, VScale = 1e-10 * alpha,
            Flags = alpha > 10 ? ["large-alpha"] : [], K = k, Ps = ps, Pt = pt,
        };
    }
}

internal static class SweepTestSupport
{
    public const string Deck = """
        # synthetic scenario of our own
        [model]
        name = "plateau-demo"
        scale = 1.0

        [sweep]
        families = "param.alpha"
        markers = "efolds"

        [[sweep.axis]]
        key = "param.alpha"
        log = [0.01, 100.0, 5]

        [[sweep.axis]]
        key = "efolds"
        values = [50, 55, 60]

        [reheat]
        w = 0.0
        """;

    public static string TempDir(string name)
    {
        var dir = Path.Combine(Path.GetTempPath(), "modesolver-sweeps-tests", name + "-" + Guid.NewGuid().ToString("N")[..8]);
        Directory.CreateDirectory(dir);
        return dir;
    }

    public static SweepRunOptions Options(string dir, int threads, ShardSpec? shard = null, bool restart = false) => new()
    {
        OutputDirectory = dir, Threads = threads, Shard = shard ?? ShardSpec.All, Restart = restart, SnapshotInterval = TimeSpan.FromMilliseconds(20),
    };

    /// <summary>Asserts the CSV and HDF5 files of two output directories are byte-identical, and compares the HDF5 datasets read back.</summary>
    public static void AssertSameOutputs(string expectedDir, string actualDir)
    {
        Assert.Equal(File.ReadAllText(Path.Combine(expectedDir, SweepFiles.Csv)), File.ReadAllText(Path.Combine(actualDir, SweepFiles.Csv)));
        Assert.Equal(File.ReadAllBytes(Path.Combine(expectedDir, SweepFiles.Csv)), File.ReadAllBytes(Path.Combine(actualDir, SweepFiles.Csv)));
        AssertSameHdf5(Path.Combine(expectedDir, SweepFiles.Hdf5), Path.Combine(actualDir, SweepFiles.Hdf5));
    }

    public static void AssertSameHdf5(string expectedPath, string actualPath)
    {
        using var e = H5File.OpenRead(expectedPath);
        using var a = H5File.OpenRead(actualPath);
        Assert.Equal(e.Attribute("fingerprint").Read<string>(), a.Attribute("fingerprint").Read<string>());
        Assert.Equal(e.Attribute("done_count").Read<long>(), a.Attribute("done_count").Read<long>());
        Assert.Equal(e.Attribute("keys").Read<string[]>(), a.Attribute("keys").Read<string[]>());
        var ep = e.Group("points");
        var ap = a.Group("points");
        Assert.Equal(ep.Dataset("index").Read<long[]>(), ap.Dataset("index").Read<long[]>());
        foreach (var name in new[] { "n_s", "r", "alpha_s", "n_t", "A_s", "N_star", "V_scale" })
            Assert.Equal(ep.Dataset(name).Read<double[]>(), ap.Dataset(name).Read<double[]>());
        foreach (var name in new[] { "status", "message", "flags" })
            Assert.Equal(ep.Dataset(name).Read<string[]>(), ap.Dataset(name).Read<string[]>());
        foreach (var key in e.Attribute("keys").Read<string[]>())
            Assert.Equal(ep.Group("settings").Dataset(key).Read<double[]>(), ap.Group("settings").Dataset(key).Read<double[]>());
        // PureHDF writes the same bytes for the same content, so the files themselves match too.
        Assert.Equal(File.ReadAllBytes(expectedPath), File.ReadAllBytes(actualPath));
    }

    /// <summary>The uninterrupted serial reference run of <see cref="Deck"/>.</summary>
    public static string ReferenceRun(string deck = Deck)
    {
        var dir = TempDir("reference");
        SweepRunner.Run(SweepDeck.ParseSpec(deck), deck, new SyntheticEvaluator(), Options(dir, 1));
        return dir;
    }
}
