using ModeSolver.Decks;
using ModeSolver.Output;
using ModeSolver.Physics;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// Maps exceptions to exit codes with one line on stderr, through <see cref="ModeSolverException.ExitCode"/> only
/// (<see cref="ExitCodes.Of"/>): 2 for bad user input (deck, formula, option, range, an output directory that cannot be
/// written, standard output or error that cannot be written), 3 for physics that cannot be computed, 1 for anything
/// that is not a <see cref="ModeSolverException"/> (a bug: please report it). Stack traces only with --debug.
/// </summary>
internal static class CommandErrors
{
    /// <summary>Exit code for bad user input.</summary>
    public const int UserError = ExitCodes.Input;

    /// <summary>Exit code for physics that cannot be computed.</summary>
    public const int PhysicsError = ExitCodes.Physics;

    /// <summary>Exit code for an internal error.</summary>
    public const int InternalError = ExitCodes.Internal;

    /// <summary>Runs <paramref name="body"/> and turns its failures into exit codes and one-line messages.</summary>
    public static int Guard(Func<int> body)
    {
        ArgumentNullException.ThrowIfNull(body);
        try
        {
            return body();
        }
        catch (Exception raw) when (!CliApp.Debug || Classify(Unwrap(raw).Error) != InternalError || Unwrap(raw).Error is OperationCanceledException)
        {
            var (e, warnings) = Unwrap(raw);
            int code = Classify(e);
            string msg = e switch
            {
                ModeSolverException m => m.UserMessage,
                OperationCanceledException => "interrupted",
                _ when code == InternalError => $"internal error ({e.GetType().Name}): {e.Message} (run again with --debug for details)",
                _ => e.Message,
            };
            // One line always: warnings found before the failure go onto the error's line.
            if (warnings.Count > 0) msg = msg.TrimEnd('.', ' ');
            foreach (string w in warnings) msg += "; warning: " + w;
            return Report(e, msg, code);
        }
    }

    /// <summary>
    /// Runs a command body whose settings carry <paramref name="warnings"/>: on success the warnings are printed to
    /// <paramref name="error"/> afterwards, one line each; on failure they join the error's single line.
    /// </summary>
    public static int WithWarnings(IReadOnlyList<string> warnings, TextWriter error, Func<int> body)
    {
        ArgumentNullException.ThrowIfNull(warnings);
        ArgumentNullException.ThrowIfNull(error);
        ArgumentNullException.ThrowIfNull(body);
        int code;
        try
        {
            code = body();
        }
        catch (Exception e) when (warnings.Count > 0 && e is not StandardStreamException)
        {
            throw new WarnedFailure(e, warnings);
        }
        foreach (string w in warnings) error.WriteLine("modesolver: warning: " + TextSafety.Printable(w));
        return code;
    }

    /// <summary>A failure with the warnings that preceded it (folded into one line by <see cref="Guard"/>).</summary>
    private sealed class WarnedFailure(Exception inner, IReadOnlyList<string> warnings) : Exception(inner.Message, inner)
    {
        public IReadOnlyList<string> Warnings { get; } = warnings;
    }

    private static (Exception Error, IReadOnlyList<string> Warnings) Unwrap(Exception e)
    {
        IReadOnlyList<string> warnings = [];
        while (true)
        {
            e = OutputTransaction.Innermost(e);
            if (e is WarnedFailure w) { warnings = w.Warnings; e = w.InnerException!; }
            else return (e, warnings);
        }
    }

    private static int Classify(Exception e) => ExitCodes.Of(e);

    private static int Report(Exception e, string message, int code)
    {
        try
        {
            Console.Error.WriteLine("modesolver: " + TextSafety.Printable(message));
            if (CliApp.Debug) Console.Error.WriteLine(e.ToString());
        }
        catch (StandardStreamException)
        {
            // Standard error itself cannot be written: the exit code is all that is left to tell.
        }
        return code;
    }

    /// <summary>Folds a message onto one line.</summary>
    public static string OneLine(string message) => message.Replace("\r", " ").Replace("\n", " ");

    /// <summary>Unknown tokens (options we do not have) as one line, exit 2.</summary>
    public static void ThrowOnUnmatched(System.CommandLine.ParseResult parse)
    {
        if (parse.UnmatchedTokens.Count > 0)
            throw new DeckException($"unknown option or extra argument '{parse.UnmatchedTokens[0]}' (see --help)", parse.UnmatchedTokens[0]);
    }
}
