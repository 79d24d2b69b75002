using System.Diagnostics;
using ModeSolver.Sweeps;
using PureHDF;

namespace ModeSolver.Tests.Sweeps;

/// <summary>Damage, bugs, empty shards, merge refusals, the directory lock and SIGINT (synthetic evaluator or the real CLI).</summary>
public class SweepSafetyTests
{
    private static readonly SweepSpec Spec = SweepDeck.ParseSpec(SweepTestSupport.Deck);

    [Fact]
    public void OkJournalLineWithoutItsValuesIsRefusedNamingTheLine()
    {
        var dir = SweepTestSupport.ReferenceRun();
        var journal = Path.Combine(dir, SweepFiles.Journal);
        var lines = File.ReadAllLines(journal).ToList();
        lines.Insert(3, "{\"i\":14,\"ok\":true}");
        File.WriteAllText(journal, string.Join('\n', lines) + "\n");
        var ex = Assert.Throws<SweepException>(() => SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 1)));
        Assert.Contains("line 4 is damaged ('n_s' is missing)", ex.Message);
    }

    [Fact]
    public void EmptyShardWritesValidEmptyOutputs()
    {
        var dir = SweepTestSupport.TempDir("empty-shard");
        var summary = SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 1, new ShardSpec(17, 20)));
        Assert.True(summary.Completed);
        Assert.Equal(0, summary.Total);
        Assert.Single(File.ReadAllLines(Path.Combine(dir, SweepFiles.Csv))); // the header only
        using var h5 = H5File.OpenRead(Path.Combine(dir, SweepFiles.Hdf5));
        Assert.Equal(0L, h5.Attribute("done_count").Read<long>());
        Assert.Empty(h5.Group("points").Dataset("n_s").Read<double[]>());
    }

    /// <summary>An evaluator bug (not physics, not input) stops the sweep instead of becoming a failed point.</summary>
    [Fact]
    public void InternalErrorStopsTheSweepAndIsNotAFailedPoint()
    {
        var dir = SweepTestSupport.TempDir("bug");
        var ex = Assert.Throws<SweepInternalException>(() => SweepRunner.Run(Spec, SweepTestSupport.Deck, new BuggyEvaluator(), SweepTestSupport.Options(dir, 1)));
        Assert.Contains("internal error at sweep point #4", ex.Message);
        Assert.Contains("IndexOutOfRangeException", ex.Message);
        var (_, records) = SweepResults.Load(dir);
        Assert.Equal(4, records.Count); // points 0..3, none recorded as failed
        Assert.All(records, r => Assert.True(r.Ok));
    }

    [Fact]
    public void MergeRefusesAnOutputThatIsAShardOrAnotherSweep()
    {
        var shards = Enumerable.Range(0, 2).Select(i =>
        {
            var d = SweepTestSupport.TempDir($"refuse-shard{i}");
            SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(d, 1, new ShardSpec(i, 2)));
            return d;
        }).ToArray();
        var intoShard = Assert.Throws<SweepException>(() => SweepMerge.Merge(shards, shards[1]));
        Assert.Contains("is one of the shards", intoShard.Message);
        var otherDeck = SweepTestSupport.Deck.Replace("[50, 55, 60]", "[50, 55, 61]");
        var other = SweepTestSupport.ReferenceRun(otherDeck);
        var before = File.ReadAllBytes(Path.Combine(other, SweepFiles.Journal));
        var intoOther = Assert.Throws<SweepException>(() => SweepMerge.Merge(shards, other));
        Assert.Contains("holds another sweep (a different deck)", intoOther.Message);
        Assert.Equal(before, File.ReadAllBytes(Path.Combine(other, SweepFiles.Journal)));
        Assert.Equal(2, File.ReadAllLines(Path.Combine(shards[1], SweepFiles.Journal)).Length - 6); // the shard's journal is untouched (header + 7 points)
    }

    /// <summary>Two real processes: the second run into the same directory is refused, naming the first; SIGINT ends the first with its final snapshot.</summary>
    [Fact]
    public async Task SecondRunIsRefusedWhileTheFirstHoldsTheLockAndSigintEndsTheFirstCleanly()
    {
        var dir = SweepTestSupport.TempDir("lock");
        var deck = Path.Combine(dir, "deck.toml");
        File.WriteAllText(deck, """
            [model]
            catalogue = "t-model"
            [model.parameters]
            alpha = 1.0
            [start]
            phi0 = 6.5
            [pivot]
            efolds = 55
            [sweep]
            [[sweep.axis]]
            key = "efolds"
            linear = [46, 64, 100000]
            """);
        // Long enough (minutes) that it cannot finish before the signal even on a loaded machine; killed if the test fails.
        var outDir = Path.Combine(dir, "out");
        string[] args = ["sweep", deck, "--out", outDir, "--quiet", "--threads", "1"];
        using var first = Process.Start(CliProcess.StartInfo(args))!;
        try
        {
            await OverlapThenInterrupt(first, args, outDir);
        }
        finally
        {
            if (!first.HasExited) first.Kill(entireProcessTree: true);
        }
    }

    private static async Task OverlapThenInterrupt(Process first, string[] args, string outDir)
    {
        var firstOut = first.StandardOutput.ReadToEndAsync();
        var firstErr = first.StandardError.ReadToEndAsync();
        var clock = Stopwatch.StartNew();
        string journal = Path.Combine(outDir, SweepFiles.Journal);
        while (CliProcess.JournalPoints(journal) < 2 && clock.Elapsed < TimeSpan.FromSeconds(60) && !first.HasExited) Thread.Sleep(10);
        Assert.False(first.HasExited, "the first sweep ended before the test could overlap it");

        var (code, _, stderr) = CliProcess.Run(args);
        Assert.Equal(2, code);
        Assert.Contains($"in use by another sweep (process {first.Id} on ", stderr);
        Assert.Single(stderr.Trim().Split('\n'));

        CliProcess.Signal(first, "INT");
        Assert.True(first.WaitForExit(TimeSpan.FromSeconds(60)));
        Assert.Equal(130, first.ExitCode);
        string err = (await firstErr).Trim();
        Assert.StartsWith("sweep interrupted: ", err);
        Assert.Single(err.Split('\n'));
        Assert.Equal("", await firstOut);
        // The final snapshot holds every journalled point.
        int points = CliProcess.JournalPoints(journal);
        Assert.Equal(points + 1, File.ReadAllLines(Path.Combine(outDir, SweepFiles.Csv)).Length);
        using var h5 = H5File.OpenRead(Path.Combine(outDir, SweepFiles.Hdf5));
        Assert.Equal((long)points, h5.Attribute("done_count").Read<long>());
    }

    private sealed class BuggyEvaluator : ISweepEvaluator
    {
        private readonly SyntheticEvaluator _inner = new();

        public SweepPointResult Evaluate(SweepPoint point, CancellationToken ct) =>
            point.Index == 4 ? throw new IndexOutOfRangeException("a deliberate bug") : _inner.Evaluate(point, ct);
    }
}
