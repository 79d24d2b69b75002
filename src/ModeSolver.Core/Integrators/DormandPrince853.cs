namespace ModeSolver.Integrators;

/// <summary>
/// Explicit adaptive Dormand-Prince 8(5,3) method with 7th-order dense output (Hairer, Norsett and Wanner,
/// Solving Ordinary Differential Equations I, 2nd ed., sec. II.10). For non-stiff problems at tight tolerances.
/// </summary>
/// <remarks>
/// Events are located on the dense output by Brent's method; with <see cref="OdeOptions.DenseOutput"/> false and
/// no events, the 3 extra stages of the dense output are skipped and nothing is stored per step. The right-hand
/// side is called with spans into work arrays allocated once per <see cref="Solve"/>.
/// </remarks>
public sealed class DormandPrince853 : IOdeMethod
{
    /// <summary>An adaptive integrator.</summary>
    public DormandPrince853() { }

    /// <summary>
    /// If positive, every step has this magnitude (the last one shortened to land on TEnd) and the error
    /// estimate is ignored; meant for measuring the order. 0 (default) is the adaptive method.
    /// </summary>
    public double FixedStep { get; init; }

    /// <inheritdoc />
    public string Name => "DOP853";

    /// <inheritdoc />
    public OdeSolution Solve(OdeProblem problem, OdeOptions options)
    {
        OdeDriver.Validate(Name, problem, options);
        if (!(FixedStep >= 0) || !double.IsFinite(FixedStep))
            throw new ArgumentException($"DOP853: FixedStep = {FixedStep} must be zero or positive and finite.");
        var counters = new WorkCounters(options.MaxSteps);
        bool dense = options.DenseOutput || options.Events.Count > 0;
        var stepper = new Dop853Stepper(problem, options, counters, dense, FixedStep);
        return OdeDriver.Run(Name, problem, options, new SingleStepper(stepper), counters);
    }
}
