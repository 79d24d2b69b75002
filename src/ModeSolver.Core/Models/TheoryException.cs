using ModeSolver.Physics;

namespace ModeSolver.Models;

/// <summary>A theory that cannot be used where it was asked for (Omega^2 &lt;= 0, K &lt;= 0, V not finite...). One-line message.</summary>
public sealed class TheoryException : ModeSolverException
{
    /// <summary>Creates the exception with a one-line message.</summary>
    public TheoryException(string message) : base(message) { }

    /// <inheritdoc/>
    public override int ExitCode => ExitCodes.Input;

    /// <summary>Field value where the problem was found, when there is one.</summary>
    public double? Phi { get; init; }
}
