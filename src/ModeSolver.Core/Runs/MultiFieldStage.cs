using System.Collections.Immutable;
using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Estimates;
using ModeSolver.Physics;
using ModeSolver.Results;
using ModeSolver.Trajectories;

namespace ModeSolver.Runs;

/// <summary>
/// The n-field additions of a run: the trajectory kinematics sampled to the end of inflation, their flags inside the
/// observable window, and delta N at the pivot compared with the modes' P_zeta.
/// </summary>
public static class MultiFieldStage
{
    /// <summary>Trajectory samples from the start to the end of inflation.</summary>
    public const int TrajectorySampleCount = 400;

    /// <summary>
    /// The relative difference allowed between delta N's and the modes' P_zeta before they are flagged: the slow-roll
    /// corrections of the field perturbations' amplitude at horizon exit, which delta N (with (H_*/2 pi)^2) leaves out:
    /// 2 (C + 1) epsilon_1 + |C epsilon_2| in single field (physics.md section 4, Stewart &amp; Lyth 1993) and, for the
    /// entropic direction, its mass m_s^2/(3 H^2) (the change of the Hankel index); times 2 as a margin (common practice).
    /// </summary>
    public static double Allowance(double epsilon1, double epsilon2, double entropicMass)
    {
        const double c = Constants.SlowRollC;
        double m = double.IsFinite(entropicMass) ? Math.Abs(entropicMass) / 3 : 0;
        return 2 * (2 * (c + 1) * epsilon1 + Math.Abs(c * epsilon2) + m);
    }

    /// <summary>
    /// Computes the additions for <paramref name="fields"/> (the unscaled n-field background, solved with
    /// <paramref name="settings"/>); <paramref name="vScale"/> is the matched potential scale, <paramref name="nPivot"/> the
    /// pivot's horizon exit and <paramref name="windowStart"/> the exit of the largest scale (the flags' window runs from it
    /// to the end of inflation), both in the report's N, which is the fields' N minus <paramref name="origin"/>; the
    /// trajectory samples are written in the report's N too. Without <paramref name="deltaN"/>, delta N counts to the
    /// uniform-density slice at the end of inflation, or to each universe's end when inflation ended on an end surface
    /// (the physical transition there). A delta N that cannot be computed is reported as a note, never thrown.
    /// </summary>
    public static (MultiFieldResults Results, ImmutableArray<Flag> Flags) Compute(FieldBackgroundSolution fields, BackgroundSettings settings,
        double origin, double nPivot, double vScale, double windowStart, double modesPzeta, double modesPzetaError, double kPivot,
        DeltaNSettings? deltaN = null)
    {
        ArgumentNullException.ThrowIfNull(fields);
        ArgumentNullException.ThrowIfNull(settings);
        var sampled = TrajectorySamples.Sample(fields, fields.NStart, fields.NEnd, TrajectorySampleCount);
        var shifted = new double[sampled.N.Length];
        for (int i = 0; i < shifted.Length; i++) shifted[i] = sampled.N[i] - origin;
        var trajectory = sampled with { N = ImmutableArray.Create(shifted), NEnd = sampled.NEnd - origin };
        var flags = ImmutableArray.CreateBuilder<Flag>();
        flags.AddRange(TrajectoryFlags.Evaluate(trajectory, Math.Max(trajectory.N[0], Math.Min(windowStart, nPivot)), trajectory.NEnd));
        nPivot += origin; // the fields' own N from here on
        DeltaNPivot? pivot = null;
        string? note = null;
        try
        {
            // Inflation that ends on a surface (a waterfall, a field value) ends there in every universe: count to it.
            deltaN ??= fields.EndedAtSurface ? new DeltaNSettings { Slice = DeltaNSlice.EndOfInflation } : new DeltaNSettings();
            var raw = DeltaN.Compute(fields, settings, nPivot, deltaN);
            var kin = new TrajectoryKinematics(fields.Theory).At(fields, nPivot);
            var point = fields.At(nPivot, new double[fields.FieldCount], new double[fields.FieldCount]);
            double allowance = Allowance(point.Epsilon1, point.Epsilon2, kin.EntropicMass);
            var disagreement = TrajectoryFlags.DeltaNAgreement(raw, modesPzeta, modesPzetaError, vScale, allowance, kPivot);
            if (disagreement is not null) flags.Add(disagreement);
            pivot = new DeltaNPivot(raw.ScaledPzeta(vScale), raw.PzetaError * vScale, raw.FNL, raw.FNLError, modesPzeta, allowance,
                disagreement is null && double.IsFinite(modesPzeta), raw);
        }
        catch (PhysicsException ex)
        {
            note = "delta N not computed: " + ex.Message;
        }
        return (new MultiFieldResults(trajectory, pivot, note) { Potential = Grid(fields.Theory, trajectory) }, flags.ToImmutable());
    }

    /// <summary>Points per side of the potential grid of a two-field run.</summary>
    public const int GridPoints = 64;

    /// <summary>ln V on a grid over the trajectory's range in both fields, widened by 15% on each side; null unless n = 2.</summary>
    public static PotentialGrid? Grid(Models.IFieldTheory theory, TrajectorySamples trajectory)
    {
        ArgumentNullException.ThrowIfNull(theory);
        ArgumentNullException.ThrowIfNull(trajectory);
        if (theory.FieldCount != 2) return null;
        double x0 = double.PositiveInfinity, x1 = double.NegativeInfinity, y0 = double.PositiveInfinity, y1 = double.NegativeInfinity;
        for (int i = 0; i < trajectory.N.Length; i++)
        {
            double x = trajectory.Fields[2 * i], y = trajectory.Fields[2 * i + 1];
            x0 = Math.Min(x0, x); x1 = Math.Max(x1, x);
            y0 = Math.Min(y0, y); y1 = Math.Max(y1, y);
        }
        double wx = Math.Max(x1 - x0, 1e-3 * Math.Max(1, Math.Abs(x0))), wy = Math.Max(y1 - y0, 1e-3 * Math.Max(1, Math.Abs(y0)));
        x0 -= 0.15 * wx; x1 += 0.15 * wx; y0 -= 0.15 * wy; y1 += 0.15 * wy;
        var xs = new double[GridPoints];
        var ys = new double[GridPoints];
        for (int i = 0; i < GridPoints; i++)
        {
            xs[i] = x0 + (x1 - x0) * i / (GridPoints - 1);
            ys[i] = y0 + (y1 - y0) * i / (GridPoints - 1);
        }
        var lnV = new double[GridPoints * GridPoints];
        var phi = new double[2];
        for (int j = 0; j < GridPoints; j++)
            for (int i = 0; i < GridPoints; i++)
            {
                phi[0] = xs[i];
                phi[1] = ys[j];
                double v = theory.Potential(phi);
                lnV[j * GridPoints + i] = v > 0 && double.IsFinite(v) ? Math.Log(v) : double.NaN;
            }
        return new PotentialGrid(xs.ToImmutableArray(), ys.ToImmutableArray(), lnV.ToImmutableArray());
    }
}
