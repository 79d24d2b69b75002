using System.Collections.Immutable;
using ModeSolver.Output;
using ModeSolver.Report;

namespace ModeSolver.Tests.Output;

public class OutputTransactionTests
{
    private static Dictionary<string, byte[]> Snapshot(string dir) =>
        Directory.Exists(dir)
            ? Directory.GetFileSystemEntries(dir, "*", SearchOption.AllDirectories)
                .ToDictionary(p => Path.GetRelativePath(dir, p), p => File.Exists(p) ? File.ReadAllBytes(p) : [])
            : [];

    private static void AssertSame(Dictionary<string, byte[]> before, Dictionary<string, byte[]> after)
    {
        Assert.Equal(before.Keys.OrderBy(x => x, StringComparer.Ordinal), after.Keys.OrderBy(x => x, StringComparer.Ordinal));
        foreach (var (k, v) in before) Assert.Equal(v, after[k]);
    }

    private static readonly OutputFile Failing = new("broken.dat", (_, path) =>
    {
        File.WriteAllText(path, "half a file");
        throw new InvalidOperationException("disk on fire");
    });

    [Fact]
    public void Failing_writer_midway_leaves_an_existing_directory_untouched()
    {
        var r = SyntheticReport.Create(modes: 20);
        string dir = SyntheticReport.TempDir();
        try
        {
            File.WriteAllText(Path.Combine(dir, "summary.json"), "{\"old\": true}");
            File.WriteAllText(Path.Combine(dir, "notes.txt"), "keep me");
            var before = Snapshot(dir);

            var ex = Assert.Throws<OutputException>(() =>
                RunOutputs.WriteAll(r, dir, [RunOutputs.Json, RunOutputs.Hdf5, Failing, RunOutputs.Table]));

            Assert.Contains("broken.dat", ex.Message);
            Assert.Contains("disk on fire", ex.Message);
            Assert.DoesNotContain('\n', ex.Message);
            AssertSame(before, Snapshot(dir)); // no temporaries, old summary.json intact, nothing new
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Failing_writer_does_not_leave_a_directory_it_created()
    {
        var r = SyntheticReport.Create(modes: 20);
        string parent = SyntheticReport.TempDir();
        try
        {
            string dir = Path.Combine(parent, "a", "b", "out");
            Assert.Throws<OutputException>(() => RunOutputs.WriteAll(r, dir, [RunOutputs.Json, Failing]));
            Assert.False(Directory.Exists(Path.Combine(parent, "a")));
            Assert.Empty(Directory.GetFileSystemEntries(parent));
        }
        finally { Directory.Delete(parent, true); }
    }

    [Fact]
    public void Failure_while_renaming_into_place_restores_replaced_files()
    {
        var r = SyntheticReport.Create(modes: 20);
        string dir = SyntheticReport.TempDir();
        try
        {
            File.WriteAllText(Path.Combine(dir, "summary.json"), "{\"old\": true}");
            Directory.CreateDirectory(Path.Combine(dir, "run.h5")); // a directory where a file should go: the rename fails
            File.WriteAllText(Path.Combine(dir, "run.h5", "inside.txt"), "x");
            var before = Snapshot(dir);

            var ex = Assert.Throws<OutputException>(() => RunOutputs.WriteAll(r, dir, [RunOutputs.Json, RunOutputs.Hdf5]));
            Assert.Contains("run.h5", ex.Message);
            AssertSame(before, Snapshot(dir));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Success_writes_every_file_and_replaces_old_ones()
    {
        var r = SyntheticReport.Create(modes: 20);
        string parent = SyntheticReport.TempDir();
        try
        {
            string dir = Path.Combine(parent, "new");
            var written = RunOutputs.WriteAll(r, dir, RunOutputs.Standard(plots: false));
            Assert.Equal(new[] { "summary.json", "run.h5", "primordial.dat" }, written.Select(p => Path.GetFileName(p)!).ToArray());
            File.WriteAllText(Path.Combine(dir, "summary.json"), "stale");
            RunOutputs.WriteAll(r, dir, [RunOutputs.Json]);
            Assert.StartsWith("{", File.ReadAllText(Path.Combine(dir, "summary.json")));
            Assert.Equal(3, Directory.GetFiles(dir).Length); // no temporaries or backups left
        }
        finally { Directory.Delete(parent, true); }
    }

    [Fact]
    public void Bad_file_names_are_rejected()
    {
        string dir = SyntheticReport.TempDir();
        try
        {
            using var tx = new OutputTransaction(dir);
            Assert.Throws<ArgumentException>(() => tx.Stage("../escape.txt", p => File.WriteAllText(p, "")));
            tx.Stage("a.txt", p => File.WriteAllText(p, "a"));
            Assert.Throws<ArgumentException>(() => tx.Stage("a.txt", p => File.WriteAllText(p, "a")));
        }
        finally { Directory.Delete(dir, true); }
    }
}

public class RunReportChecksTests
{
    [Fact]
    public void Inconsistent_report_is_rejected_before_any_file_is_touched()
    {
        var r = SyntheticReport.Create(modes: 20);
        var bad = r with { Spectrum = r.Spectrum with { Pt = r.Spectrum.Pt.RemoveAt(0) } };
        string parent = SyntheticReport.TempDir();
        try
        {
            string dir = Path.Combine(parent, "out");
            var ex = Assert.Throws<ArgumentException>(() => RunOutputs.WriteAll(bad, dir, RunOutputs.Standard(plots: false)));
            Assert.Contains("spectrum arrays differ in length", ex.Message);
            Assert.False(Directory.Exists(dir));
            var unsorted = r with { Table = r.Table with { K = r.Table.K.Reverse().ToImmutableArray() } };
            Assert.Contains("table.k", Assert.Throws<ArgumentException>(() => RunReportChecks.Validate(unsorted)).Message);
            RunReportChecks.Validate(r);
        }
        finally { Directory.Delete(parent, true); }
    }

    [Fact]
    public void Log_ticks_below_one_decade_use_mantissa_labels()
    {
        var labels = RunPlots.LogTickList(Math.Log10(2.0e-9), Math.Log10(2.6e-9), labels: true)
            .Where(t => t.Major).Select(t => t.Label).ToArray();
        Assert.True(labels.Length >= 3, string.Join(",", labels));
        Assert.Contains("2.2e-9", labels);
        var wide = RunPlots.LogTickList(-11.2, -8.4, labels: true);
        Assert.Equal(["1e-11", "1e-10", "1e-9"], wide.Where(t => t.Major).Select(t => t.Label).ToArray());
        // m x 10^e (m = 2..9) inside [-11.2, -8.4], counted by hand: 3 in 1e-12 (7e-12..9e-12), 8 in 1e-11, 8 in 1e-10, 2 in 1e-9.
        Assert.Equal(21, wide.Count(t => !t.Major));
    }
}
