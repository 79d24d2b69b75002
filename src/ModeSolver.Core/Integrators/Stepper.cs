namespace ModeSolver.Integrators;

/// <summary>
/// One adaptive one-step method as the shared driver sees it: it holds the current accepted (t, y), advances by
/// one accepted step at a time (rejections handled inside), interpolates inside its last step and stores that
/// step's dense output. Work arrays are allocated once, in the constructor.
/// </summary>
internal abstract class Stepper
{
    protected Stepper(OdeProblem problem, OdeOptions options, WorkCounters counters, double fixedStep)
    {
        Rhs = problem.Rhs;
        N = problem.Dimension;
        Counters = counters;
        Direction = problem.TEnd >= problem.T0 ? 1.0 : -1.0;
        Rtol = options.RelativeTolerance;
        Atol = new double[N];
        for (int i = 0; i < N; i++) Atol[i] = options.AbsoluteToleranceVector?[i] ?? options.AbsoluteTolerance;
        HMax = Math.Min(Math.Abs(options.MaxStep), Math.Abs(problem.TEnd - problem.T0));
        FixedStep = Math.Abs(fixedStep);
        Y = new double[N];
        YOld = new double[N];
    }

    protected readonly RightHandSide Rhs;
    protected readonly int N;
    protected readonly WorkCounters Counters;
    protected readonly double[] Atol;
    protected readonly double Rtol;
    protected readonly double HMax;
    /// <summary>+1 forwards, -1 backwards.</summary>
    public readonly double Direction;
    /// <summary>Step magnitude of the fixed-step mode (tests of the order); 0 means adaptive.</summary>
    protected readonly double FixedStep;

    /// <summary>Short name of the method.</summary>
    public abstract string Name { get; }

    /// <summary>Current accepted time.</summary>
    public double T;
    /// <summary>Start of the last accepted step.</summary>
    public double TOld;
    /// <summary>Current accepted state.</summary>
    public double[] Y;
    /// <summary>State at <see cref="TOld"/>.</summary>
    public double[] YOld;
    /// <summary>Signed size of the next trial step.</summary>
    public double HNext;
    /// <summary>Signed size of the last accepted step.</summary>
    public double HLast;

    /// <summary>
    /// f(T, Y) at the current accepted point where the method has computed it with the very arguments (T, Y) as part
    /// of its step (first same as last), else empty.
    /// </summary>
    public virtual ReadOnlySpan<double> EndDerivative => ReadOnlySpan<double>.Empty;

    /// <summary>Sets the state and computes what the method needs to start (derivative, Jacobian, first step).</summary>
    public abstract void Start(double t, ReadOnlySpan<double> y, double hTrial);

    /// <summary>Advances by one accepted step, never beyond <paramref name="tEnd"/> (landing on it exactly).</summary>
    public abstract void Advance(double tEnd);

    /// <summary>Dense output inside the last accepted step.</summary>
    public abstract void Interpolate(double t, Span<double> y);

    /// <summary>Appends the last accepted step's interpolant to <paramref name="store"/>.</summary>
    public abstract void StoreDense(DenseStore store);

    protected void CallRhs(double t, ReadOnlySpan<double> y, Span<double> dydt)
    {
        Rhs(t, y, dydt);
        Counters.Rhs++;
    }

    protected static bool AllFinite(ReadOnlySpan<double> v)
    {
        for (int i = 0; i < v.Length; i++) if (!double.IsFinite(v[i])) return false;
        return true;
    }

    protected IntegrationException NonFinite(string what) =>
        new(IntegrationFailure.NonFiniteState, T, (double[])Y.Clone(),
            $"{Name}: {what} became NaN or infinite after t = {T:R}");

    protected IntegrationException Underflow(double h) =>
        new(IntegrationFailure.StepSizeUnderflow, T, (double[])Y.Clone(),
            $"{Name}: step size {Math.Abs(h):E3} fell below the round-off limit at t = {T:R}");

    /// <summary>True if |h| is too small to move t in floating point.</summary>
    protected bool TooSmall(double h) => h == 0 || Math.Abs(h) <= 10.0 * 2.220446049250313e-16 * Math.Abs(T) || T + h == T;

    /// <summary>Chooses the step for this attempt: the proposal clipped to HMax and to the end (stretched onto the end when close).</summary>
    protected double ClipStep(double h, double tEnd, out bool last)
    {
        if (FixedStep > 0) h = Direction * FixedStep;
        double mag = Math.Min(Math.Abs(h), HMax);
        double remaining = Direction * (tEnd - T);
        last = false;
        if (mag >= remaining || (FixedStep == 0 && mag >= 0.99 * remaining) || remaining - mag <= 1e-13 * Math.Abs(tEnd))
        {
            mag = remaining;
            last = true;
        }
        return Direction * mag;
    }

    /// <summary>
    /// Automatic first step (Hairer, Norsett and Wanner I, sec. II.4, "starting step size"): h0 from |y|/|f|, one
    /// explicit Euler trial step to estimate the second derivative, then h = (0.01 / max(|f|, |f'|))^(1/order).
    /// </summary>
    protected double InitialStep(int order, ReadOnlySpan<double> f0, Span<double> y1, Span<double> f1)
    {
        double dnf = 0, dny = 0;
        for (int i = 0; i < N; i++)
        {
            double sk = Atol[i] + Rtol * Math.Abs(Y[i]);
            dnf += (f0[i] / sk) * (f0[i] / sk);
            dny += (Y[i] / sk) * (Y[i] / sk);
        }
        dnf /= Math.Max(N, 1);
        dny /= Math.Max(N, 1);
        double h = (dnf <= 1e-10 || dny <= 1e-10) ? 1e-6 : Math.Sqrt(dny / dnf) * 0.01;
        h = Math.Min(h, HMax);
        for (int i = 0; i < N; i++) y1[i] = Y[i] + Direction * h * f0[i];
        CallRhs(T + Direction * h, y1, f1);
        double der2 = 0;
        for (int i = 0; i < N; i++)
        {
            double sk = Atol[i] + Rtol * Math.Abs(Y[i]);
            double d = (f1[i] - f0[i]) / sk;
            der2 += d * d;
        }
        der2 = Math.Sqrt(der2 / Math.Max(N, 1)) / h;
        double der12 = Math.Max(Math.Abs(der2), Math.Sqrt(dnf));
        double h1 = der12 <= 1e-15 ? Math.Max(1e-6, h * 1e-3) : Math.Pow(0.01 / der12, 1.0 / order);
        h = Math.Min(Math.Min(100 * h, h1), HMax);
        if (!double.IsFinite(h) || h <= 0) h = Math.Min(1e-6, HMax);
        return Direction * h;
    }
}
