using System.Globalization;
using ModeSolver.Perturbations;
using ModeSolver.Pipeline;

namespace ModeSolver.Benchmarks.Perturbations;

/// <summary>
/// `--resonant-depths DECK [f]`: right-hand-side work per mode against the start depth on a resonant deck (the pivot
/// mode and its neighbours across one period of the modulation), Runge-Kutta alone and with the oscillatory-regime
/// propagator, with the deviation of P_s from the deepest Runge-Kutta start. Work counts, deterministic; no timing.
/// </summary>
internal static class ResonantDepthWork
{
    public static void Run(string[] args)
    {
        var s = ModeSolver.Decks.SettingsResolver.Resolve(ModeSolver.Decks.DeckReader.Parse(File.ReadAllText(args[1]), args[1]));
        if (args.Length >= 3)
        {
            var pars = new Dictionary<string, double>(s.Model.Parameters) { ["f"] = double.Parse(args[2], CultureInfo.InvariantCulture) };
            s = s with { Model = s.Model with { Parameters = pars } };
        }
        var run = SpectrumPipeline.RunPivot(s);
        var bg = run.Pivot.Background;
        double k = run.Pivot.ToBackgroundUnits(run.Pivot.KPivot);
        double[] depths = [20, 50, 100, 200, 400, 800, 1600];
        var settings = new ModeSettings { Tolerance = 1e-6, Derivatives = false };
        var auto = new ModeIntegrator().Solve(bg, k, settings);
        var reference = new ModeIntegrator().Solve(bg, k, settings with { StartDepth = 3200 });
        Console.WriteLine(FormattableString.Invariant($"pivot mode, tolerance 1e-6, no k-derivatives; reference: Runge-Kutta from k/aH = {reference.StartDepth:F0}"));
        Console.WriteLine(FormattableString.Invariant($"automatic start: k/aH = {auto.StartDepth:F1}, {auto.RhsEvaluations} RHS, dP/P = {auto.Ps / reference.Ps - 1:E2}, reported {auto.ErrorEstimate:E1}"));
        Console.WriteLine("asked depth | used depth | RK RHS | RK dP/P  | RK err  | propagator RHS | prop dP/P | prop err");
        foreach (double d in depths)
        {
            var rk = new ModeIntegrator().Solve(bg, k, settings with { StartDepth = d });
            var pr = new ModeIntegrator { UseOscillatoryRegime = true }.Solve(bg, k, settings with { StartDepth = d });
            Console.WriteLine(FormattableString.Invariant(
                $"{d,11:F0} | {rk.StartDepth,10:F1} | {rk.RhsEvaluations,6} | {rk.Ps / reference.Ps - 1,8:E1} | {rk.ErrorEstimate,7:E1} | {pr.RhsEvaluations,14} | {pr.Ps / reference.Ps - 1,9:E1} | {pr.ErrorEstimate,8:E1}"));
        }
    }
}
