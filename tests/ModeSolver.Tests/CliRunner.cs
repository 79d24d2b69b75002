using ModeSolver.Cli;

namespace ModeSolver.Tests;

/// <summary>Tests that swap Console.Out/Error run alone (the console is process-wide).</summary>
[CollectionDefinition("ConsoleCapture", DisableParallelization = true)]
public sealed class ConsoleCaptureCollection;

/// <summary>Runs the CLI in-process with Console.Out and Console.Error captured (callers sit in the ConsoleCapture collection).</summary>
internal static class CliRunner
{
    /// <summary>Runs `modesolver ARGS` and returns the exit code and what it printed.</summary>
    public static (int Code, string Out, string Err) Run(params string[] args)
    {
        var oldOut = Console.Out;
        var oldErr = Console.Error;
        var o = new StringWriter();
        var e = new StringWriter();
        Console.SetOut(o);
        Console.SetError(e);
        try
        {
            int code = CliApp.Run(args);
            return (code, o.ToString(), e.ToString());
        }
        finally
        {
            Console.SetOut(oldOut);
            Console.SetError(oldErr);
        }
    }

    /// <summary>A fresh, not yet existing directory name under the system temp directory.</summary>
    public static string TempDir(string tag) =>
        Path.Combine(Path.GetTempPath(), $"modesolver-tests-{tag}-" + Guid.NewGuid().ToString("N")[..10]);
}
