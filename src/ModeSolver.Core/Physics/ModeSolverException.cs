namespace ModeSolver.Physics;

/// <summary>
/// The exit codes of the command line and the result codes of the C interface, in one place. Every library exception
/// derives from <see cref="ModeSolverException"/> and carries its code; anything else is a bug
/// (<see cref="Internal"/>).
/// </summary>
public static class ExitCodes
{
    /// <summary>Success.</summary>
    public const int Ok = 0;

    /// <summary>An internal error (a bug: please report it), including any exception that is not a <see cref="ModeSolverException"/>.</summary>
    public const int Internal = 1;

    /// <summary>Bad user input: deck, formula, option, key, value, range, a theory that cannot be used, an output that cannot be written.</summary>
    public const int Input = 2;

    /// <summary>Physics that cannot be computed with these inputs.</summary>
    public const int Physics = 3;

    /// <summary>Misuse of the C interface (a null pointer, a result asked for too early, a buffer too small).</summary>
    public const int Usage = 4;

    /// <summary>The code for <paramref name="e"/>: its <see cref="ModeSolverException.ExitCode"/>, else <see cref="Internal"/>.</summary>
    public static int Of(Exception e) => e is ModeSolverException m ? m.ExitCode : Internal;
}

/// <summary>
/// The base of every exception the library throws on purpose. The message is one line saying what is wrong and
/// where; <see cref="ExitCode"/> says which kind of failure it is (see <see cref="ExitCodes"/>). The command line and
/// the native library map exceptions to exit codes through this property only.
/// </summary>
public abstract class ModeSolverException : Exception
{
    /// <summary>Creates the exception with a one-line message and, optionally, the underlying cause.</summary>
    protected ModeSolverException(string message, Exception? inner = null) : base(message, inner) { }

    /// <summary>The command line's exit code (and the C interface's result code) for this failure.</summary>
    public abstract int ExitCode { get; }

    /// <summary>The one-line message shown to the user (defaults to <see cref="Exception.Message"/>).</summary>
    public virtual string UserMessage => Message;
}
