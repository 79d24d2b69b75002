using System.CommandLine;

namespace ModeSolver.Cli;

/// <summary>Entry point of the modesolver command: builds the command tree and runs it.</summary>
public static class CliApp
{
    [ThreadStatic] private static bool _debug;

    /// <summary>True while a command runs with --debug (stack traces on errors). Per thread, so in-process tests stay independent.</summary>
    public static bool Debug => _debug;

    /// <summary>Builds the root command. Each sub-command lives in its own file under Commands/ and is added here.</summary>
    public static RootCommand BuildRoot()
    {
        var root = new RootCommand("ModeSolver: exact primordial spectra of inflaton models.");
        // Listed in every command's help; Run removes it from the arguments before parsing.
        root.Options.Add(new Option<bool>("--debug") { Description = "Show stack traces on errors.", Recursive = true });
        // Sub-commands register here, one line each.
        root.Subcommands.Add(Commands.ModelsCommand.Create());
        root.Subcommands.Add(Commands.FrameCommand.Create());
        root.Subcommands.Add(Commands.SpectrumCommand.Create());
        root.Subcommands.Add(Commands.BackgroundCommand.Create());
        root.Subcommands.Add(Commands.SweepCommand.Create());
        root.Subcommands.Add(Commands.SweepMergeCommand.Create());
        root.Subcommands.Add(Commands.MpiCheckCommand.Create());
        return root;
    }

    /// <summary>
    /// Parses and runs; returns the process exit code. Response files (<c>@file</c>) are not read: an argument starting
    /// with '@' is taken as it is. Standard output and error are guarded: a write that fails (full, closed) ends the
    /// command with exit 2 and one line on standard error if that still works.
    /// </summary>
    public static int Run(string[] args)
    {
        ArgumentNullException.ThrowIfNull(args);
        bool debug = Array.IndexOf(args, "--debug") >= 0;
        if (debug) args = Array.FindAll(args, a => a != "--debug");
        bool previous = _debug;
        _debug = debug;
        var (oldOut, oldErr) = (Console.Out, Console.Error);
        var stdout = new GuardedWriter(oldOut, "standard output");
        var stderr = new GuardedWriter(oldErr, "standard error");
        Console.SetOut(stdout);
        Console.SetError(stderr);
        try
        {
            var root = BuildRoot();
            var parse = root.Parse(args, new ParserConfiguration { ResponseFileTokenReplacer = null });
            if (parse.Errors.Count > 0)
            {
                // The most specific error first: an unknown command or argument explains a "command not provided".
                var error = parse.Errors.FirstOrDefault(e => e.Message.StartsWith("Unrecognized", StringComparison.Ordinal)) ?? parse.Errors[0];
                Console.Error.WriteLine("modesolver: " + ModeSolver.Output.TextSafety.Printable(error.Message) + " (see --help)");
                return Commands.CommandErrors.UserError;
            }
            if (parse.Action is System.CommandLine.Help.HelpAction)
            {
                var help = new StringWriter();
                int code = parse.Invoke(new InvocationConfiguration { Output = help, Error = Console.Error, EnableDefaultExceptionHandler = false });
                Console.Out.Write(CleanHelp(help.ToString()));
                return code;
            }
            return parse.Invoke(new InvocationConfiguration { EnableDefaultExceptionHandler = false });
        }
        catch (StandardStreamException e)
        {
            // Help or a parse error could not be printed; commands report this themselves (CommandErrors.Guard).
            if (e.Stream != stderr.Stream)
            {
                try { Console.Error.WriteLine("modesolver: " + e.Message); }
                catch (StandardStreamException) { }
            }
            return Commands.CommandErrors.UserError;
        }
        finally
        {
            Console.SetOut(oldOut);
            Console.SetError(oldErr);
            _debug = previous;
        }
    }

    /// <summary>
    /// The parser's help text with the program named <c>modesolver</c> (not the assembly) and without the
    /// pass-through-arguments boilerplate that commands accepting unmatched tokens get (we refuse such tokens ourselves).
    /// </summary>
    internal static string CleanHelp(string help)
    {
        ArgumentNullException.ThrowIfNull(help);
        var lines = new List<string>();
        string executable = RootCommand.ExecutableName;
        bool skipping = false;
        foreach (string raw in help.Replace("\r\n", "\n").Split('\n'))
        {
            string line = raw.Replace(" [[--] <additional arguments>...]]", "").Replace("ModeSolver.Cli", "modesolver");
            // The usage lines name the running executable (a host process when the CLI runs in-process): always modesolver.
            if (line.StartsWith("  " + executable + " ", StringComparison.Ordinal) || line == "  " + executable)
                line = "  modesolver" + line[(2 + executable.Length)..];
            if (line.StartsWith("Additional Arguments:", StringComparison.Ordinal)) { skipping = true; continue; }
            if (skipping)
            {
                if (line.Length == 0 || line.StartsWith(' ')) continue;
                skipping = false;
            }
            lines.Add(line);
        }
        string text = string.Join(Environment.NewLine, lines).TrimEnd();
        return text + Environment.NewLine;
    }
}
