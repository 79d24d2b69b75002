namespace ModeSolver.Integrators;

/// <summary>
/// One step of a linear system y' = A(t) y by the exact propagator of a frozen comparison problem on [t0, t1]
/// (the caller freezes the slowly varying coefficients, typically at the step's midpoint, and writes
/// y(t1) = Phi(t1, t0) y(t0) into <paramref name="yOut"/>). Returns false when the comparison problem cannot serve the
/// step (the caller then switches to another method).
/// </summary>
public delegate bool PropagatorStep(double t0, double t1, ReadOnlySpan<double> y, Span<double> yOut);

/// <summary>What a <see cref="PropagatorStepper"/> run did.</summary>
/// <param name="TFinal">Where it stopped: the target, or the first time the propagator declined a step.</param>
/// <param name="Accepted">Accepted steps.</param>
/// <param name="Rejected">Rejected steps.</param>
/// <param name="Propagations">Propagator calls (three per attempted step).</param>
/// <param name="MaxErrorEstimate">Largest accepted local error estimate relative to the tolerance (at most 1).</param>
/// <param name="SumErrorEstimate">Sum over accepted steps of the estimated local error |y_{h/2} - y_h|/3 relative to the block
/// magnitude (a bound on the accumulated error of the unextrapolated steps; the extrapolated result is usually far better).</param>
public readonly record struct PropagatorRun(double TFinal, int Accepted, int Rejected, int Propagations, double MaxErrorEstimate, double SumErrorEstimate);

/// <summary>
/// Adaptive driver for propagator methods (piecewise-analytic or Magnus-type steps: the solution of a frozen
/// comparison problem carried across each step; Gordon 1969, J. Chem. Phys. 51, 14; Ixaru, "Numerical Methods
/// for Differential Equations and Applications", Reidel 1984, chapter 3). Midpoint freezing is symmetric, so the
/// global error expands in even powers of the step: error control by step doubling (one step h against two of h/2;
/// Hairer, Norsett &amp; Wanner, "Solving Ordinary Differential Equations I", 2nd ed., section II.4), local
/// extrapolation y = y_{h/2} + (y_{h/2} - y_h)/3, and the step-size rule h_new = h min(4, max(0.2, 0.9 err^(-1/3)))
/// for a local error of order h^3. The error of component i is measured against the magnitude of the complex
/// number (y[j], y[j+1]) with j = scaleIndex[i] (the caller's choice: e.g. the value it perturbs most), so that the
/// real and imaginary parts of an oscillating quantity, passing through zero in turn, do not force tiny steps.
/// Physics-free; allocation-free after construction.
/// </summary>
public sealed class PropagatorStepper
{
    /// <summary>Safety factor of the step-size rule.</summary>
    public const double Safety = 0.9;
    /// <summary>Largest growth of the step per accepted step.</summary>
    public const double MaxGrowth = 4.0;
    /// <summary>Largest shrink per rejected step.</summary>
    public const double MinShrink = 0.2;

    private readonly double[] _full, _half, _mid;

    /// <summary>A driver for systems of at most <paramref name="maxDimension"/> components.</summary>
    public PropagatorStepper(int maxDimension)
    {
        _full = new double[maxDimension];
        _half = new double[maxDimension];
        _mid = new double[maxDimension];
    }

    /// <summary>
    /// Advances <paramref name="y"/> from <paramref name="t0"/> towards <paramref name="t1"/> &gt; t0 with first trial step
    /// <paramref name="h0"/>, keeping each step's estimated local error below <paramref name="tolerance"/> relative to its
    /// reference magnitude (see the class remarks). Stops at t1, where the propagator declines a step, or after
    /// <paramref name="maxSteps"/> attempts.
    /// </summary>
    public PropagatorRun Advance(PropagatorStep step, double t0, double t1, double h0, Span<double> y, ReadOnlySpan<int> scaleIndex, double tolerance, int maxSteps)
    {
        ArgumentNullException.ThrowIfNull(step);
        if (!(t1 > t0)) return new PropagatorRun(t0, 0, 0, 0, 0, 0);
        if (scaleIndex.Length != y.Length) throw new ArgumentException("one scale index per component", nameof(scaleIndex));
        foreach (int j in scaleIndex)
            if (j < 0 || j + 1 >= y.Length) throw new ArgumentException("scale indices must point at a (real, imaginary) pair inside the state", nameof(scaleIndex));
        if (y.Length > _full.Length) throw new ArgumentException("state longer than the workspace", nameof(y));
        int n = y.Length;
        var full = _full.AsSpan(0, n);
        var half = _half.AsSpan(0, n);
        var mid = _mid.AsSpan(0, n);
        double t = t0, h = Math.Min(h0, t1 - t0), maxErr = 0, sumErr = 0;
        int accepted = 0, rejected = 0, calls = 0;
        while (t < t1 && accepted + rejected < maxSteps)
        {
            double tn = t1 - t <= 1.01 * h ? t1 : t + h;
            h = tn - t;
            double tm = t + 0.5 * h;
            calls += 3;
            if (!step(t, tn, y, full) || !step(t, tm, y, mid) || !step(tm, tn, mid, half))
            {
                if (h < 1e-6 * Math.Max(1.0, Math.Abs(t))) break; // the comparison problem cannot serve even a tiny step here
                h *= 0.5;
                rejected++;
                continue;
            }
            double err = 0;
            for (int i = 0; i < n; i++)
            {
                int j = scaleIndex[i];
                double scale = Math.Sqrt(half[j] * half[j] + half[j + 1] * half[j + 1]);
                if (scale > 0) err = Math.Max(err, Math.Abs(half[i] - full[i]) / (3.0 * tolerance * scale));
            }
            if (!double.IsFinite(err))
            {
                h *= MinShrink;
                rejected++;
                continue;
            }
            double factor = err == 0 ? MaxGrowth : Math.Min(MaxGrowth, Math.Max(MinShrink, Safety * Math.Pow(err, -1.0 / 3.0)));
            if (err <= 1.0)
            {
                for (int i = 0; i < n; i++) y[i] = half[i] + (half[i] - full[i]) / 3.0;
                t = tn;
                accepted++;
                maxErr = Math.Max(maxErr, err);
                sumErr += err * tolerance;
            }
            else rejected++;
            h *= factor;
        }
        return new PropagatorRun(t, accepted, rejected, calls, maxErr, sumErr);
    }
}
