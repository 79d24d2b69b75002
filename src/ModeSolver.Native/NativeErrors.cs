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
    public const int Ok = ExitCodes.Ok;

    /// <summary>An internal error (a bug: please report it).</summary>
    public const int Internal = ExitCodes.Internal;

    /// <summary>Bad input: deck, formula, key, value, range.</summary>
    public const int Input = ExitCodes.Input;

    /// <summary>Physics that cannot be computed.</summary>
    public const int Physics = ExitCodes.Physics;

    /// <summary>Misuse of the interface: a null pointer, a result asked for before the run that makes it, a buffer too small.</summary>
    public const int Usage = ExitCodes.Usage;

    /// <summary>
    /// The code and one-line message of <paramref name="e"/>, classified as the command line does: through
    /// <see cref="ModeSolverException.ExitCode"/> only.
    /// </summary>
    public static (int Code, string Message) Classify(Exception e) => e switch
    {
        ModeSolverException m => (m.ExitCode, m.UserMessage),
        _ => (Internal, $"internal error ({e.GetType().Name}): {e.Message}"),
    };

    /// <summary>Folds a message onto one line.</summary>
    public static string OneLine(string message) => message.Replace("\r", " ").Replace("\n", " ");
}

/// <summary>Misuse of the C interface (code 4).</summary>
internal sealed class UsageException(string message) : ModeSolverException(message)
{
    /// <inheritdoc/>
    public override int ExitCode => ExitCodes.Usage;
}
