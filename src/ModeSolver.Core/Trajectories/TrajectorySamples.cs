using System.Collections.Immutable;
using ModeSolver.Background;

namespace ModeSolver.Trajectories;

/// <summary>
/// An n-field background sampled on a grid of N with its kinematics (<see cref="TrajectoryKinematics"/>): what the
/// diagnostics flags and the writers read. Field-indexed arrays are row-major, one row of n values per sample.
/// </summary>
/// <param name="FieldNames">The fields in field order.</param>
/// <param name="N">E-folds since the start, increasing.</param>
/// <param name="Fields">phi^I at each N (N.Length x n).</param>
/// <param name="Velocities">d phi^I / dN at each N (N.Length x n).</param>
/// <param name="Epsilon1">epsilon_1 at each N.</param>
/// <param name="TurnRate">eta_perp at each N.</param>
/// <param name="EntropicMass">m_s^2/H^2 at each N (NaN unless n = 2).</param>
/// <param name="RicciScalar">R_fs at each N.</param>
/// <param name="NEnd">The end of inflation.</param>
public sealed record TrajectorySamples(
    ImmutableArray<string> FieldNames,
    ImmutableArray<double> N,
    ImmutableArray<double> Fields,
    ImmutableArray<double> Velocities,
    ImmutableArray<double> Epsilon1,
    ImmutableArray<double> TurnRate,
    ImmutableArray<double> EntropicMass,
    ImmutableArray<double> RicciScalar,
    double NEnd)
{
    /// <summary>The number of fields.</summary>
    public int FieldCount => FieldNames.Length;

    /// <summary>The sample with the largest finite eta_perp (-1 when none is finite).</summary>
    public int LargestTurnIndex => Extreme(TurnRate, largest: true);

    /// <summary>The sample with the smallest finite m_s^2/H^2 (-1 when none is finite, e.g. n != 2).</summary>
    public int SmallestEntropicMassIndex => Extreme(EntropicMass, largest: false);

    private static int Extreme(ImmutableArray<double> values, bool largest)
    {
        int best = -1;
        for (int i = 0; i < values.Length; i++)
            if (double.IsFinite(values[i]) && (best < 0 || (largest ? values[i] > values[best] : values[i] < values[best]))) best = i;
        return best;
    }

    /// <summary>
    /// Samples <paramref name="background"/> at <paramref name="count"/> equally spaced N from <paramref name="from"/> to
    /// <paramref name="to"/> (both inside the background's range).
    /// </summary>
    public static TrajectorySamples Sample(FieldBackgroundSolution background, double from, double to, int count)
    {
        ArgumentNullException.ThrowIfNull(background);
        if (count < 2) throw new ArgumentOutOfRangeException(nameof(count), "at least two samples");
        if (!(to > from) || from < background.NStart || to > background.NStop)
            throw new ArgumentOutOfRangeException(nameof(to), $"the sample range [{from}, {to}] must be increasing and inside [{background.NStart}, {background.NStop}]");
        int f = background.FieldCount;
        var kin = new TrajectoryKinematics(background.Theory);
        var n = new double[count];
        var fields = new double[count * f];
        var velocities = new double[count * f];
        var e1 = new double[count];
        var turn = new double[count];
        var mass = new double[count];
        var ricci = new double[count];
        for (int i = 0; i < count; i++)
        {
            double t = i == count - 1 ? to : from + (to - from) * i / (count - 1);
            var k = kin.At(background, t);
            kin.Point.Phi.CopyTo(fields, i * f);
            kin.Point.DPhi.CopyTo(velocities, i * f);
            n[i] = t;
            e1[i] = k.Epsilon1;
            turn[i] = k.TurnRate;
            mass[i] = k.EntropicMass;
            ricci[i] = k.RicciScalar;
        }
        return new TrajectorySamples(background.Theory.FieldNames.ToImmutableArray(), n.ToImmutableArray(), fields.ToImmutableArray(),
            velocities.ToImmutableArray(), e1.ToImmutableArray(), turn.ToImmutableArray(), mass.ToImmutableArray(), ricci.ToImmutableArray(),
            background.NEnd);
    }
}
