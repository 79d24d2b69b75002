namespace ModeSolver.Integrators;

/// <summary>Right-hand side f(t, y) of dy/dt = f(t, y). Must not allocate; writes into <paramref name="dydt"/>.</summary>
public delegate void RightHandSide(double t, ReadOnlySpan<double> y, Span<double> dydt);

/// <summary>Jacobian df/dy at (t, y), written row-major into <paramref name="jacobian"/> (length n*n, entry [i*n + j] = df_i/dy_j).</summary>
public delegate void JacobianFunction(double t, ReadOnlySpan<double> y, Span<double> jacobian);

/// <summary>An event function g(t, y); the integrator locates its sign changes on the dense output.</summary>
public delegate double EventFunction(double t, ReadOnlySpan<double> y);

/// <summary>Called after every accepted step with the new (t, y). Return true to stop the integration there.</summary>
public delegate bool StepObserver(double t, ReadOnlySpan<double> y);

/// <summary>
/// Called after every accepted step with the new (t, y) and, where the method has it at no cost, f(t, y) in
/// <paramref name="dydt"/> (DOP853's first-same-as-last stage: the same call of the right-hand side with the same
/// arguments, so the same bits); <paramref name="dydt"/> is empty where the method has no such stage (Radau IIA steps)
/// and at a terminal event. Return true to stop the integration there.
/// </summary>
public delegate bool StepDerivativeObserver(double t, ReadOnlySpan<double> y, ReadOnlySpan<double> dydt);

/// <summary>Which sign changes of an event function count.</summary>
public enum EventDirection
{
    /// <summary>Both rising and falling zeros.</summary>
    Either,
    /// <summary>g goes from negative to positive (in the direction of integration).</summary>
    Rising,
    /// <summary>g goes from positive to negative (in the direction of integration).</summary>
    Falling,
}

/// <summary>An event to locate: a function, the direction that counts, and whether the integration stops there.</summary>
public sealed record EventSpec(EventFunction Function, EventDirection Direction = EventDirection.Either, bool Terminal = false, string Name = "");

/// <summary>One located zero of an event function.</summary>
/// <param name="EventIndex">Index into <see cref="OdeOptions.Events"/>.</param>
/// <param name="Name">The event's name.</param>
/// <param name="T">Located time (1e-12 relative).</param>
/// <param name="State">State at <paramref name="T"/> from the dense output.</param>
/// <param name="Rising">True if g went from negative to positive.</param>
public sealed record EventOccurrence(int EventIndex, string Name, double T, double[] State, bool Rising);

/// <summary>An initial-value problem: dy/dt = f(t, y), y(T0) = Y0, integrated to TEnd (TEnd &lt; T0 integrates backwards).</summary>
public sealed record OdeProblem(RightHandSide Rhs, double T0, double[] Y0, double TEnd, JacobianFunction? Jacobian = null)
{
    /// <summary>Number of components.</summary>
    public int Dimension => Y0.Length;
}

/// <summary>Tolerances, limits, events and output options of one integration.</summary>
public sealed record OdeOptions
{
    /// <summary>Relative tolerance.</summary>
    public double RelativeTolerance { get; init; } = 1e-8;
    /// <summary>Absolute tolerance for every component (overridden by <see cref="AbsoluteToleranceVector"/>).</summary>
    public double AbsoluteTolerance { get; init; } = 1e-10;
    /// <summary>Optional per-component absolute tolerances.</summary>
    public double[]? AbsoluteToleranceVector { get; init; }
    /// <summary>First trial step; 0 chooses one automatically.</summary>
    public double InitialStep { get; init; }
    /// <summary>Largest step magnitude allowed.</summary>
    public double MaxStep { get; init; } = double.PositiveInfinity;
    /// <summary>Budget of steps (accepted plus rejected); exceeding it fails with <see cref="IntegrationFailure.StepBudgetExhausted"/>.</summary>
    public int MaxSteps { get; init; } = 100_000;
    /// <summary>Events to locate.</summary>
    public IReadOnlyList<EventSpec> Events { get; init; } = Array.Empty<EventSpec>();
    /// <summary>Keep the dense output of every step (needed for <see cref="OdeSolution.Evaluate(double, Span{double})"/> inside the range).</summary>
    public bool DenseOutput { get; init; } = true;
    /// <summary>Optional observer called after each accepted step; returning true stops the integration.</summary>
    public StepObserver? Observer { get; init; }
    /// <summary>
    /// Optional observer called after each accepted step (after <see cref="Observer"/>) with the derivative at the step's
    /// end where the method has it at no cost; returning true stops the integration.
    /// </summary>
    public StepDerivativeObserver? DerivativeObserver { get; init; }
}

/// <summary>Why an integration ended.</summary>
public enum OdeStatus
{
    /// <summary>Reached TEnd.</summary>
    Completed,
    /// <summary>A terminal event stopped it.</summary>
    TerminalEvent,
    /// <summary>The step observer stopped it.</summary>
    StoppedByObserver,
}

/// <summary>Work counters of one integration.</summary>
public sealed record OdeStatistics(
    int AcceptedSteps,
    int RejectedSteps,
    int RhsEvaluations,
    int JacobianEvaluations,
    int Factorizations,
    int MethodSwitches);

/// <summary>Kinds of integration failure; all are reported through <see cref="IntegrationException"/>.</summary>
public enum IntegrationFailure
{
    /// <summary>The step size fell below the round-off limit.</summary>
    StepSizeUnderflow,
    /// <summary>More steps than <see cref="OdeOptions.MaxSteps"/>.</summary>
    StepBudgetExhausted,
    /// <summary>The right-hand side or the state became NaN or infinite.</summary>
    NonFiniteState,
}

/// <summary>An integration that could not go on. Carries the time and the state where it stopped.</summary>
public sealed class IntegrationException : Physics.ModeSolverException
{
    /// <summary>Creates the exception.</summary>
    public IntegrationException(IntegrationFailure failure, double t, double[] state, string message)
        : base(message)
    {
        Failure = failure;
        T = t;
        State = state;
    }

    /// <inheritdoc/>
    public override int ExitCode => Physics.ExitCodes.Physics;

    /// <inheritdoc/>
    public override string UserMessage => $"the integration could not go on at t = {T:G8}: {Message}";

    /// <summary>What went wrong.</summary>
    public IntegrationFailure Failure { get; }
    /// <summary>The time reached.</summary>
    public double T { get; }
    /// <summary>The last good state.</summary>
    public double[] State { get; }
}

/// <summary>An ODE method: turns a problem and options into a solution.</summary>
public interface IOdeMethod
{
    /// <summary>Short name, e.g. "DOP853".</summary>
    string Name { get; }

    /// <summary>Integrates <paramref name="problem"/>; throws <see cref="IntegrationException"/> on failure.</summary>
    OdeSolution Solve(OdeProblem problem, OdeOptions options);
}
