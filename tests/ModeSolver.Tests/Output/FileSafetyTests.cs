using ModeSolver.Decks;
using ModeSolver.Output;
using ModeSolver.Spectra;

namespace ModeSolver.Tests.Output;

/// <summary>Special files are streamed, never replaced; temporaries are short and cleaned up; decks are bounded.</summary>
public class FileSafetyTests
{
    private static string NewDir()
    {
        string d = Path.Combine(Path.GetTempPath(), "modesolver-safety-" + Guid.NewGuid().ToString("N")[..10]);
        Directory.CreateDirectory(d);
        return d;
    }

    [Fact]
    public void A_named_pipe_is_written_to_directly_and_stays_a_pipe()
    {
        if (!OperatingSystem.IsLinux()) return;
        string dir = NewDir();
        try
        {
            string fifo = Path.Combine(dir, "pipe");
            using (var p = System.Diagnostics.Process.Start("mkfifo", fifo)) p.WaitForExit();
            string? read = null;
            var reader = new Thread(() => read = File.ReadAllText(fifo));
            reader.Start();
            RunOutputs.WriteTable(SyntheticReport.Create(modes: 20), fifo);
            reader.Join();
            Assert.Contains("# columns: k P_s P_t", read);
            Assert.Equal(FileKind.Fifo, FileKinds.Of(fifo));
            Assert.Equal(["pipe"], Directory.GetFileSystemEntries(dir).Select(Path.GetFileName));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void A_link_to_a_regular_file_keeps_its_link_and_the_target_is_replaced()
    {
        string dir = NewDir();
        try
        {
            string target = Path.Combine(dir, "real.dat"), link = Path.Combine(dir, "link.dat");
            File.WriteAllText(target, "old");
            File.CreateSymbolicLink(link, target);
            RunOutputs.WriteTable(SyntheticReport.Create(modes: 20), link);
            Assert.NotNull(new FileInfo(link).LinkTarget);
            Assert.StartsWith("# primordial", File.ReadAllText(target));
            Assert.Equal(2, Directory.GetFileSystemEntries(dir).Length);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Non_regular_entries_are_refused_and_left_alone()
    {
        string dir = NewDir();
        try
        {
            File.CreateSymbolicLink(Path.Combine(dir, "dangling.dat"), Path.Combine(dir, "nowhere"));
            var ex = Assert.Throws<OutputException>(() => RunOutputs.WriteTable(SyntheticReport.Create(modes: 20), Path.Combine(dir, "dangling.dat")));
            Assert.Contains("regular files only", ex.Message);
            Assert.Equal(["dangling.dat"], Directory.GetFileSystemEntries(dir).Select(Path.GetFileName));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void A_250_character_name_is_written_with_a_short_temporary()
    {
        string dir = NewDir();
        try
        {
            string name = new string('t', 250) + ".dat";
            RunOutputs.WriteTable(SyntheticReport.Create(modes: 20), Path.Combine(dir, name));
            Assert.Equal([name], Directory.GetFileSystemEntries(dir).Select(Path.GetFileName));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void A_write_failure_removes_every_temporary_and_backup_and_unwraps_reflection()
    {
        string dir = NewDir();
        try
        {
            File.WriteAllText(Path.Combine(dir, "a.dat"), "old a");
            using var tx = new OutputTransaction(dir);
            tx.Stage("a.dat", p => File.WriteAllText(p, "new a"));
            var ex = Assert.Throws<OutputException>(() => tx.Stage("b.dat", p =>
            {
                File.WriteAllText(p, "half");
                throw new System.Reflection.TargetInvocationException(new IOException("No space left on device"));
            }));
            Assert.Contains("No space left on device", ex.Message);
            Assert.DoesNotContain("target of an invocation", ex.Message);
            Assert.Equal(["a.dat"], Directory.GetFileSystemEntries(dir).Select(Path.GetFileName));
            Assert.Equal("old a", File.ReadAllText(Path.Combine(dir, "a.dat")));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Leftovers_of_killed_runs_are_removed_and_live_ones_kept()
    {
        string dir = NewDir();
        try
        {
            // A process id above the kernel's limit (pid_max is at most 2^22) cannot be running.
            string dead1 = Path.Combine(dir, ".ms-9999999-abcdef01-0.tmp"), dead2 = Path.Combine(dir, ".ms-9999999-abcdef01-1.bak");
            string live = Path.Combine(dir, $".ms-{Environment.ProcessId}-abcdef01-0.tmp");
            string user = Path.Combine(dir, ".ms-notes.tmp");
            foreach (var f in new[] { dead1, dead2, live, user }) File.WriteAllText(f, "x");
            Assert.Equal(2, OutputTransaction.RemoveLeftovers(dir));
            Assert.False(File.Exists(dead1));
            Assert.False(File.Exists(dead2));
            Assert.True(File.Exists(live));
            Assert.True(File.Exists(user));
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void A_deck_over_the_size_limit_is_refused_before_it_is_read_whole()
    {
        string dir = NewDir();
        try
        {
            string path = Path.Combine(dir, "big.toml");
            File.WriteAllText(path, "title = \"" + new string('x', DeckReader.MaxDeckBytes) + "\"\n");
            var ex = Assert.Throws<DeckException>(() => DeckReader.Read(path));
            Assert.Contains("larger than 1 MiB", ex.Message);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Many_distinct_parameter_keys_are_not_reported_as_duplicates()
    {
        var sb = new System.Text.StringBuilder("[model]\npotential = \"m2*phi^2\"\n[model.parameters]\n");
        for (int i = 0; i < 100_000; i++) sb.Append('q').Append(i.ToString("x5", System.Globalization.CultureInfo.InvariantCulture)).Append("=1\n");
        var input = DeckReader.Parse(sb.ToString(), "many.toml");
        Assert.Equal(100_000, input.Parameters.Count);
        sb.Append("q00007=2\n");
        var ex = Assert.Throws<DeckException>(() => DeckReader.Parse(sb.ToString(), "many.toml"));
        Assert.Contains("the key model.parameters.q00007 is defined twice", ex.Message);
    }

    [Fact]
    public void Control_characters_are_shown_as_code_points()
    {
        Assert.Equal("aU+001B[31mb c", TextSafety.Printable("a\u001b[31mb\nc"));
        Assert.Equal("plain", TextSafety.Printable("plain"));
    }
}

/// <summary>One wavenumber asked for gives a one-row table grid.</summary>
public class SingleWavenumberGridTests
{
    [Fact]
    public void Equal_k_min_and_k_max_give_one_row()
    {
        Assert.Equal([0.05], WavenumberGrid.LogSpaced(0.05, 0.05));
        Assert.Throws<ArgumentException>(() => WavenumberGrid.LogSpaced(0.05, 0.01));
    }
}
