using System.Diagnostics;
using ModeSolver.Tests.Sweeps;

namespace ModeSolver.Tests.Reliability;

/// <summary>
/// The real CLI as a child process whose stdout or stderr is full (<c>/dev/full</c>) or closed, run by the shell in a
/// scratch directory the test makes: a clear exit code (2 when a stream cannot be written; a failure whose line cannot
/// be written keeps its own code), one line on stderr when stderr works, and no file written for <c>--table -</c>.
/// </summary>
public class StandardStreamTests
{
    private const string Full = "/dev/full";
    private const string NoFull = "this system has no /dev/full";
    private static readonly string[] Table = ["spectrum", "--model", "starobinsky", "--k-count", "3", "--k-min", "0.01", "--k-max", "0.1", "--table", "-"];
    private static readonly string[] Background = ["background", "--model", "starobinsky"];

    /// <summary>Runs <c>sh -c 'exec dotnet CLI ARGS REDIRECTION'</c> in a new scratch directory; returns what it printed and left there.</summary>
    private static (int Code, string Out, string Err, string[] Left) Run(string redirection, string[] args, string? deck = null)
    {
        string dir = CliRunner.TempDir("streams");
        Directory.CreateDirectory(dir);
        try
        {
            if (deck is not null) File.WriteAllText(Path.Combine(dir, "deck.toml"), deck);
            var psi = new ProcessStartInfo("sh") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false, WorkingDirectory = dir };
            psi.ArgumentList.Add("-c");
            psi.ArgumentList.Add("exec dotnet \"$@\" " + redirection);
            psi.ArgumentList.Add("sh");
            psi.ArgumentList.Add(MpiTestHost.CliDll);
            foreach (var a in args) psi.ArgumentList.Add(a);
            foreach (var v in new[] { "OMPI_COMM_WORLD_SIZE", "OMPI_COMM_WORLD_RANK", "PMIX_RANK" }) psi.Environment.Remove(v);
            using var p = Process.Start(psi)!;
            var o = p.StandardOutput.ReadToEndAsync();
            var e = p.StandardError.ReadToEndAsync();
            if (!p.WaitForExit(TimeSpan.FromSeconds(120)))
            {
                p.Kill(entireProcessTree: true);
                throw new TimeoutException($"modesolver {string.Join(' ', args)} {redirection} did not finish");
            }
            string[] left = Directory.EnumerateFileSystemEntries(dir).Select(f => Path.GetFileName(f)!).Where(f => f != "deck.toml").ToArray();
            return (p.ExitCode, o.Result, e.Result, left);
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    /// <summary>A full or closed stdout: exit 2, one line naming the stream, nothing left in the directory (with --table -, no file at all).</summary>
    [SkippableTheory]
    [InlineData("> " + Full, false)]
    [InlineData(">&-", false)]
    [InlineData("> " + Full, true)]
    [InlineData(">&-", true)]
    public void A_full_or_closed_stdout_gives_exit_2_one_line_and_no_file(string redirection, bool table)
    {
        Skip.If(redirection.Contains(Full, StringComparison.Ordinal) && !File.Exists(Full), NoFull);
        var (code, _, err, left) = Run(redirection, table ? Table : Background);
        Assert.Equal(2, code);
        string line = Assert.Single(err.TrimEnd('\n').Split('\n'));
        Assert.StartsWith("modesolver: cannot write to standard output: ", line);
        if (redirection.Contains(Full, StringComparison.Ordinal)) Assert.EndsWith("No space left on device", line);
        Assert.Empty(left); // no modesolver-out, no temporary
    }

    /// <summary>
    /// A full stderr: a run with nothing to say there succeeds; a warning that cannot be written gives exit 2 after the
    /// summary; a failure whose line cannot be written still ends with its own code (3 here).
    /// </summary>
    [SkippableFact]
    public void A_full_stderr_keeps_the_results_and_the_exit_code_tells_what_happened()
    {
        Skip.IfNot(File.Exists(Full), NoFull);
        var (ok, okOut, _, okLeft) = Run("2> " + Full, Table);
        Assert.Equal(0, ok);
        Assert.Contains("# columns: k P_s P_t", okOut);
        Assert.Empty(okLeft);

        const string deck = "[model]\ncatalogue = \"starobinsky\"\n[model.parameters]\nunused = 1\n";
        var (warned, warnedOut, _, _) = Run("2> " + Full, ["background", "deck.toml"], deck);
        Assert.Equal(2, warned);
        Assert.Contains("N_*", warnedOut);

        var (failed, failedOut, _, failedLeft) = Run("2> " + Full, [.. Background, "--reheat-T", "1e100"]);
        Assert.Equal(3, failed);
        Assert.Equal("", failedOut);
        Assert.Empty(failedLeft);
    }
}
