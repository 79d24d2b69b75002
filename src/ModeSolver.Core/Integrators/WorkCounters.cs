namespace ModeSolver.Integrators;

/// <summary>Work counters shared by the steppers of one integration, with the step budget check.</summary>
internal sealed class WorkCounters
{
    public WorkCounters(int maxSteps) => MaxSteps = maxSteps;

    public int MaxSteps { get; }
    public int Accepted;
    public int Rejected;
    public int Rhs;
    public int Jacobians;
    public int Factorizations;
    public int Switches;

    /// <summary>Called before each step attempt; throws once accepted plus rejected steps reach the budget.</summary>
    public void BeforeAttempt(double t, double[] y)
    {
        if (Accepted + Rejected >= MaxSteps)
        {
            throw new IntegrationException(IntegrationFailure.StepBudgetExhausted, t, (double[])y.Clone(),
                $"step budget of {MaxSteps} steps (accepted plus rejected) exhausted at t = {t:R}");
        }
    }

    public OdeStatistics ToStatistics() => new(Accepted, Rejected, Rhs, Jacobians, Factorizations, Switches);
}
