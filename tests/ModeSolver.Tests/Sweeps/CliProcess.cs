using System.Diagnostics;

namespace ModeSolver.Tests.Sweeps;

/// <summary>The real CLI as a child process (outside mpirun), for tests that need real processes: kills, signals, locks.</summary>
internal static class CliProcess
{
    public static int JournalPoints(string journal)
    {
        try
        {
            using var s = new FileStream(journal, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete);
            using var r = new StreamReader(s);
            int lines = 0;
            while (r.ReadLine() is not null) lines++;
            return Math.Max(0, lines - 1); // the first line is the header
        }
        catch (IOException)
        {
            return 0;
        }
    }

    public static ProcessStartInfo StartInfo(string[] args)
    {
        var psi = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add(MpiTestHost.CliDll);
        foreach (var a in args) psi.ArgumentList.Add(a);
        // A child of the test host must not believe it runs under mpirun.
        foreach (var v in new[] { "OMPI_COMM_WORLD_SIZE", "OMPI_COMM_WORLD_RANK", "PMIX_RANK" }) psi.Environment.Remove(v);
        return psi;
    }

    public static (int ExitCode, string Stdout, string Stderr) Run(string[] args)
    {
        using var p = Process.Start(StartInfo(args))!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(TimeSpan.FromSeconds(120)))
        {
            p.Kill(entireProcessTree: true);
            throw new TimeoutException($"modesolver {string.Join(' ', args)} did not finish");
        }
        return (p.ExitCode, stdout.Result, stderr.Result);
    }

    /// <summary>Sends a signal (e.g. "INT") to a process through the system's kill command.</summary>
    public static void Signal(Process p, string name)
    {
        using var kill = Process.Start(new ProcessStartInfo("kill") { ArgumentList = { "-" + name, p.Id.ToString(System.Globalization.CultureInfo.InvariantCulture) }, UseShellExecute = false })!;
        kill.WaitForExit();
    }
}
