namespace ModeSolver.Integrators;

/// <summary>
/// Switches automatically between the explicit <see cref="DormandPrince853"/> (non-stiff phases) and the implicit
/// <see cref="RadauIIA5"/> (stiff phases), both ways, with one dense output, one event search and one set of
/// statistics across the switches (<see cref="OdeStatistics.MethodSwitches"/> counts them). It starts explicit.
/// </summary>
/// <remarks>
/// Explicit to implicit: the stiffness test of DOP853 (Hairer and Wanner, Solving ODE II, sec. IV.2):
/// h|lambda| ~ |h| |f(y13) - f(y12)| / |y13 - y12| from two stages at the same time; when it exceeds
/// <see cref="StiffThreshold"/> (a little below the end of the real stability interval of DOP853, about 6) on
/// <see cref="StiffSteps"/> accepted steps (a run broken by 6 non-stiff steps restarts the count) the problem is
/// taken as stiff. Implicit to explicit: the implicit step size times the spectral radius of the Jacobian (power
/// iteration), h rho(J), stays below <see cref="NonStiffThreshold"/> on <see cref="NonStiffSteps"/> consecutive
/// accepted steps, i.e. DOP853 could take steps several times longer before reaching its stability limit.
/// </remarks>
public sealed class AutoSwitching : IOdeMethod
{
    /// <summary>A switching integrator with the default thresholds.</summary>
    public AutoSwitching() { }

    /// <summary>
    /// h|lambda| above which an explicit step counts as stiff (default 4). DOP853's real stability interval ends
    /// near 6 (Hairer's code tests 6.1), but with the PI controller here its stability-limited steps settle at
    /// h|lambda| ~ 4.7 to 5.5 (observed on Robertson's problem), so a threshold of 6.1 would rarely fire.
    /// </summary>
    public double StiffThreshold { get; init; } = 4.0;
    /// <summary>Stiff explicit steps that trigger the switch to the implicit method (default 15).</summary>
    public int StiffSteps { get; init; } = 15;
    /// <summary>h rho(J) below which an implicit step counts as non-stiff (default 1).</summary>
    public double NonStiffThreshold { get; init; } = 1.0;
    /// <summary>Consecutive non-stiff implicit steps that trigger the switch back (default 10).</summary>
    public int NonStiffSteps { get; init; } = 10;

    /// <inheritdoc />
    public string Name => "AutoSwitching";

    /// <inheritdoc />
    public OdeSolution Solve(OdeProblem problem, OdeOptions options)
    {
        OdeDriver.Validate(Name, problem, options);
        if (!(StiffThreshold > 0) || !(NonStiffThreshold > 0) || StiffSteps < 1 || NonStiffSteps < 1)
            throw new ArgumentException("AutoSwitching: thresholds must be positive and step counts at least 1.");
        var counters = new WorkCounters(options.MaxSteps);
        bool dense = options.DenseOutput || options.Events.Count > 0;
        var selector = new SwitchingSelector(
            new Dop853Stepper(problem, options, counters, dense, 0.0),
            new Radau5Stepper(problem, options, counters, 0.0),
            counters, this);
        return OdeDriver.Run(Name, problem, options, selector, counters);
    }

    private sealed class SwitchingSelector(Dop853Stepper explicitStepper, Radau5Stepper implicitStepper,
                                           WorkCounters counters, AutoSwitching settings) : IStepperSelector
    {
        private int _stiffCount, _nonStiffCount, _easyCount;

        public Stepper Current { get; private set; } = explicitStepper;

        public void AfterAccepted()
        {
            if (ReferenceEquals(Current, explicitStepper))
            {
                if (explicitStepper.StiffnessIndicator > settings.StiffThreshold)
                {
                    _nonStiffCount = 0;
                    if (++_stiffCount >= settings.StiffSteps)
                    {
                        // The explicit step is stability-limited; the implicit one may grow from it (x8 per step at most).
                        implicitStepper.Start(explicitStepper.T, explicitStepper.Y, explicitStepper.HNext);
                        Switched(implicitStepper);
                    }
                }
                else if (++_nonStiffCount >= 6)
                {
                    _stiffCount = 0;
                }
            }
            else
            {
                double rho = implicitStepper.SpectralRadius;
                double ratio = Math.Abs(implicitStepper.HLast) * rho;
                if (ratio < settings.NonStiffThreshold)
                {
                    if (++_easyCount >= settings.NonStiffSteps)
                    {
                        // Start inside the explicit stability region.
                        double h = Math.Abs(implicitStepper.HNext);
                        if (rho > 0) h = Math.Min(h, 0.5 * settings.StiffThreshold / rho);
                        explicitStepper.Start(implicitStepper.T, implicitStepper.Y, h);
                        Switched(explicitStepper);
                    }
                }
                else
                {
                    _easyCount = 0;
                    // A stale Jacobian (reused while Newton converges fast) would hide a softening problem.
                    if (implicitStepper.JacobianAge >= 5) implicitStepper.RequestJacobian();
                }
            }
        }

        private void Switched(Stepper to)
        {
            Current = to;
            counters.Switches++;
            _stiffCount = 0;
            _nonStiffCount = 0;
            _easyCount = 0;
        }
    }
}
