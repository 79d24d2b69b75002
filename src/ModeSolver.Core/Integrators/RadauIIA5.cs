namespace ModeSolver.Integrators;

/// <summary>
/// Implicit, L-stable Radau IIA method of order 5 for stiff problems (Hairer and Wanner, Solving Ordinary
/// Differential Equations II, 2nd ed., sec. IV.8), with its collocation dense output. Uses
/// <see cref="OdeProblem.Jacobian"/> when given, otherwise forward differences column by column.
/// </summary>
public sealed class RadauIIA5 : IOdeMethod
{
    /// <summary>An adaptive integrator.</summary>
    public RadauIIA5() { }

    /// <summary>
    /// If positive, every step has this magnitude (the last one shortened to land on TEnd) and the error
    /// estimate is ignored; meant for measuring the order. 0 (default) is the adaptive method.
    /// </summary>
    public double FixedStep { get; init; }

    /// <inheritdoc />
    public string Name => "RadauIIA5";

    /// <inheritdoc />
    public OdeSolution Solve(OdeProblem problem, OdeOptions options)
    {
        OdeDriver.Validate(Name, problem, options);
        if (!(FixedStep >= 0) || !double.IsFinite(FixedStep))
            throw new ArgumentException($"RadauIIA5: FixedStep = {FixedStep} must be zero or positive and finite.");
        var counters = new WorkCounters(options.MaxSteps);
        var stepper = new Radau5Stepper(problem, options, counters, FixedStep);
        return OdeDriver.Run(Name, problem, options, new SingleStepper(stepper), counters);
    }
}
