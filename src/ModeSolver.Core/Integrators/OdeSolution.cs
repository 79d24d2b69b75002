namespace ModeSolver.Integrators;

/// <summary>
/// The result of one integration: dense output over [T0, TFinal], located events and work statistics.
/// </summary>
/// <remarks>
/// With <see cref="OdeOptions.DenseOutput"/> false nothing is kept per step: <see cref="StepTimes"/> is then
/// just T0 and TFinal, and <see cref="Evaluate(double, Span{double})"/> answers only at T0 and TFinal.
/// </remarks>
public sealed class OdeSolution
{
    private readonly DenseStore? _store;
    private readonly double[]? _stepTimes;
    private readonly double[] _initialState;

    internal OdeSolution(string methodName, double t0, double tFinal, int dimension, OdeStatus status,
                         double[] finalState, double[] initialState, IReadOnlyList<EventOccurrence> events,
                         OdeStatistics statistics, DenseStore? store, double[]? stepTimes)
    {
        MethodName = methodName;
        T0 = t0;
        TFinal = tFinal;
        Dimension = dimension;
        Status = status;
        FinalState = finalState;
        _initialState = initialState;
        Events = events;
        Statistics = statistics;
        _store = store;
        _stepTimes = stepTimes;
    }

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
    public ReadOnlySpan<double> StepTimes => _store is not null ? _store.Bounds : _stepTimes;

    /// <summary>True if the dense output of every step was kept.</summary>
    public bool HasDenseOutput => _store is not null;

    /// <summary>Dense output: the state at any t between T0 and TFinal, written into <paramref name="y"/> without allocating.</summary>
    /// <exception cref="ArgumentOutOfRangeException">t outside [T0, TFinal] or y of the wrong length.</exception>
    /// <exception cref="InvalidOperationException">Dense output was off and t is neither T0 nor TFinal.</exception>
    public void Evaluate(double t, Span<double> y)
    {
        if (y.Length != Dimension)
            throw new ArgumentOutOfRangeException(nameof(y), $"OdeSolution.Evaluate: y has {y.Length} entries, the solution has {Dimension} components.");
        CheckRange(t);
        if (t == TFinal) { FinalState.CopyTo(y); return; }
        if (t == T0) { _initialState.CopyTo(y); return; }
        if (_store is null) throw NoDense(t);
        _store.Evaluate(t, y);
    }

    /// <summary>Dense output of one component.</summary>
    public double Evaluate(double t, int component)
    {
        if ((uint)component >= (uint)Dimension)
            throw new ArgumentOutOfRangeException(nameof(component), $"OdeSolution.Evaluate: component {component} is outside 0..{Dimension - 1}.");
        CheckRange(t);
        if (t == TFinal) return FinalState[component];
        if (t == T0) return _initialState[component];
        if (_store is null) throw NoDense(t);
        return _store.Evaluate(t, component);
    }

    private void CheckRange(double t)
    {
        double lo = Math.Min(T0, TFinal), hi = Math.Max(T0, TFinal);
        if (!(t >= lo && t <= hi))
            throw new ArgumentOutOfRangeException(nameof(t), $"OdeSolution.Evaluate: t = {t:R} is outside the integrated range [{lo:R}, {hi:R}].");
    }

    private static InvalidOperationException NoDense(double t) =>
        new($"OdeSolution.Evaluate: t = {t:R} needs the dense output, which was off for this integration (OdeOptions.DenseOutput = false).");
}
