using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Output;
using ModeSolver.Physics;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// Maps exceptions to exit codes with one line on stderr: 2 for bad user input (deck, formula, option, range,
/// an output directory that cannot be written), 3 for physics that cannot be computed, 1 for anything else
/// (a bug: please report it). Stack traces only with --debug.
/// </summary>
internal static class CommandErrors
{
    /// <summary>Exit code for bad user input.</summary>
    public const int UserError = 2;

    /// <summary>Exit code for physics that cannot be computed.</summary>
    public const int PhysicsError = 3;

    /// <summary>Exit code for an internal error.</summary>
    public const int InternalError = 1;

    /// <summary>Runs <paramref name="body"/> and turns its failures into exit codes and one-line messages.</summary>
    public static int Guard(Func<int> body)
    {
        try
        {
            return body();
        }
        catch (Exception e) when (e is DeckException or TheoryException or FormulaException or KeyNotFoundException or OutputException)
        {
            string msg = e is KeyNotFoundException k ? k.Message.Trim('\'', '"') : e.Message;
            return Report(e, msg, UserError);
        }
        catch (Exception e) when (e is PhysicsException or IntegrationException)
        {
            string msg = e is IntegrationException ie
                ? $"the integration could not go on at t = {ie.T:G8}: {ie.Message}"
                : e.Message;
            return Report(e, msg, PhysicsError);
        }
        catch (OperationCanceledException e)
        {
            return Report(e, "interrupted", InternalError);
        }
        catch (Exception e) when (!CliApp.Debug)
        {
            return Report(e, $"internal error ({e.GetType().Name}): {e.Message} (run again with --debug for details)", InternalError);
        }
    }

    private static int Report(Exception e, string message, int code)
    {
        Console.Error.WriteLine("modesolver: " + OneLine(message));
        if (CliApp.Debug) Console.Error.WriteLine(e.ToString());
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
