namespace ModeSolver.Tests.Reliability;

/// <summary>
/// A failed run leaves its output directory exactly as it was: same entries, same contents (spectrum and frame, a
/// failure before writing and a failure while putting files in place).
/// </summary>
[Collection("ConsoleCapture")]
public class NoPartialFilesTests
{
    private static string NewDir()
    {
        string d = Path.Combine(Path.GetTempPath(), "modesolver-nopartial-" + Guid.NewGuid().ToString("N")[..10]);
        Directory.CreateDirectory(d);
        return d;
    }

    /// <summary>Every entry below <paramref name="dir"/> with its content (files) or a marker (directories).</summary>
    private static SortedDictionary<string, string> Snapshot(string dir)
    {
        var s = new SortedDictionary<string, string>(StringComparer.Ordinal);
        foreach (string e in Directory.EnumerateFileSystemEntries(dir, "*", SearchOption.AllDirectories))
            s[Path.GetRelativePath(dir, e)] = Directory.Exists(e) ? "<dir>" : File.ReadAllText(e);
        return s;
    }

    private static void Seed(string dir)
    {
        File.WriteAllText(Path.Combine(dir, "summary.json"), "{\"old\": true}");
        File.WriteAllText(Path.Combine(dir, "notes.txt"), "kept");
    }

    [Fact]
    public void SpectrumPhysicsFailureLeavesTheDirectoryAsItWas()
    {
        string dir = NewDir();
        try
        {
            Seed(dir);
            var before = Snapshot(dir);
            var (code, _, err) = CliRunner.Run(["spectrum", "--model", "starobinsky", "--k-min", "1e-5", "--k-max", "1e30", "--k-count", "4", "--quiet", "--out", dir]);
            Assert.Equal(3, code);
            Assert.Contains("outside what this background serves", err);
            Assert.Equal(before, Snapshot(dir));
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    [Fact]
    public void SpectrumFailureWhilePuttingFilesInPlaceRollsBack()
    {
        string dir = NewDir();
        try
        {
            Seed(dir);
            // The table cannot be put in place (a directory has its name): summary.json and run.h5 were already
            // renamed into place by then and must be undone, the old summary.json restored.
            Directory.CreateDirectory(Path.Combine(dir, "primordial.dat"));
            var before = Snapshot(dir);
            var (code, _, err) = CliRunner.Run(["spectrum", "--model", "starobinsky", "--k-min", "1e-3", "--k-max", "0.1", "--k-count", "4",
                "--tolerance", "1e-3", "--quiet", "--out", dir]);
            Assert.Equal(2, code);
            Assert.StartsWith("modesolver: ", err);
            Assert.Contains("replaces regular files only", err); // refused before anything is written
            Assert.Contains("primordial.dat", err);
            Assert.Equal(before, Snapshot(dir));
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    [Fact]
    public void SpectrumFailureDoesNotCreateTheOutputDirectory()
    {
        string parent = NewDir();
        try
        {
            string dir = Path.Combine(parent, "new", "out");
            var (code, _, _) = CliRunner.Run(["spectrum", "--model", "monomial", "--efolds", "200", "--quiet", "--out", dir]);
            Assert.Equal(3, code);
            Assert.Empty(Directory.EnumerateFileSystemEntries(parent));
        }
        finally
        {
            Directory.Delete(parent, recursive: true);
        }
    }

    [Fact]
    public void FrameFailureWhilePuttingFilesInPlaceRollsBack()
    {
        string dir = NewDir();
        try
        {
            File.WriteAllText(Path.Combine(dir, "frame.txt"), "old table");
            Directory.CreateDirectory(Path.Combine(dir, "frame-potential.svg"));
            var before = Snapshot(dir);
            var (code, _, err) = CliRunner.Run(["frame", "--model", "higgs-like", "--phi-min", "0", "--phi-max", "0.3", "--points", "20", "--out", dir]);
            Assert.Equal(2, code);
            Assert.StartsWith("modesolver: ", err);
            Assert.Contains("replaces regular files only", err); // refused before anything is written
            Assert.Single(err.TrimEnd().Split('\n'));
            Assert.Equal(before, Snapshot(dir));
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    [Fact]
    public void FrameFailureBeforeWritingLeavesNoDirectory()
    {
        string parent = NewDir();
        try
        {
            string dir = Path.Combine(parent, "frame");
            var (code, _, err) = CliRunner.Run(["frame", "--potential", "phi^4", "--coupling", "1 - phi^2", "--phi-min", "0", "--phi-max", "2", "--out", dir]);
            Assert.Equal(2, code);
            Assert.Contains("Omega^2 <= 0", err);
            Assert.False(Directory.Exists(dir));
        }
        finally
        {
            Directory.Delete(parent, recursive: true);
        }
    }
}
