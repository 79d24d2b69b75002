using System.CommandLine;

namespace ModeSolver.Cli;

/// <summary>Entry point of the modesolver command: builds the command tree and runs it.</summary>
public static class CliApp
{
    /// <summary>Builds the root command. Each sub-command lives in its own file under Commands/ and is added here.</summary>
    public static RootCommand BuildRoot()
    {
        var root = new RootCommand("ModeSolver: exact primordial spectra of inflaton models.");
        // Sub-commands register here, one line each.
        root.Subcommands.Add(Commands.ModelsCommand.Create());
        root.Subcommands.Add(Commands.FrameCommand.Create());
        root.Subcommands.Add(Commands.SpectrumCommand.Create());
        root.Subcommands.Add(Commands.SweepCommand.Create());
        root.Subcommands.Add(Commands.SweepMergeCommand.Create());
        root.Subcommands.Add(Commands.MpiCheckCommand.Create());
        return root;
    }

    /// <summary>Parses and runs; returns the process exit code.</summary>
    public static int Run(string[] args)
    {
        var root = BuildRoot();
        return root.Parse(args).Invoke();
    }
}
