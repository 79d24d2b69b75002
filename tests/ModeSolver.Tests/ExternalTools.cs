using System.Diagnostics;
using System.Globalization;
using System.Text.RegularExpressions;

namespace ModeSolver.Tests;

/// <summary>Finding and running the Debian tools some tests use as references (h5dump, mpirun).</summary>
internal static class ExternalTools
{
    /// <summary>Full path of <paramref name="exe"/> on PATH, or null.</summary>
    public static string? FindOnPath(string exe)
    {
        foreach (var d in (Environment.GetEnvironmentVariable("PATH") ?? "").Split(':', StringSplitOptions.RemoveEmptyEntries))
        {
            string p = Path.Combine(d, exe);
            if (File.Exists(p)) return p;
        }
        return null;
    }

    /// <summary>Runs <paramref name="exe"/> with <paramref name="args"/>, asserts exit code 0, returns stdout.</summary>
    public static string Run(string exe, string args)
    {
        var psi = new ProcessStartInfo(exe, args) { RedirectStandardOutput = true, RedirectStandardError = true };
        using var p = Process.Start(psi)!;
        string o = p.StandardOutput.ReadToEnd();
        string e = p.StandardError.ReadToEnd();
        p.WaitForExit();
        Assert.True(p.ExitCode == 0, $"{exe} {args} failed: {e}");
        return o;
    }

    /// <summary>The numbers of an h5dump DATA block in storage order (index prefixes like "(3):" or "(3,1):" removed).</summary>
    public static double[] H5DumpDataValues(string dump)
    {
        int at = dump.IndexOf("DATA {", StringComparison.Ordinal);
        Assert.True(at >= 0, "no DATA block in h5dump output");
        string body = dump[(at + 6)..];
        body = body[..body.IndexOf('}')];
        body = Regex.Replace(body, @"\(\d+(,\d+)*\):", " "); // "(3):", or "(3,1):" in a 2-D dataset
        return body.Split([',', ' ', '\n', '\t', '\r'], StringSplitOptions.RemoveEmptyEntries)
            .Select(t => double.Parse(t, CultureInfo.InvariantCulture)).ToArray();
    }
}
