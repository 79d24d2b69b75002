namespace ModeSolver.Integrators;

/// <summary>
/// The result of one integration: dense output over [T0, TFinal], located events and work statistics.
/// PUBLIC SURFACE FIXED; the integrator work fills in the storage and the bodies.
/// </summary>
public sealed class OdeSolution
{
    /// <summary>Name of the method that produced it.</summary>
    public string MethodName { get; } = "";
    /// <summary>Start of the range.</summary>
    public double T0 { get; }
    /// <summary>Where the integration ended (TEnd, a terminal event, or where the observer stopped it).</summary>
    public double TFinal { get; }
    /// <summary>Number of components.</summary>
    public int Dimension { get; }
    /// <summary>Why it ended.</summary>
    public OdeStatus Status { get; }
    /// <summary>State at <see cref="TFinal"/>.</summary>
    public double[] FinalState { get; } = Array.Empty<double>();
    /// <summary>Every located event, in order of time.</summary>
    public IReadOnlyList<EventOccurrence> Events { get; } = Array.Empty<EventOccurrence>();
    /// <summary>Work counters.</summary>
    public OdeStatistics Statistics { get; } = new(0, 0, 0, 0, 0, 0);
    /// <summary>Times of the accepted step boundaries, T0 first, TFinal last.</summary>
    public ReadOnlySpan<double> StepTimes => throw new NotImplementedException();

    /// <summary>Dense output: the state at any t between T0 and TFinal, written into <paramref name="y"/> without allocating.</summary>
    public void Evaluate(double t, Span<double> y) => throw new NotImplementedException();

    /// <summary>Dense output of one component.</summary>
    public double Evaluate(double t, int component) => throw new NotImplementedException();
}
