using System.Diagnostics;

namespace ModeSolver.Tests.Native;

/// <summary>
/// The native library published once per test run (native AOT, <c>dotnet publish src/ModeSolver.Native</c> into the
/// test output folder; incremental after the first time), the C test programs of tests/native compiled against its
/// header with gcc, and a python3 that has numpy. Tests skip visibly when gcc or python3 with numpy is missing.
/// </summary>
internal static class NativeBuild
{
    /// <summary>Why the C tests skip.</summary>
    public const string NoGcc = "gcc is not installed: apt-get install -y gcc";

    /// <summary>Why the Python tests skip.</summary>
    public const string NoNumpy = "python3 with numpy is not installed: apt-get install -y python3-numpy";

    private static readonly Lazy<string> Published = new(Publish);

    /// <summary>The repository root (the folder holding ModeSolver.sln).</summary>
    public static string Repo { get; } = FindRepo();

    /// <summary>gcc on PATH, or null.</summary>
    public static string? Gcc { get; } = ExternalTools.FindOnPath("gcc");

    /// <summary>A python3 that imports numpy (PATH's python3, then Debian's /usr/bin/python3), or null.</summary>
    public static string? PythonWithNumpy { get; } = FindPython();

    /// <summary>The folder holding libmodesolver.so and modesolver.h (published on first use).</summary>
    public static string LibraryDirectory => Published.Value;

    /// <summary>Compiles tests/native/<paramref name="name"/>.c against the published library; returns the executable.</summary>
    public static string CompileC(string name)
    {
        string lib = LibraryDirectory;
        string exe = Path.Combine(lib, name);
        string src = Path.Combine(Repo, "tests", "native", name + ".c");
        var (code, _, err) = Execute(Gcc!, ["-std=c11", "-O1", "-Wall", "-Wextra", "-Werror", "-I", lib, src, "-o", exe,
            "-L", lib, "-lmodesolver", "-Wl,-rpath," + lib, "-lm", "-pthread"]);
        Assert.True(code == 0, $"gcc failed on {src}:\n{err}");
        return exe;
    }

    /// <summary>
    /// Runs a program in the repository root and returns its exit code, stdout and stderr, with <paramref name="env"/>
    /// added and the variables starting with <paramref name="removePrefix"/> removed.
    /// </summary>
    public static (int Code, string Out, string Err) Execute(string exe, IEnumerable<string> args,
        IReadOnlyDictionary<string, string>? env = null, string? removePrefix = null)
    {
        var psi = new ProcessStartInfo(exe)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            WorkingDirectory = Repo,
        };
        foreach (string a in args) psi.ArgumentList.Add(a);
        if (removePrefix is not null)
            foreach (string key in psi.Environment.Keys.ToList())
                if (key.StartsWith(removePrefix, StringComparison.OrdinalIgnoreCase)) psi.Environment.Remove(key);
        foreach (var (k, v) in env ?? new Dictionary<string, string>()) psi.Environment[k] = v;
        using var p = Process.Start(psi)!;
        var err = p.StandardError.ReadToEndAsync();
        string o = p.StandardOutput.ReadToEnd();
        p.WaitForExit();
        return (p.ExitCode, o, err.Result);
    }

    private static string Publish()
    {
        string dir = Path.Combine(AppContext.BaseDirectory, "native-lib");
        string dotnet = Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") is { Length: > 0 } host && File.Exists(host) ? host : "dotnet";
        // The test host's MSBuild variables would point the child build at this run's build; no build server is left behind.
        var (code, o, e) = Execute(dotnet,
            ["publish", Path.Combine(Repo, "src", "ModeSolver.Native", "ModeSolver.Native.csproj"), "-c", "Release", "-r", "linux-x64",
             "-o", dir, "-nologo", "-v", "q", "-nodeReuse:false", "-p:UseSharedCompilation=false"],
            new Dictionary<string, string> { ["DOTNET_CLI_USE_MSBUILD_SERVER"] = "0", ["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1" },
            removePrefix: "MSBUILD");
        if (code != 0 || !File.Exists(Path.Combine(dir, "libmodesolver.so")) || !File.Exists(Path.Combine(dir, "modesolver.h")))
            throw new InvalidOperationException($"dotnet publish of the native library failed (exit {code}):\n{o}\n{e}");
        return dir;
    }

    private static string? FindPython()
    {
        foreach (string? candidate in new[] { ExternalTools.FindOnPath("python3"), "/usr/bin/python3" })
        {
            if (candidate is null || !File.Exists(candidate)) continue;
            try
            {
                if (Execute(candidate, ["-c", "import numpy"]).Code == 0) return candidate;
            }
            catch (System.ComponentModel.Win32Exception)
            {
                // not runnable: try the next
            }
        }
        return null;
    }

    private static string FindRepo()
    {
        for (var d = new DirectoryInfo(AppContext.BaseDirectory); d is not null; d = d.Parent)
            if (File.Exists(Path.Combine(d.FullName, "ModeSolver.sln"))) return d.FullName;
        throw new DirectoryNotFoundException("ModeSolver.sln not found above " + AppContext.BaseDirectory);
    }
}
