namespace ModeSolver.Estimates;

/// <summary>The velocity each separate universe starts with on the flat slice at horizon exit.</summary>
public enum ExitVelocity
{
    /// <summary>
    /// The exact background velocity at exit plus the change of the slow-roll attractor velocity -G^IJ V_J / V between the
    /// exit point and the displaced start (default; the constant part phi'_bg - phi'_SR is parallel-transported to first order,
    /// so the choice does not depend on the chart). The unperturbed universe is the exact background; a displaced one gets
    /// the attractor's velocity field to slow-roll accuracy in its slope, so N_I is the attractor value up to O(epsilon^2)
    /// (single field: P_zeta = H^2/(8 pi^2 epsilon_1) to that order).
    /// </summary>
    Attractor,

    /// <summary>The slow-roll attractor velocity -G^IJ V_J / V at every start, the unperturbed one included.</summary>
    SlowRoll,

    /// <summary>
    /// The exact background velocity components at exit for every start (delta phi'^I = 0, a coordinate-dependent choice):
    /// each displaced universe starts off the attractor by the attractor's slope times the step, which changes N_I by about
    /// epsilon_1/3 relative (P_zeta by about 2 epsilon_1 / 3).
    /// </summary>
    Background,
}

/// <summary>Which slice the separate universes are counted to.</summary>
public enum DeltaNSlice
{
    /// <summary>
    /// The uniform-density slice at the end of inflation: every universe is counted to the N where its H (equivalently its
    /// density 3 H^2) equals the unperturbed background's H at its end of inflation, shifted by <see cref="DeltaNSettings.SliceOffset"/>
    /// e-folds (default).
    /// </summary>
    UniformDensity,

    /// <summary>
    /// Each universe's own end of inflation (its epsilon_1 = 1 crossing, or the end surface): the right slice when the end
    /// surface is a physical transition (e.g. a waterfall at a field value); not a uniform-density slice in general.
    /// </summary>
    EndOfInflation,
}

/// <summary>Inputs of the separate-universe (delta N) computation.</summary>
public sealed record DeltaNSettings
{
    /// <summary>
    /// The finite-difference step as a fraction of an e-fold of motion: the displacement along field I is
    /// Step |phi'_*| / sqrt(G_II) (|phi'| = sqrt(2 epsilon_1), the proper distance the background covers per e-fold), so each
    /// displaced universe lasts about Step e-folds more or less. The derivatives are taken at this step and at half of it and
    /// Richardson-extrapolated (default 0.1).
    /// </summary>
    public double Step { get; init; } = 0.1;

    /// <summary>Relative tolerance of each re-solved background (default 1e-12; the integration error enters the error bars).</summary>
    public double Tolerance { get; init; } = 1e-12;

    /// <summary>The start velocity of the separate universes (default <see cref="ExitVelocity.Attractor"/>).</summary>
    public ExitVelocity Velocity { get; init; } = ExitVelocity.Attractor;

    /// <summary>The final slice (default the uniform-density slice at the end of inflation).</summary>
    public DeltaNSlice Slice { get; init; } = DeltaNSlice.UniformDensity;

    /// <summary>
    /// For <see cref="DeltaNSlice.UniformDensity"/>: the slice's H is the unperturbed H at its end of inflation plus this many
    /// e-folds (0, the default; negative before the end, for backgrounds that stop at their end surface).
    /// </summary>
    public double SliceOffset { get; init; }

    /// <summary>Throws <see cref="ArgumentException"/> naming the first setting out of range.</summary>
    public void Validate()
    {
        if (!(Step > 0 && Step <= 1))
            throw new ArgumentException($"delta N settings: Step must lie in (0, 1] e-folds of motion (got {Step})");
        if (!(Tolerance >= 1e-14 && Tolerance <= 1e-6))
            throw new ArgumentException($"delta N settings: Tolerance must lie in [1e-14, 1e-6] (got {Tolerance})");
        if (!double.IsFinite(SliceOffset))
            throw new ArgumentException($"delta N settings: SliceOffset must be finite (got {SliceOffset})");
        if (!Enum.IsDefined(Velocity) || !Enum.IsDefined(Slice))
            throw new ArgumentException("delta N settings: unknown velocity or slice choice");
    }
}
