using System.Diagnostics;

namespace ModeSolver.Tests.Sweeps;

/// <summary>
/// Runs the modesolver CLI (built beside the tests) under <c>mpirun --allow-run-as-root --oversubscribe -np N</c>.
/// For the end-to-end sweep test: <c>var dir = MpiTestHost.RunSweepUnderMpi(2, deckPath);</c> then compare with a
/// serial run (e.g. <see cref="SweepTestSupport.AssertSameOutputs"/>). Guard with
/// <c>Skip.IfNot(MpiTestHost.MpirunAvailable, MpiTestHost.SkipReason)</c>.
/// </summary>
public static class MpiTestHost
{
    /// <summary>The message shown when a test is skipped for want of OpenMPI.</summary>
    public const string SkipReason = "OpenMPI (mpirun and libmpi.so.40) is not installed: apt-get install -y openmpi-bin libopenmpi-dev";

    /// <summary>True when mpirun is on the PATH and libmpi.so.40 can be loaded.</summary>
    public static bool MpirunAvailable => ExternalTools.FindOnPath("mpirun") is not null && System.Runtime.InteropServices.NativeLibrary.TryLoad("libmpi.so.40", out _);

    /// <summary>The CLI assembly built beside the test assembly.</summary>
    public static string CliDll => Path.Combine(AppContext.BaseDirectory, "ModeSolver.Cli.dll");

    /// <summary>Runs <c>mpirun ... -np ranks dotnet modesolver.dll args</c>; returns exit code, stdout and stderr. Kills it after <paramref name="timeout"/>.</summary>
    public static (int ExitCode, string Stdout, string Stderr) RunModesolver(int ranks, string[] args, TimeSpan? timeout = null)
    {
        var psi = new ProcessStartInfo(ExternalTools.FindOnPath("mpirun") ?? "mpirun")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in new[] { "--allow-run-as-root", "--oversubscribe", "-np", ranks.ToString(System.Globalization.CultureInfo.InvariantCulture), "dotnet", CliDll })
            psi.ArgumentList.Add(a);
        foreach (var a in args) psi.ArgumentList.Add(a);
        using var p = Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(timeout ?? TimeSpan.FromSeconds(60)))
        {
            p.Kill(entireProcessTree: true);
            throw new TimeoutException($"mpirun -np {ranks} modesolver {string.Join(' ', args)} did not finish");
        }
        return (p.ExitCode, stdout.Result, stderr.Result);
    }

    /// <summary>Runs <c>modesolver sweep DECK --out DIR --quiet</c> under mpirun and returns DIR; fails the test on a non-zero exit.</summary>
    public static string RunSweepUnderMpi(int ranks, string deckPath, params string[] extraArgs)
    {
        var dir = SweepTestSupport.TempDir("mpi-sweep");
        var (code, stdout, stderr) = RunModesolver(ranks, ["sweep", deckPath, "--out", dir, "--quiet", .. extraArgs], TimeSpan.FromMinutes(5));
        Assert.True(code == 0, $"mpirun sweep exited with {code}: {stderr} {stdout}");
        // A rank's stdout may be a pseudo-terminal: still no terminal control codes in what mpirun passes on.
        Assert.DoesNotContain('\u001b', stdout);
        Assert.DoesNotContain('\u001b', stderr);
        return dir;
    }

}
