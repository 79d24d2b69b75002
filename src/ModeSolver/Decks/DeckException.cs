using ModeSolver.Physics;

namespace ModeSolver.Decks;

/// <summary>
/// Bad run input (deck or command line). The message is one line and names the key and, where known, the file and
/// line, e.g. <c>runs/demo.toml:12: start.phi0 must be a number (got a string)</c>.
/// </summary>
public sealed class DeckException : ModeSolverException
{
    /// <summary>Creates the exception.</summary>
    public DeckException(string message, string? key = null, string? file = null, int? line = null, Exception? inner = null)
        : base(message, inner)
    {
        Key = key;
        File = file;
        Line = line;
    }

    /// <inheritdoc/>
    public override int ExitCode => ExitCodes.Input;

    /// <summary>The deck key (e.g. "start.phi0") or option (e.g. "--phi0") concerned.</summary>
    public string? Key { get; }

    /// <summary>The deck file, when the problem is in one.</summary>
    public string? File { get; }

    /// <summary>1-based line in <see cref="File"/>, when known.</summary>
    public int? Line { get; }
}
