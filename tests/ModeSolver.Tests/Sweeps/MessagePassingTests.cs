using ModeSolver.Cluster;
using ModeSolver.Sweeps;

namespace ModeSolver.Tests.Sweeps;

/// <summary>
/// An in-process stand-in for MPI: each "rank" is a thread, collectives meet at a barrier. Lets the distributed path
/// of the sweep runner be tested without mpirun (the real layer is tested under mpirun below).
/// </summary>
internal sealed class ThreadWorld(int size)
{
    private readonly Barrier _barrier = new(size);
    private readonly object?[] _slots = new object?[size];

    public int Size => size;

    public IMessagePassing Rank(int rank) => new ThreadRank(this, rank);

    private sealed class ThreadRank(ThreadWorld world, int rank) : IMessagePassing
    {
        public int Rank => rank;
        public int Size => world.Size;
        public void Barrier() => world._barrier.SignalAndWait();

        private T[] Exchange<T>(T value)
        {
            world._slots[rank] = value;
            world._barrier.SignalAndWait();
            var all = world._slots.Select(o => (T)o!).ToArray();
            world._barrier.SignalAndWait();
            return all;
        }

        public double[] BroadcastDoubles(double[]? data, int root) => Exchange(data ?? [])[root].ToArray();
        public byte[] BroadcastBytes(byte[]? data, int root) => Exchange(data ?? [])[root].ToArray();
        public double[][]? GatherDoubles(double[] local, int root) { var all = Exchange(local.ToArray()); return rank == root ? all : null; }
        public byte[][]? GatherBytes(byte[] local, int root) { var all = Exchange(local.ToArray()); return rank == root ? all : null; }

        public double[] AllReduceSum(double[] local)
        {
            var all = Exchange(local);
            var sum = new double[local.Length];
            foreach (var a in all) for (int i = 0; i < sum.Length; i++) sum[i] += a[i];
            return sum;
        }

        public void Shutdown() { }
        public void Dispose() { }
    }
}

public class MessagePassingTests
{
    private static readonly SweepSpec Spec = SweepDeck.ParseSpec(SweepTestSupport.Deck);

    [Fact]
    public void SerialLayerIsRankZeroOfOne()
    {
        using var comm = new SerialMessagePassing();
        Assert.Equal(0, comm.Rank);
        Assert.Equal(1, comm.Size);
        Assert.Equal([1.5, 2.5], comm.AllReduceSum([1.5, 2.5]));
        Assert.Equal("abc", comm.BroadcastString("abc", 0));
        Assert.Equal(["x"], comm.GatherStrings("x", 0)!);
        Assert.Throws<ArgumentOutOfRangeException>(() => comm.BroadcastBytes([1], 1));
    }

    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    public void DistributedSweepOverRanksEqualsTheSerialRun(int ranks)
    {
        var reference = SweepTestSupport.ReferenceRun();
        var dir = SweepTestSupport.TempDir($"ranks{ranks}");
        var world = new ThreadWorld(ranks);
        var summaries = new SweepSummary[ranks];
        var threads = Enumerable.Range(0, ranks).Select(r => new Thread(() =>
            summaries[r] = SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(jitterSeed: r + 5), SweepTestSupport.Options(dir, 2), world.Rank(r)))).ToArray();
        foreach (var t in threads) t.Start();
        foreach (var t in threads) Assert.True(t.Join(TimeSpan.FromSeconds(60)));
        Assert.All(summaries, s => Assert.True(s.Completed));
        Assert.Equal(15, summaries[0].Done);
        SweepTestSupport.AssertSameOutputs(reference, dir);
        Assert.Empty(Directory.GetFiles(dir, "journal.rank*"));
    }

    [Fact]
    public void DistributedRunFoldsLeftoverRankJournalsOnResume()
    {
        var reference = SweepTestSupport.ReferenceRun();
        var dir = SweepTestSupport.TempDir("rank-leftover");
        // A killed 2-rank run left rank 1's journal beside an interrupted main journal.
        using var cts = new CancellationTokenSource();
        SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(0, 4, cts), SweepTestSupport.Options(dir, 1), cts.Token);
        var fp = SweepJournal.Fingerprint(Spec, SweepDeck.RemoveSweep(SweepTestSupport.Deck));
        using (var rank1 = SweepJournal.Open(Path.Combine(dir, "journal.rank1.jsonl"), new SweepJournalHeader(fp, 15, ShardSpec.All), true, out _))
            foreach (long i in new long[] { 13, 14 })
                rank1.Append(SweepRunner.EvaluatePoint(Spec, new SyntheticEvaluator(), i, default)!);
        var again = new SyntheticEvaluator();
        var s = SweepRunner.Run(Spec, SweepTestSupport.Deck, again, SweepTestSupport.Options(dir, 1));
        Assert.Equal(6, s.Resumed);
        Assert.DoesNotContain(13L, again.Evaluated);
        SweepTestSupport.AssertSameOutputs(reference, dir);
    }

    [SkippableFact]
    public void MpiCheckOverTwoRanksGathersAndBroadcasts()
    {
        Skip.IfNot(MpiTestHost.MpirunAvailable, MpiTestHost.SkipReason);
        var (code, stdout, stderr) = MpiTestHost.RunModesolver(2, ["mpi-check"]);
        Assert.True(code == 0, stderr);
        Assert.Contains("mpi-check size=2 ranks=0,1 names=r0,r1 sum=3 count=2 bcast=ok", stdout);
    }

    [SkippableFact]
    public void SweepUnderMpirunStopsCleanlyOnEveryRankWithAOneLineError()
    {
        Skip.IfNot(MpiTestHost.MpirunAvailable, MpiTestHost.SkipReason);
        var dir = SweepTestSupport.TempDir("mpi-deck");
        var deck = Path.Combine(dir, "bad.toml");
        File.WriteAllText(deck, "[[sweep.axis]]\nkey = \"efolds\"\nlinear = [50, 60]\n");
        var (code, _, stderr) = MpiTestHost.RunModesolver(2, ["sweep", deck, "--quiet"]);
        Assert.NotEqual(0, code);
        Assert.Contains("'efolds': 'linear' must be [start, stop, count]", stderr);
        Assert.DoesNotContain("   at ", stderr); // no stack trace
    }
}
