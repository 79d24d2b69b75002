using System.Globalization;
using ModeSolver.Sweeps;
using PureHDF;

namespace ModeSolver.Tests.Sweeps;

public class SweepRunnerTests
{
    private static readonly SweepSpec Spec = SweepDeck.ParseSpec(SweepTestSupport.Deck);

    [Fact]
    public void SyntheticSweepWritesSortedRowsAndRecordsTheFailureAndGoesOn()
    {
        var dir = SweepTestSupport.TempDir("synthetic");
        var summary = SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(jitterSeed: 3), SweepTestSupport.Options(dir, 4));
        Assert.True(summary.Completed);
        Assert.Equal(15, summary.Total);
        Assert.Equal(15, summary.Done);
        Assert.Equal(1, summary.Failed);

        var lines = File.ReadAllLines(Path.Combine(dir, SweepFiles.Csv));
        Assert.Equal("index,param.alpha,efolds,n_s,r,alpha_s,n_t,A_s,N_star,V_scale,delta_chi2,beta_iso,cos_delta,T_RS,f_NL_local,flags,status,message", lines[0]);
        Assert.Equal(16, lines.Length);
        for (int i = 1; i < lines.Length; i++) Assert.StartsWith($"{i - 1},", lines[i]);
        // Point 7 = alpha index 2 (alpha = 1), efolds index 1 (N = 55): the synthetic failure, on one line.
        Assert.Equal("7,1,55,,,,,,,,,,,,,,failed,\"synthetic failure at alpha=1, N=55 second line\"", lines[8]);
        // Point 5 = alpha index 1 (0.1), efolds index 2 (N = 60): n_s = 1 - 2/60, r = 12 * 0.1 / 3600.
        var cells = lines[6].Split(',');
        Assert.Equal(0.1, double.Parse(cells[1], CultureInfo.InvariantCulture), 15);
        Assert.Equal(60, double.Parse(cells[2], CultureInfo.InvariantCulture));
        Assert.Equal(1 - 2 / 60.0, double.Parse(cells[3], CultureInfo.InvariantCulture));
        Assert.Equal(12 * Spec.Axes[0].Values[1] / 3600.0, double.Parse(cells[4], CultureInfo.InvariantCulture));
        // delta_chi2: Gaussian distance of (n_s, r) with n_s = 0.9649 +- 0.0042, r = 0 +- 0.018 (physics.md section 9).
        double ns = 1 - 2 / 60.0, r = 12 * Spec.Axes[0].Values[1] / 3600.0;
        double chi2 = Math.Pow((ns - 0.9649) / 0.0042, 2) + Math.Pow(r / 0.018, 2);
        Assert.Equal(chi2, double.Parse(cells[10], CultureInfo.InvariantCulture), 1e-9);
        // One field: the n-field columns (beta_iso, cos_delta, T_RS, f_NL_local) are empty.
        Assert.Equal(["", "", "", ""], cells[11..15]);
        Assert.Equal("ok", cells[16]);
        Assert.EndsWith(",large-alpha,ok,", lines[15]);

        using var h5 = H5File.OpenRead(Path.Combine(dir, SweepFiles.Hdf5));
        var status = h5.Group("points").Dataset("status").Read<string[]>();
        Assert.Equal("failed", status[7]);
        Assert.Equal(14, status.Count(s => s == "ok"));
        Assert.True(double.IsNaN(h5.Group("points").Dataset("n_s").Read<double[]>()[7]));
        Assert.Equal(Spec.Axes[0].Values, h5.Group("grid").Dataset("param.alpha").Read<double[]>());
    }

    [Fact]
    public void ParallelRunEqualsSerialRunByteForByte()
    {
        var serial = SweepTestSupport.ReferenceRun();
        var parallel = SweepTestSupport.TempDir("parallel");
        SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(jitterSeed: 11), SweepTestSupport.Options(parallel, 4));
        SweepTestSupport.AssertSameOutputs(serial, parallel);
    }

    [Theory]
    [InlineData(1, 0)]
    [InlineData(2, 3)]
    [InlineData(3, 7)]
    [InlineData(4, 12)]
    public void KilledRunResumesToIdenticalResults(int seed, int cancelAfter)
    {
        var reference = SweepTestSupport.ReferenceRun();
        var dir = SweepTestSupport.TempDir("resume");
        using var cts = new CancellationTokenSource();
        var first = SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(seed, cancelAfter, cts), SweepTestSupport.Options(dir, 3), cts.Token);
        Assert.False(first.Completed);
        Assert.True(first.Done < 15);

        var second = new SyntheticEvaluator(jitterSeed: seed + 100);
        var summary = SweepRunner.Run(Spec, SweepTestSupport.Deck, second, SweepTestSupport.Options(dir, 3));
        Assert.True(summary.Completed);
        Assert.Equal(first.Done, summary.Resumed);
        Assert.Equal(15 - first.Done, second.Evaluated.Count); // finished points were not computed again
        SweepTestSupport.AssertSameOutputs(reference, dir);
    }

    [Fact]
    public void TruncatedLastJournalLineIsDroppedAndRecomputed()
    {
        var reference = SweepTestSupport.ReferenceRun();
        var dir = SweepTestSupport.TempDir("truncated");
        using var cts = new CancellationTokenSource();
        SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(0, 9, cts), SweepTestSupport.Options(dir, 1), cts.Token);
        string journal = Path.Combine(dir, SweepFiles.Journal);
        var bytes = File.ReadAllBytes(journal);
        // Cut the last complete line in the middle, as a kill during its write would.
        int lastStart = Array.LastIndexOf(bytes, (byte)'\n', bytes.Length - 2) + 1;
        File.WriteAllBytes(journal, bytes[..(lastStart + (bytes.Length - lastStart) / 2)]);
        var (_, before) = SweepJournal.Read(journal, out _);
        Assert.Equal(8, before.Count);

        var summary = SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 2));
        Assert.Equal(8, summary.Resumed);
        SweepTestSupport.AssertSameOutputs(reference, dir);
        var (_, after) = SweepJournal.Read(journal, out long valid);
        Assert.Equal(15, after.Count);
        Assert.Equal(new FileInfo(journal).Length, valid);
    }

    [Fact]
    public void DamagedJournalLineInTheMiddleIsAnErrorNamingTheLine()
    {
        var dir = SweepTestSupport.ReferenceRun();
        string journal = Path.Combine(dir, SweepFiles.Journal);
        var lines = File.ReadAllLines(journal);
        lines[3] = "{\"i\":2,\"ok\":tr";
        File.WriteAllLines(journal, lines);
        var ex = Assert.Throws<SweepException>(() => SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 1)));
        Assert.Contains("line 4", ex.Message);
    }

    [Fact]
    public void ResumingWithADifferentDeckIsRefusedUnlessRestarting()
    {
        var dir = SweepTestSupport.ReferenceRun();
        string other = SweepTestSupport.Deck.Replace("w = 0.0", "w = 0.3");
        var ex = Assert.Throws<SweepException>(() => SweepRunner.Run(Spec, other, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 1)));
        Assert.Contains("different deck", ex.Message);
        Assert.Contains("--restart", ex.Message);
        var s = SweepRunner.Run(Spec, other, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 1, restart: true));
        Assert.Equal(0, s.Resumed);
        Assert.Equal(15, s.Done);
    }

    [Fact]
    public void ShardsMergeToTheUnshardedRun()
    {
        var reference = SweepTestSupport.ReferenceRun();
        var shards = Enumerable.Range(0, 3).Select(i =>
        {
            var d = SweepTestSupport.TempDir($"shard{i}");
            var s = SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(jitterSeed: i + 1), SweepTestSupport.Options(d, 2, new ShardSpec(i, 3)));
            Assert.Equal(5, s.Total);
            return d;
        }).ToArray();
        var merged = SweepTestSupport.TempDir("merged");
        var (_, summary) = SweepMerge.Merge([shards[2], shards[0], shards[1]], merged);
        Assert.Equal(15, summary.Done);
        Assert.Equal(1, summary.Failed);
        SweepTestSupport.AssertSameOutputs(reference, merged);

        var missing = Assert.Throws<SweepException>(() => SweepMerge.Merge([shards[0], shards[2]], SweepTestSupport.TempDir("m2")));
        Assert.Contains("missing shard(s) 1/3", missing.Message);
        var twice = Assert.Throws<SweepException>(() => SweepMerge.Merge([shards[0], shards[0], shards[1]], SweepTestSupport.TempDir("m3")));
        Assert.Contains("already given", twice.Message);
        var wrongShard = Assert.Throws<SweepException>(() =>
            SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(shards[0], 1, new ShardSpec(1, 3))));
        Assert.Contains("shard 0/3", wrongShard.Message);
    }

    [Fact]
    public void IncompleteShardIsRefusedByTheMerge()
    {
        var dirs = Enumerable.Range(0, 2).Select(i => SweepTestSupport.TempDir($"inc{i}")).ToArray();
        SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), SweepTestSupport.Options(dirs[0], 1, new ShardSpec(0, 2)));
        using var cts = new CancellationTokenSource();
        SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(0, 2, cts), SweepTestSupport.Options(dirs[1], 1, new ShardSpec(1, 2)), cts.Token);
        var ex = Assert.Throws<SweepException>(() => SweepMerge.Merge(dirs, SweepTestSupport.TempDir("inc-merged")));
        Assert.Contains("shard 1/2 is incomplete (2 of 7 points)", ex.Message);
    }

    [Fact]
    public void SpectraAreStoredPerPointWhenAskedFor()
    {
        string deck = SweepTestSupport.Deck.Replace("markers = \"efolds\"", "markers = \"efolds\"\nspectra = true");
        var spec = SweepDeck.ParseSpec(deck);
        var dir = SweepTestSupport.TempDir("spectra");
        SweepRunner.Run(spec, deck, new SyntheticEvaluator(), SweepTestSupport.Options(dir, 2));
        using var h5 = H5File.OpenRead(Path.Combine(dir, SweepFiles.Hdf5));
        var k = h5.Group("spectra").Group("00000004").Dataset("k").Read<double[]>();
        var ps = h5.Group("spectra").Group("00000004").Dataset("P_s").Read<double[]>();
        Assert.Equal([0.001, 0.01, 0.05, 0.1], k);
        Assert.Equal(2.1e-9, ps[2]);
        Assert.False(h5.Group("spectra").LinkExists("00000007")); // the failed point has none
        // Streamed point by point: every point's arrays sit in its own group, equal to its journal line.
        var (_, records) = SweepResults.Load(dir);
        Assert.Equal(14, records.Count(r => r.Ok));
        foreach (var r in records.Where(r => r.Ok))
        {
            var g = h5.Group("spectra").Group(r.Index.ToString("D8", System.Globalization.CultureInfo.InvariantCulture));
            Assert.Equal(r.K, g.Dataset("k").Read<double[]>());
            Assert.Equal(r.Ps, g.Dataset("P_s").Read<double[]>());
            Assert.Equal(r.Pt, g.Dataset("P_t").Read<double[]>());
        }
    }

    [Fact]
    public void ProgressReportsEveryPointAtTheEnd()
    {
        var dir = SweepTestSupport.TempDir("progress");
        var seen = new List<SweepProgress>();
        var options = new SweepRunOptions { OutputDirectory = dir, Threads = 2, Progress = p => { lock (seen) seen.Add(p); } };
        SweepRunner.Run(Spec, SweepTestSupport.Deck, new SyntheticEvaluator(), options);
        var last = seen[^1];
        Assert.Equal(15, last.Total);
        Assert.Equal(15, last.Done);
        Assert.Equal(1, last.Failed);
        Assert.True(last.PointsPerSecond > 0);
        Assert.Equal(TimeSpan.Zero, last.Remaining);
    }

    [Fact]
    public void PlotIsWrittenAsPngAndSvgOnLinearAndLogAxes()
    {
        var dir = SweepTestSupport.ReferenceRun();
        var (spec, records) = SweepResults.Load(dir);
        Assert.Equal(15, records.Count);
        SweepPlot.Write(dir, spec, records, new SweepPlotOptions { LogR = true });
        var png = File.ReadAllBytes(Path.Combine(dir, SweepFiles.PlotPng));
        Assert.Equal([0x89, (byte)'P', (byte)'N', (byte)'G'], png[..4]);
        string svg = File.ReadAllText(Path.Combine(dir, SweepFiles.PlotSvg));
        Assert.Contains("<svg", svg);
        Assert.Contains("BICEP/Keck 2021", svg);
        Assert.Contains("1e-3", svg); // a decade tick label of the log axis
        var linear = SweepPlot.Build(spec, records, new SweepPlotOptions());
        Assert.Equal(0, linear.Axes.GetLimits().Bottom);
    }

    [SkippableFact]
    public void HdfFileIsReadableByTheReferenceHdf5Tools()
    {
        // h5dump (HDF Group's hdf5-tools) is the reference reader; skipped where it is not installed.
        string? h5dump = ExternalTools.FindOnPath("h5dump");
        Skip.If(h5dump is null, "h5dump is not installed: apt-get install -y hdf5-tools");
        var dir = SweepTestSupport.ReferenceRun();
        var psi = new System.Diagnostics.ProcessStartInfo(h5dump!, ["-d", "/points/status", Path.Combine(dir, SweepFiles.Hdf5)])
        { RedirectStandardOutput = true, RedirectStandardError = true };
        using var p = System.Diagnostics.Process.Start(psi)!;
        string output = p.StandardOutput.ReadToEnd();
        p.WaitForExit();
        Assert.Equal(0, p.ExitCode);
        Assert.Contains("( 15 )", output);
        Assert.Contains("\"failed\"", output);
    }
}
