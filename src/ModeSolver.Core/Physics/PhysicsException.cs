namespace ModeSolver.Physics;

/// <summary>
/// The physics asked for cannot be computed with these inputs: inflation never ends, too few e-folds, V &lt;= 0,
/// a kinetic start that is too large, a pivot outside the background's range, reheating inputs outside their valid
/// range, or an integration that broke down. The message is one line saying what happened, where (N, phi) and what
/// to change. The command line maps it to exit code 3.
/// </summary>
public sealed class PhysicsException : ModeSolverException
{
    /// <summary>Creates the exception with a one-line message.</summary>
    public PhysicsException(string message) : base(message) { }

    /// <inheritdoc/>
    public override int ExitCode => ExitCodes.Physics;

    /// <summary>Creates the exception with a one-line message and the underlying cause.</summary>
    public PhysicsException(string message, Exception inner) : base(message, inner) { }
}
