using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Output;
using ModeSolver.Physics;

namespace ModeSolver.Native;

/// <summary>
/// Result codes of the C interface (modesolver.h), and exceptions turned into a code and a one-line message. Codes
/// 1 to 3 and the messages are those of the command line's exit codes and error lines (the command prints
/// "modesolver: " before the message); 4 is misuse of the interface itself.
/// </summary>
internal static class NativeErrors
{
    /// <summary>Success.</summary>
    public const int Ok = 0;

    /// <summary>An internal error (a bug: please report it).</summary>
    public const int Internal = 1;

    /// <summary>Bad input: deck, formula, key, value, range.</summary>
    public const int Input = 2;

    /// <summary>Physics that cannot be computed.</summary>
    public const int Physics = 3;

    /// <summary>Misuse of the interface: a null pointer, a result asked for before the run that makes it, a buffer too small.</summary>
    public const int Usage = 4;

    /// <summary>The code and one-line message of <paramref name="e"/>, classified as the command line does.</summary>
    public static (int Code, string Message) Classify(Exception e) => e switch
    {
        UsageException u => (Usage, u.Message),
        KeyNotFoundException k => (Input, k.Message.Trim('\'', '"')),
        DeckException or TheoryException or FormulaException or OutputException => (Input, e.Message),
        IntegrationException ie => (Physics, $"the integration could not go on at t = {ie.T:G8}: {ie.Message}"),
        PhysicsException => (Physics, e.Message),
        _ => (Internal, $"internal error ({e.GetType().Name}): {e.Message}"),
    };

    /// <summary>Folds a message onto one line.</summary>
    public static string OneLine(string message) => message.Replace("\r", " ").Replace("\n", " ");
}

/// <summary>Misuse of the C interface (code 4).</summary>
internal sealed class UsageException(string message) : Exception(message);
