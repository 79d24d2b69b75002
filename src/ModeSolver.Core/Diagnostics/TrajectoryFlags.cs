using System.Globalization;
using ModeSolver.Estimates;
using ModeSolver.Trajectories;

namespace ModeSolver.Diagnostics;

/// <summary>
/// Where the single-field reduction of an n-field run fails, from the sampled trajectory kinematics (physics.md section 7):
/// a light entropic direction while the trajectory turns, a negative entropic mass, and a delta N P_zeta that disagrees with
/// the mode equations'. Ranges' ends are interpolated linearly in N, as in <see cref="Flags"/>.
/// </summary>
public static class TrajectoryFlags
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>
    /// The entropic direction counts as light below m_s^2/H^2 = 1: its super-horizon fluctuation then survives for several
    /// e-folds (it decays like exp(-m_s^2 N / (3 H^2)) for m_s &lt;&lt; H) instead of being a heavy field that can be integrated out.
    /// </summary>
    public const double LightEntropicMass = 1.0;

    /// <summary>
    /// A turn rate counts as non-negligible above 0.01 per e-fold: the isocurvature feeds zeta at a rate 2 eta_perp per e-fold
    /// (physics.md section 7's transfer), so such a turn held over 10 e-folds with a light entropic mode moves the curvature
    /// amplitude by about 20% (our choice of scale).
    /// </summary>
    public const double TurnRateLimit = 0.01;

    /// <summary>The flags of one trajectory inside the window [<paramref name="windowStart"/>, <paramref name="windowEnd"/>] of N.</summary>
    public static List<Flag> Evaluate(TrajectorySamples samples, double windowStart, double windowEnd)
    {
        ArgumentNullException.ThrowIfNull(samples);
        if (!(windowEnd >= windowStart))
            throw new ArgumentException($"trajectory flags: the window [{windowStart}, {windowEnd}] is empty or not a number");
        var flags = new List<Flag>();
        if (samples.FieldCount != 2) return flags;
        int count = samples.N.Length;
        var n = samples.N.AsSpan();
        var light = new double[count];
        var unstable = new double[count];
        for (int i = 0; i < count; i++)
        {
            double m = samples.EntropicMass[i], turn = samples.TurnRate[i];
            // Above 1 exactly where eta_perp > limit and m_s^2/H^2 < 1 (NaN never exceeds).
            light[i] = Math.Min(turn / TurnRateLimit, 1 + (LightEntropicMass - m));
            unstable[i] = -m;
        }
        foreach (var run in Flags.MergeAdjacent(Flags.Runs(n, light, 1.0), light))
        {
            if (!Clip(run, windowStart, windowEnd, out double lo, out double hi)) continue;
            int w = run.WorstIndex;
            string where = string.Create(Inv, $"N = {lo:0.00} .. {hi:0.00}");
            flags.Add(new Flag(FlagKinds.LightEntropicTurn, "m_s^2/H^2", string.Create(Inv,
                $"the entropic direction is light (m_s^2/H^2 = {samples.EntropicMass[w]:0.###} < {LightEntropicMass:0.#}) while the trajectory turns (eta_perp = {samples.TurnRate[w]:0.####} > {TurnRateLimit:0.##}) for {where}: isocurvature feeds zeta there and the single-field reduction fails"),
                where, lo, hi, samples.EntropicMass[w], double.NaN, double.NaN));
        }
        foreach (var run in Flags.MergeAdjacent(Flags.Runs(n, unstable, 0.0), unstable))
        {
            if (!Clip(run, windowStart, windowEnd, out double lo, out double hi)) continue;
            int w = run.WorstIndex;
            string where = string.Create(Inv, $"N = {lo:0.00} .. {hi:0.00}");
            double curvature = samples.Epsilon1[w] * samples.RicciScalar[w];
            string cause = curvature < 0 && samples.EntropicMass[w] - curvature >= 0
                ? string.Create(Inv, $"driven by the field-space curvature (epsilon_1 R_fs = {curvature:0.###}): geometrical destabilisation")
                : "a tachyonic entropic direction";
            flags.Add(new Flag(FlagKinds.EntropicInstability, "m_s^2/H^2", string.Create(Inv,
                $"the entropic mass is negative (m_s^2/H^2 down to {samples.EntropicMass[w]:0.###} at N = {n[w]:0.00}) for {where}, {cause}: the trajectory is unstable and the single-field reduction fails"),
                where, lo, hi, samples.EntropicMass[w], double.NaN, double.NaN));
        }
        return flags;
    }

    /// <summary>
    /// A flag when delta N's P_zeta and the mode equations' differ by more than their errors plus the slow-roll difference
    /// expected at exit (<paramref name="expected"/>, relative; e.g. a few epsilon_1); null when they agree.
    /// </summary>
    public static Flag? DeltaNAgreement(DeltaNResult deltaN, double modesPzeta, double modesError, double vScale, double expected, double kPivot)
    {
        ArgumentNullException.ThrowIfNull(deltaN);
        double dn = deltaN.ScaledPzeta(vScale), dnErr = deltaN.PzetaError * vScale;
        double diff = dn - modesPzeta;
        double allowed = dnErr + Math.Abs(modesError) + expected * Math.Abs(modesPzeta);
        if (!(Math.Abs(diff) > allowed)) return null;
        string where = string.Create(Inv, $"k = {kPivot:0.000e+00} /Mpc");
        return new Flag(FlagKinds.DeltaNDisagreement, "P_zeta", string.Create(Inv,
            $"delta N gives P_zeta = {dn:0.0000e+00} +- {dnErr:0.0e+00} but the modes give {modesPzeta:0.0000e+00} +- {Math.Abs(modesError):0.0e+00} at {where} (relative difference {diff / modesPzeta:0.###e+00}, more than the errors and the slow-roll allowance {expected:0.###e+00}): zeta still evolves after horizon exit or the super-horizon limit does not hold"),
            where, kPivot, kPivot, modesPzeta, dn, diff / modesPzeta);
    }

    private static bool Clip(Flags.Run run, double windowStart, double windowEnd, out double lo, out double hi)
    {
        lo = Math.Max(run.Lower, windowStart);
        hi = Math.Min(run.Upper, windowEnd);
        return lo <= hi;
    }
}
