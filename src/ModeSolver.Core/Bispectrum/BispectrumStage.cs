using System.Collections.Immutable;
using System.Diagnostics;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Matching;
using ModeSolver.Physics;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The bispectrum stage of a run: f_NL at the pivot (equilateral and squeezed), the equilateral curve across the run's k
/// range (clipped to what the background serves) and the shape grid, all in one solver call so that the mode histories are shared;
/// slow roll beside each value and the disagreement flags.
/// </summary>
public static class BispectrumStage
{
    /// <summary>Smallest x3 of the shape grid (the soft side needs the background to start earlier by ln(1/x3) e-folds).</summary>
    public const double ShapeMinX = 0.05;

    /// <summary>
    /// Runs the stage on the matched background. <paramref name="ns"/> is the exact n_s at the pivot (for the consistency
    /// relation); <paramref name="kMinMpc"/>..<paramref name="kMaxMpc"/> the run's k range.
    /// </summary>
    public static BispectrumReport Run(PivotSolution pivot, double ns, double kMinMpc, double kMaxMpc, BispectrumRequest request, int threads)
    {
        ArgumentNullException.ThrowIfNull(pivot);
        ArgumentNullException.ThrowIfNull(request);
        var clock = Stopwatch.StartNew();
        var bg = pivot.Background;
        var solver = new BispectrumSolver(bg, request.Numerics);
        double kp = pivot.ToBackgroundUnits(pivot.KPivot);
        var triangles = new List<Triangle> { Triangle.Equilateral(kp), Triangle.Squeezed(kp, request.SqueezedRatio) };
        var (lo, hi) = ServedEquilateral(bg, solver.Settings);
        var curveK = new List<double>();
        if (request.EquilateralPoints > 0)
        {
            double a = Math.Max(pivot.ToBackgroundUnits(kMinMpc), lo), b = Math.Min(pivot.ToBackgroundUnits(kMaxMpc), hi);
            if (!(b > a)) throw new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                $"bispectrum: no k of the run's range [{kMinMpc:G4}, {kMaxMpc:G4}] /Mpc can be integrated (served: [{pivot.ToInverseMpc(lo):G4}, {pivot.ToInverseMpc(hi):G4}] /Mpc)"));
            int m = request.EquilateralPoints;
            for (int i = 0; i < m; i++) curveK.Add(m == 1 ? a : a * Math.Pow(b / a, i / (double)(m - 1)));
            foreach (double k in curveK) triangles.Add(Triangle.Equilateral(k));
        }
        int g = request.ShapeGrid;
        var xs = new double[g];
        var shapeIndex = new int[g * g];
        Array.Fill(shapeIndex, -1);
        for (int i = 0; i < g; i++) xs[i] = g == 1 ? 1.0 : ShapeMinX + (1.0 - ShapeMinX) * i / (g - 1);
        for (int i2 = 0; i2 < g; i2++)
            for (int i3 = 0; i3 < g; i3++)
            {
                double x2 = xs[i2], x3 = xs[i3];
                if (x3 > x2 || x2 + x3 <= 1.0 + 1e-9) continue;
                shapeIndex[i2 * g + i3] = triangles.Count;
                triangles.Add(Triangle.Shape(kp, x2, x3));
            }
        int userFrom = triangles.Count;
        foreach (var t in request.Triangles)
            triangles.Add(new Triangle(pivot.ToBackgroundUnits(t.K1), pivot.ToBackgroundUnits(t.K2), pivot.ToBackgroundUnits(t.K3)));
        var r = solver.Solve(triangles, threads);
        var user = ImmutableArray.CreateBuilder<TriangleValue>();
        for (int i = 0; i < request.Triangles.Count; i++)
        {
            var t = request.Triangles[i];
            user.Add(new TriangleValue(t.K1, t.K2, t.K3, r[userFrom + i].FNL, r[userFrom + i].Error));
        }
        var eqExit = SlowRollBispectrum.AtExit(bg, kp);
        var eq = new FnlValue(r[0].FNL, r[0].Error, SlowRollBispectrum.Equilateral(eqExit.Epsilon1, eqExit.Epsilon2));
        var sq = new FnlValue(r[1].FNL, r[1].Error, SlowRollBispectrum.Consistency(ns));
        var flags = ImmutableArray.CreateBuilder<string>();
        Flag(flags, "equilateral", pivot.KPivot, eq, request.FlagThreshold);
        Flag(flags, string.Create(CultureInfo.InvariantCulture, $"squeezed (k3/k1 = {request.SqueezedRatio:G3})"), pivot.KPivot, sq, request.FlagThreshold);
        var ck = ImmutableArray.CreateBuilder<double>(); var cf = ImmutableArray.CreateBuilder<double>();
        var ce = ImmutableArray.CreateBuilder<double>(); var cs = ImmutableArray.CreateBuilder<double>();
        int worst = -1;
        double worstGap = 0;
        for (int i = 0; i < curveK.Count; i++)
        {
            var p = r[2 + i];
            var exit = SlowRollBispectrum.AtExit(bg, curveK[i]);
            double sr = SlowRollBispectrum.Equilateral(exit.Epsilon1, exit.Epsilon2);
            ck.Add(pivot.ToInverseMpc(curveK[i])); cf.Add(p.FNL); ce.Add(p.Error); cs.Add(sr);
            double gap = Math.Abs(p.FNL - sr) - p.Error;
            if (gap > request.FlagThreshold && gap > worstGap) { worst = i; worstGap = gap; }
        }
        if (worst >= 0)
            flags.Add(string.Create(CultureInfo.InvariantCulture,
                $"equilateral f_NL(k) leaves slow roll by more than {request.FlagThreshold:G3}: worst at k = {ck[worst]:G4} /Mpc, f_NL = {cf[worst]:G4} +- {ce[worst]:G2} vs slow roll {cs[worst]:G4}"));
        ShapeGrid? shape = null;
        if (g > 0)
        {
            var f = new double[g * g];
            var e = new double[g * g];
            for (int j = 0; j < f.Length; j++)
            {
                f[j] = shapeIndex[j] >= 0 ? r[shapeIndex[j]].FNL : double.NaN;
                e[j] = shapeIndex[j] >= 0 ? r[shapeIndex[j]].Error : double.NaN;
            }
            shape = new ShapeGrid(pivot.KPivot, [.. xs], [.. f], [.. e]);
        }
        return new BispectrumReport(pivot.KPivot, eq, sq, request.SqueezedRatio,
            new EquilateralCurve(ck.ToImmutable(), cf.ToImmutable(), ce.ToImmutable(), cs.ToImmutable()), shape, flags.ToImmutable(), request.FlagThreshold)
        { Seconds = clock.Elapsed.TotalSeconds, Triangles = user.ToImmutable() };
    }

    /// <summary>The equilateral k (background units) the background serves: deep enough at its start, out of the horizon at the end.</summary>
    public static (double Lo, double Hi) ServedEquilateral(IBackground bg, BispectrumSettings settings)
    {
        ArgumentNullException.ThrowIfNull(bg);
        ArgumentNullException.ThrowIfNull(settings);
        double lo = 1.03 * Math.Max(20.0, 2.2 * settings.StartDepth / 3.0) * Math.Exp(bg.NStart) * bg.At(bg.NStart).H;
        double hi = 0.099 * Math.Exp(bg.NEnd) * bg.At(bg.NEnd).H;
        return (lo, hi);
    }

    private static void Flag(ImmutableArray<string>.Builder flags, string what, double kMpc, FnlValue v, double threshold)
    {
        double gap = Math.Abs(v.FNL - v.SlowRoll) - v.Error;
        if (gap > threshold)
            flags.Add(string.Create(CultureInfo.InvariantCulture,
                $"{what} f_NL at k = {kMpc:G4} /Mpc is {v.FNL:G4} +- {v.Error:G2}, slow roll {v.SlowRoll:G4}: they differ by more than {threshold:G3}"));
    }
}
