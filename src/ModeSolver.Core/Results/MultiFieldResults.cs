using System.Collections.Immutable;
using ModeSolver.Estimates;
using ModeSolver.Trajectories;

namespace ModeSolver.Results;

/// <summary>
/// What an n-field run adds beside the modes: the sampled trajectory with its kinematics (turn rate, entropic mass, R_fs)
/// and the separate-universe delta N at the pivot. Null in the report of a single-field run.
/// </summary>
/// <param name="Trajectory">The background from its start to the end of inflation, field-indexed, with the kinematics.</param>
/// <param name="DeltaN">delta N at the pivot's horizon exit; null when it could not be computed (the reason is in <paramref name="DeltaNNote"/>).</param>
/// <param name="DeltaNNote">Null, or one line saying why delta N is missing.</param>
public sealed record MultiFieldResults(TrajectorySamples Trajectory, DeltaNPivot? DeltaN, string? DeltaNNote)
{
    /// <summary>ln V on a grid around the trajectory (two fields only; null otherwise), for the field-space plot.</summary>
    public PotentialGrid? Potential { get; init; }
}

/// <summary>ln V of a two-field theory on a rectangular grid of the two fields (unscaled potential; NaN where V &lt;= 0).</summary>
/// <param name="X">The first field's grid values, increasing.</param>
/// <param name="Y">The second field's grid values, increasing.</param>
/// <param name="LnV">ln V at (X[i], Y[j]) at [j * X.Length + i].</param>
public sealed record PotentialGrid(ImmutableArray<double> X, ImmutableArray<double> Y, ImmutableArray<double> LnV);

/// <summary>
/// delta N at the pivot beside the mode result, with the potential at its normalised scale.
/// </summary>
/// <param name="Pzeta">(H_*/2 pi)^2 G^IJ N_I N_J.</param>
/// <param name="PzetaError">Error bound of <paramref name="Pzeta"/>.</param>
/// <param name="FNL">f_NL^local = (5/6) N^I N^J N_;IJ / (N_K N^K)^2.</param>
/// <param name="FNLError">Error bound of f_NL.</param>
/// <param name="ModesPzeta">The mode equations' P_zeta at the pivot (A_s).</param>
/// <param name="Allowance">The relative difference expected from slow roll at exit (see <see cref="Runs.MultiFieldStage"/>).</param>
/// <param name="Agrees">True when |delta N - modes| is within both errors plus the allowance.</param>
/// <param name="Raw">The full result in background units (N_I, N_;IJ, steps, slice, counters).</param>
public sealed record DeltaNPivot(double Pzeta, double PzetaError, double FNL, double FNLError, double ModesPzeta, double Allowance, bool Agrees, DeltaNResult Raw)
{
    /// <summary>delta N's P_zeta over the modes' minus 1.</summary>
    public double RelativeDifference => Pzeta / ModesPzeta - 1;

    /// <summary>N_I at exit.</summary>
    public ImmutableArray<double> Gradient => Raw.Gradient;
}
