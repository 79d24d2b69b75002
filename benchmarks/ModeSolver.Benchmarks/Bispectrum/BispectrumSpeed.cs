using System.Diagnostics;
using System.Globalization;
using ModeSolver.Bispectrum;
using ModeSolver.Decks;
using ModeSolver.Pipeline;

namespace ModeSolver.Benchmarks.Bispectrum;

/// <summary>
/// `--fnl-speed [DECK] [REPS]`: Stopwatch medians of the bispectrum on a deck's matched background (default the plateau
/// demo): equilateral f_NL at the pivot on one thread, and a 200-point equilateral curve across the deck's k range
/// (clipped to what the background serves) on 1 and 2 threads; default numerical settings (both tolerance passes).
/// </summary>
public static class BispectrumSpeed
{
    /// <summary>Runs the measurement and prints one line per figure.</summary>
    public static void Run(string[] args)
    {
        string deck = args.Length >= 2 ? args[1] : Path.Combine(Perturbations.ErrorHonesty.FindRoot(), "runs/plateau-demo.toml");
        int reps = args.Length >= 3 ? int.Parse(args[2], CultureInfo.InvariantCulture) : 7;
        var settings = SettingsResolver.Resolve(DeckReader.Parse(File.ReadAllText(deck), deck));
        var pivot = SpectrumPipeline.RunPivot(settings).Pivot;
        var bg = pivot.Background;
        var solver = new BispectrumSolver(bg);
        double kp = pivot.ToBackgroundUnits(pivot.KPivot);
        var (lo, hi) = BispectrumStage.ServedEquilateral(bg, solver.Settings);
        double a = Math.Max(pivot.ToBackgroundUnits(settings.KRange.KMin), lo), b = Math.Min(pivot.ToBackgroundUnits(settings.KRange.KMax), hi);
        var curve = new Triangle[200];
        for (int i = 0; i < curve.Length; i++) curve[i] = Triangle.Equilateral(a * Math.Pow(b / a, i / 199.0));
        solver.Solve([Triangle.Equilateral(kp)]); // JIT
        double one = Median(reps, () => solver.Solve([Triangle.Equilateral(kp)]), out var r1);
        Console.WriteLine(FormattableString.Invariant($"equilateral at the pivot, 1 thread: {one * 1e3:F1} ms (f_NL = {r1[0].FNL:G6} +- {r1[0].Error:G2}, {r1[0].RhsEvaluations} right-hand sides, {r1[0].IntegrandEvaluations} integrand evaluations, start K/aH = {r1[0].StartDepth:F0})"));
        foreach (int threads in new[] { 1, 2 })
        {
            double t = Median(Math.Max(1, reps / 3), () => solver.Solve(curve, threads), out var rc);
            double maxErr = 0;
            foreach (var p in rc) maxErr = Math.Max(maxErr, p.Error);
            Console.WriteLine(FormattableString.Invariant($"200-point equilateral curve, k = {pivot.ToInverseMpc(a):G3} .. {pivot.ToInverseMpc(b):G3} /Mpc, {threads} thread(s): {t:F2} s (largest error {maxErr:G2})"));
        }
    }

    private static double Median(int reps, Func<BispectrumPoint[]> f, out BispectrumPoint[] last)
    {
        var t = new double[reps];
        last = [];
        for (int i = 0; i < reps; i++)
        {
            var sw = Stopwatch.StartNew();
            last = f();
            t[i] = sw.Elapsed.TotalSeconds;
        }
        Array.Sort(t);
        return t[reps / 2];
    }
}
