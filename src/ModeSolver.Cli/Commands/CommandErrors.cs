using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Cli.Commands;

/// <summary>Maps user-input exceptions to the exit code 2 with one line on stderr (no stack trace).</summary>
internal static class CommandErrors
{
    /// <summary>Exit code for bad user input.</summary>
    public const int UserError = 2;

    /// <summary>Runs <paramref name="body"/>; bad input becomes "modesolver: message" on stderr and exit code 2.</summary>
    public static int Guard(Func<int> body)
    {
        try
        {
            return body();
        }
        catch (Exception e) when (e is DeckException or TheoryException or FormulaException or KeyNotFoundException)
        {
            string msg = e is KeyNotFoundException k ? k.Message.Trim('\'', '"') : e.Message;
            Console.Error.WriteLine("modesolver: " + msg.Replace("\r", " ").Replace("\n", " "));
            return UserError;
        }
    }

    /// <summary>Unknown tokens (options we do not have) as one line, exit 2.</summary>
    public static void ThrowOnUnmatched(System.CommandLine.ParseResult parse)
    {
        if (parse.UnmatchedTokens.Count > 0)
            throw new DeckException($"unknown option or extra argument '{parse.UnmatchedTokens[0]}' (see --help)", parse.UnmatchedTokens[0]);
    }
}
