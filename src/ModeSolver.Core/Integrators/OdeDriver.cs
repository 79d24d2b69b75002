namespace ModeSolver.Integrators;

/// <summary>Chooses the stepper for the next step (a single method, or the stiffness switch).</summary>
internal interface IStepperSelector
{
    /// <summary>The stepper that makes the next step.</summary>
    Stepper Current { get; }

    /// <summary>Called after each accepted step that does not end the integration; may hand the state to another stepper.</summary>
    void AfterAccepted();
}

/// <summary>The one-method selector.</summary>
internal sealed class SingleStepper(Stepper stepper) : IStepperSelector
{
    public Stepper Current { get; } = stepper;
    public void AfterAccepted() { }
}

/// <summary>
/// The integration loop shared by every method: input checks, one accepted step at a time, events located on
/// the step's dense output (Brent's method), the observer, dense storage and the solution.
/// </summary>
internal static class OdeDriver
{
    /// <summary>Checks problem and options; throws <see cref="ArgumentException"/> with a one-line message.</summary>
    public static void Validate(string method, OdeProblem problem, OdeOptions options)
    {
        ArgumentNullException.ThrowIfNull(problem);
        ArgumentNullException.ThrowIfNull(options);
        if (problem.Rhs is null) throw new ArgumentException($"{method}: the problem has no right-hand side.", nameof(problem));
        if (problem.Y0 is null) throw new ArgumentException($"{method}: the problem has no initial state Y0.", nameof(problem));
        if (problem.Y0.Length == 0) throw new ArgumentException($"{method}: the initial state Y0 has no components.", nameof(problem));
        if (!double.IsFinite(problem.T0)) throw new ArgumentException($"{method}: T0 = {problem.T0} is not finite.", nameof(problem));
        if (!double.IsFinite(problem.TEnd)) throw new ArgumentException($"{method}: TEnd = {problem.TEnd} is not finite.", nameof(problem));
        for (int i = 0; i < problem.Y0.Length; i++)
            if (!double.IsFinite(problem.Y0[i]))
                throw new ArgumentException($"{method}: initial state component Y0[{i}] = {problem.Y0[i]} is not finite.", nameof(problem));
        if (!(options.RelativeTolerance > 0) || !double.IsFinite(options.RelativeTolerance))
            throw new ArgumentException($"{method}: RelativeTolerance = {options.RelativeTolerance} must be positive and finite.", nameof(options));
        if (!(options.RelativeTolerance >= 1e-15))
            throw new ArgumentException($"{method}: RelativeTolerance = {options.RelativeTolerance:E2} is below the 1e-15 round-off floor.", nameof(options));
        if (options.AbsoluteToleranceVector is { } av)
        {
            if (av.Length != problem.Dimension)
                throw new ArgumentException($"{method}: AbsoluteToleranceVector has {av.Length} entries, the problem has {problem.Dimension} components.", nameof(options));
            for (int i = 0; i < av.Length; i++)
                if (!(av[i] >= 0) || !double.IsFinite(av[i]))
                    throw new ArgumentException($"{method}: AbsoluteToleranceVector[{i}] = {av[i]} must be non-negative and finite.", nameof(options));
        }
        else if (!(options.AbsoluteTolerance >= 0) || !double.IsFinite(options.AbsoluteTolerance))
        {
            throw new ArgumentException($"{method}: AbsoluteTolerance = {options.AbsoluteTolerance} must be non-negative and finite.", nameof(options));
        }
        if (!(options.MaxStep > 0)) throw new ArgumentException($"{method}: MaxStep = {options.MaxStep} must be positive.", nameof(options));
        if (options.MaxSteps <= 0) throw new ArgumentException($"{method}: MaxSteps = {options.MaxSteps} must be positive.", nameof(options));
        if (!double.IsFinite(options.InitialStep)) throw new ArgumentException($"{method}: InitialStep = {options.InitialStep} is not finite.", nameof(options));
        if (options.Events is null) throw new ArgumentException($"{method}: Events is null (use an empty list).", nameof(options));
        for (int k = 0; k < options.Events.Count; k++)
            if (options.Events[k]?.Function is null)
                throw new ArgumentException($"{method}: event {k} has no function.", nameof(options));
    }

    private struct Pending
    {
        public double T;
        public int Index;
        public bool Rising;
    }

    public static OdeSolution Run(string methodName, OdeProblem problem, OdeOptions options, IStepperSelector selector,
                                  WorkCounters counters)
    {
        int n = problem.Dimension;
        double t0 = problem.T0, tEnd = problem.TEnd;
        bool dense = options.DenseOutput;
        DenseStore? store = dense ? new DenseStore(n, t0) : null;

        var events = options.Events;
        int ne = events.Count;
        double[] gOld = new double[ne], gNew = new double[ne];
        int[] lastSign = new int[ne];
        Pending[] pending = new Pending[ne];
        double[] work = new double[n];
        List<EventOccurrence>? occurrences = null;
        for (int k = 0; k < ne; k++)
        {
            gOld[k] = events[k].Function(t0, problem.Y0);
            lastSign[k] = Math.Sign(gOld[k]);
        }

        OdeStatus status = OdeStatus.Completed;
        double tFinal = t0;
        double[] finalState = (double[])problem.Y0.Clone();

        if (tEnd != t0)
        {
            selector.Current.Start(t0, problem.Y0, options.InitialStep);
            while (true)
            {
                var st = selector.Current;
                st.Advance(tEnd);
                double tNew = st.T;
                if (store is not null) st.StoreDense(store);

                // Events: sign changes between the step ends, located on the step's interpolant.
                int np = 0;
                for (int k = 0; k < ne; k++)
                {
                    var spec = events[k];
                    double g = spec.Function(tNew, st.Y);
                    gNew[k] = g;
                    int s = Math.Sign(g);
                    int prev = lastSign[k];
                    double tk;
                    bool rising;
                    if (prev == 0 || double.IsNaN(g))
                    {
                        lastSign[k] = s;
                        continue;
                    }
                    if (s == 0)
                    {
                        tk = tNew;
                        rising = prev < 0;
                        lastSign[k] = -prev;
                    }
                    else if (s != prev)
                    {
                        lastSign[k] = s;
                        if (gOld[k] == 0) continue; // reported at the previous step end
                        rising = s > 0;
                        tk = LocateRoot(spec.Function, st, work, st.TOld, gOld[k], tNew, g);
                    }
                    else
                    {
                        continue;
                    }
                    bool wanted = spec.Direction switch
                    {
                        EventDirection.Rising => rising,
                        EventDirection.Falling => !rising,
                        _ => true,
                    };
                    if (!wanted) continue;
                    // insertion in time order (direction of integration)
                    int j = np++;
                    while (j > 0 && st.Direction * (pending[j - 1].T - tk) > 0)
                    {
                        pending[j] = pending[j - 1];
                        j--;
                    }
                    pending[j] = new Pending { T = tk, Index = k, Rising = rising };
                }
                (gOld, gNew) = (gNew, gOld);

                bool terminal = false;
                double tStop = tNew;
                for (int p = 0; p < np; p++)
                {
                    var ev = pending[p];
                    var state = new double[n];
                    if (ev.T == tNew) Array.Copy(st.Y, state, n); else st.Interpolate(ev.T, state);
                    occurrences ??= new List<EventOccurrence>();
                    occurrences.Add(new EventOccurrence(ev.Index, events[ev.Index].Name, ev.T, state, ev.Rising));
                    if (events[ev.Index].Terminal)
                    {
                        terminal = true;
                        tStop = ev.T;
                        finalState = state;
                        // later events in the same step at the very same time still count
                        while (p + 1 < np && pending[p + 1].T == tStop)
                        {
                            var same = pending[++p];
                            occurrences.Add(new EventOccurrence(same.Index, events[same.Index].Name, same.T, (double[])state.Clone(), same.Rising));
                        }
                        break;
                    }
                }

                if (terminal)
                {
                    store?.TruncateLast(tStop);
                    tFinal = tStop;
                    status = OdeStatus.TerminalEvent;
                    options.Observer?.Invoke(tStop, finalState);
                    options.DerivativeObserver?.Invoke(tStop, finalState, ReadOnlySpan<double>.Empty);
                    break;
                }

                tFinal = tNew;
                if ((options.Observer is { } obs && obs(tNew, st.Y))
                    || (options.DerivativeObserver is { } dobs && dobs(tNew, st.Y, st.EndDerivative)))
                {
                    status = OdeStatus.StoppedByObserver;
                    finalState = (double[])st.Y.Clone();
                    break;
                }
                if (tNew == tEnd)
                {
                    finalState = (double[])st.Y.Clone();
                    break;
                }
                selector.AfterAccepted();
            }
        }

        var stepTimes = store is null ? (tFinal == t0 ? new[] { t0 } : new[] { t0, tFinal }) : null;
        return new OdeSolution(methodName, t0, tFinal, n, status, finalState, (double[])problem.Y0.Clone(),
            occurrences is null ? Array.Empty<EventOccurrence>() : occurrences.ToArray(),
            counters.ToStatistics(), store, stepTimes);
    }

    /// <summary>
    /// g(t, y(t)) = 0 on the step's interpolant, bracket [a, b] with g(a) g(b) &lt; 0, to a few ulps of t: Brent's
    /// method from <see cref="Numerics.Roots.Brent{TF}"/> with tol = 2 eps |t| + 1e-15 max(|a|, |b|).
    /// </summary>
    internal static double LocateRoot(EventFunction g, Stepper st, double[] y, double a, double fa, double b, double fb)
    {
        double scale = Math.Max(Math.Abs(a), Math.Abs(b));
        var f = new EventOnInterpolant(g, st, y);
        return Numerics.Roots.Brent(ref f, a, fa, b, fb, 2.0 * 2.220446049250313e-16, 1e-15 * scale);
    }

    /// <summary>The event function along the step's interpolant (fills <c>y</c> at each trial time).</summary>
    private readonly struct EventOnInterpolant(EventFunction g, Stepper st, double[] y) : Numerics.IRootFunction
    {
        public double Evaluate(double t)
        {
            st.Interpolate(t, y);
            return g(t, y);
        }
    }
}
