using ModeSolver.Cli;
using ModeSolver.Sweeps;

namespace ModeSolver.Tests.Sweeps;

public class SweepCommandTests
{
    [Fact]
    public void SweepMergeCommandWritesTheUnshardedFilesAndPlots()
    {
        var spec = SweepDeck.ParseSpec(SweepTestSupport.Deck);
        var reference = SweepTestSupport.ReferenceRun();
        var shards = Enumerable.Range(0, 2).Select(i =>
        {
            var d = SweepTestSupport.TempDir($"cli-shard{i}");
            SweepRunner.Run(spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(d, 1, new ShardSpec(i, 2)));
            return d;
        }).ToArray();
        var merged = SweepTestSupport.TempDir("cli-merged");
        Assert.Equal(0, CliApp.Run(["sweep-merge", shards[0], shards[1], "--out", merged]));
        SweepTestSupport.AssertSameOutputs(reference, merged);
        Assert.True(new FileInfo(Path.Combine(merged, SweepFiles.PlotPng)).Length > 0);
        Assert.Equal(2, CliApp.Run(["sweep-merge", shards[0], "--out", SweepTestSupport.TempDir("cli-missing")]));
    }

    [Fact]
    public void SweepCommandRefusesBadInputWithExitCode2()
    {
        var dir = SweepTestSupport.TempDir("cli-sweep");
        var deck = Path.Combine(dir, "deck.toml");
        File.WriteAllText(deck, SweepTestSupport.Deck);
        // The synthetic deck is no valid run deck ([model] name): the evaluator refuses it before anything is written.
        Assert.Equal(2, CliApp.Run(["sweep", deck, "--quiet", "--out", Path.Combine(dir, "out")]));
        Assert.Equal(2, CliApp.Run(["sweep", deck, "--quiet", "--shard", "3/3"]));
        Assert.Equal(2, CliApp.Run(["sweep", Path.Combine(dir, "absent.toml"), "--quiet"]));
        Assert.False(Directory.Exists(Path.Combine(dir, "out")));
    }
}
