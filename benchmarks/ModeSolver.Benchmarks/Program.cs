using System.Diagnostics;
using BenchmarkDotNet.Running;
using ModeSolver.Benchmarks.Pipeline;
using ModeSolver.Pipeline;

// `--memory-sweep N`: a pivot-only sweep of N models in parallel, for peak memory (run under /usr/bin/time -v).
// `--profile`: Stopwatch timings (medians) of the spectrum pipeline, its stages and the pivot sweep, with work counts.
// `--sweep-scale N [--machinery] [--spectra M] [--threads T] [--out DIR]`: a pivot-only sweep of N points, peak memory and points/s
// (under mpirun: one line per rank).
// `--warm-deck DECK [REPS]`: warm median of SpectrumPipeline.Run on a deck, one line (for benchmarks/baseline/compare.py).
// `--frames [ROUNDS]`: background right-hand side, Jordan frame (fused, Taylor path) against the Einstein-frame equivalent.
// `--resonant-depths DECK [f]`: RHS work per mode against the start depth on a resonant deck, with and without the propagator.
// `--error-honesty [CASE] [--all]`: per-k error estimate against a 1000x tighter re-solve on the hard models (docs/modes.md).
// `--interpreter-times [ROUNDS]`: Stopwatch ns per evaluation of the one-variable interpreter and generated code (also builds native).
// `--multi-times [ROUNDS]`: the same for two-field MultiFormulas (value, orders 2 and 3).
// `--counts`: the deterministic work counts of ModeBenchmarks (right-hand sides of the quadratic pivot mode at 1e-6,
// and per mode of its 200-mode spectrum), without timing.
// `--fnl-speed [DECK] [REPS]`: equilateral f_NL at the pivot and a 200-point equilateral curve on 1 and 2 threads (docs/speed.md).
// Anything else: the BenchmarkDotNet switcher, e.g. `--filter '*' --job short`.
if (args.Length >= 1 && args[0] == "--interpreter-times")
{
    ModeSolver.Benchmarks.Formulas.InterpreterTimes.Run(args.Length >= 2 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 15);
    return;
}
if (args.Length >= 1 && args[0] == "--multi-times")
{
    ModeSolver.Benchmarks.Formulas.MultiFormulaTimes.Run(args.Length >= 2 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 15);
    return;
}
if (args.Length >= 1 && args[0] == "--counts")
{
    new ModeSolver.Benchmarks.Perturbations.ModeBenchmarks().Setup();
    return;
}
if (args.Length >= 2 && args[0] == "--resonant-depths")
{
    ModeSolver.Benchmarks.Perturbations.ResonantDepthWork.Run(args);
    return;
}
if (args.Length >= 1 && args[0] == "--fnl-speed")
{
    ModeSolver.Benchmarks.Bispectrum.BispectrumSpeed.Run(args);
    return;
}
if (args.Length >= 1 && args[0] == "--error-honesty")
{
    ModeSolver.Benchmarks.Perturbations.ErrorHonesty.Run(args);
    return;
}
if (args.Length >= 2 && args[0] == "--sweep-scale")
{
    ModeSolver.Benchmarks.Sweeps.SweepScaleBenchmark.Run(args);
    return;
}
if (args.Length >= 2 && args[0] == "--memory-sweep")
{
    int n = int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture);
    var grid = BenchDecks.PivotGrid(n);
    var ns = new double[n];
    var sw = Stopwatch.StartNew();
    int failed = BenchDecks.RunSweep(grid, ns);
    Console.WriteLine($"pivot sweep: {n} models, {failed} failed, {sw.Elapsed.TotalSeconds:F2} s, {n / sw.Elapsed.TotalSeconds:F0} models/s, "
        + $"GC heap {GC.GetTotalMemory(false) / 1e6:F1} MB, peak working set {Process.GetCurrentProcess().PeakWorkingSet64 / 1e6:F1} MB");
    return;
}
if (args.Length >= 2 && args[0] == "--warm-deck")
{
    // Warm median of SpectrumPipeline.Run on a deck (used by benchmarks/baseline/compare.py): one line, milliseconds.
    var s = ModeSolver.Decks.SettingsResolver.Resolve(ModeSolver.Decks.DeckReader.Parse(File.ReadAllText(args[1]), args[1]));
    int reps = args.Length >= 3 ? int.Parse(args[2], System.Globalization.CultureInfo.InvariantCulture) : 21;
    for (int i = 0; i < 40; i++) SpectrumPipeline.Run(s); // past tiered JIT
    var t = new double[reps];
    ModeSolver.Report.RunReport? last = null;
    for (int i = 0; i < reps; i++) { last = SpectrumPipeline.Run(s); t[i] = last.Statistics.WallSeconds; }
    Array.Sort(t);
    Console.WriteLine(FormattableString.Invariant($"warm_ms {t[reps / 2] * 1e3:F3} modes {last!.Statistics.ModeCount} rhs_per_mode {last.Pivot.RhsEvaluationsPerMode:F1} spectrum_rhs {last.Statistics.RhsEvaluations}"));
    return;
}
if (args.Length >= 1 && args[0] == "--frames")
{
    ModeSolver.Benchmarks.Formulas.FrameBenchmarks.Console(args.Length >= 2 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 41);
    return;
}
if (args.Length >= 3 && args[0] == "--loop")
{
    // For sampling profilers: repeat one piece of work (mode | pivot | spectrum | background) N times.
    var s = BenchDecks.Plateau();
    var run = SpectrumPipeline.RunPivot(s);
    double kp = run.Pivot.ToBackgroundUnits(run.Pivot.KPivot);
    int n = int.Parse(args[2], System.Globalization.CultureInfo.InvariantCulture);
    var sw = Stopwatch.StartNew();
    for (int i = 0; i < n; i++)
    {
        switch (args[1])
        {
            case "mode": ModeSolver.Spectra.PivotValues.Compute(run.Pivot.Background, kp, 1e-6); break;
            case "pivot": SpectrumPipeline.RunPivot(s); break;
            case "spectrum": SpectrumPipeline.Run(s); break;
            case "stages": BenchDecks.Stages(s); break;
            case "background": ModeSolver.Background.BackgroundSolver.Solve(run.Theory, SpectrumPipeline.BackgroundSettingsFor(s)); break;
            case "theory": ModeSolver.Decks.TheoryFactory.Build(s); break;
            default: throw new ArgumentException("unknown loop " + args[1]);
        }
    }
    Console.WriteLine($"{args[1]} x {n}: {sw.Elapsed.TotalMilliseconds / n:F3} ms each");
    return;
}
if (args.Length >= 1 && args[0] == "--profile")
{
    int reps = args.Length >= 2 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 15;
    var s = BenchDecks.Plateau();
    double Median(Func<double> f, int count = 0)
    {
        count = count > 0 ? count : reps;
        var t = new double[count];
        for (int i = 0; i < count; i++) t[i] = f();
        Array.Sort(t);
        return t[count / 2];
    }
    for (int i = 0; i < 40; i++) { SpectrumPipeline.Run(s); BenchDecks.Stages(s); } // past tiered JIT
    var stageNames = new List<string>();
    var stageTimes = new Dictionary<string, List<double>>();
    double full = Median(() =>
    {
        var r = SpectrumPipeline.Run(s);
        foreach (var st in r.Statistics.Stages)
        {
            if (!stageTimes.TryGetValue(st.Stage, out var l)) { stageTimes[st.Stage] = l = []; stageNames.Add(st.Stage); }
            l.Add(st.Seconds);
        }
        return r.Statistics.WallSeconds;
    });
    var rep = SpectrumPipeline.Run(s);
    Console.WriteLine($"SpectrumPipeline.Run, 200 k: median {full * 1e3:F1} ms over {reps}; {rep.Statistics.ModeCount} modes, "
        + $"{rep.Pivot.RhsEvaluationsPerMode:F0} rhs/mode, {rep.Statistics.RhsEvaluations} rhs in the spectrum");
    foreach (var name in stageNames)
    {
        var l = stageTimes[name]; l.Sort();
        Console.WriteLine($"  {name}: median {l[l.Count / 2] * 1e3:F2} ms");
    }
    double pivotOnly = Median(() => { var sw = Stopwatch.StartNew(); SpectrumPipeline.RunPivot(s); return sw.Elapsed.TotalSeconds; });
    Console.WriteLine($"RunPivot (one model, one thread): median {pivotOnly * 1e3:F2} ms");
    var theory = ModeSolver.Decks.TheoryFactory.Build(s);
    var bgSettings = SpectrumPipeline.BackgroundSettingsFor(s);
    var bg0 = ModeSolver.Background.BackgroundSolver.Solve(theory, bgSettings);
    double tBg = Median(() => { var sw = Stopwatch.StartNew(); ModeSolver.Background.BackgroundSolver.Solve(theory, bgSettings); return sw.Elapsed.TotalSeconds; });
    var amp = new ModeSolver.Spectra.ExactAmplitude(1e-6);
    var match = ModeSolver.Matching.PivotMatcher.Match(bg0, SpectrumPipeline.PivotSettingsFor(s), amp);
    double tMatch = Median(() => { var sw = Stopwatch.StartNew(); ModeSolver.Matching.PivotMatcher.Match(bg0, SpectrumPipeline.PivotSettingsFor(s), amp); return sw.Elapsed.TotalSeconds; });
    double kp = match.ToBackgroundUnits(match.KPivot);
    var pv = ModeSolver.Spectra.PivotValues.Compute(match.Background, kp, 1e-6);
    double tPv = Median(() => { var sw = Stopwatch.StartNew(); ModeSolver.Spectra.PivotValues.Compute(match.Background, kp, 1e-6); return sw.Elapsed.TotalSeconds; });
    double tAmp = Median(() => { var sw = Stopwatch.StartNew(); amp.ScalarPower(match.Background, kp); return sw.Elapsed.TotalSeconds; });
    double tAt = Median(() => { var sw = Stopwatch.StartNew(); double acc = 0; for (int i = 0; i < 10000; i++) acc += bg0.At(bg0.NStart + (bg0.NEnd - bg0.NStart) * i / 10000.0).H; return acc > 0 ? sw.Elapsed.TotalSeconds / 10000 : 0; });
    Console.WriteLine($"  background solve {tBg * 1e3:F2} ms; matching {tMatch * 1e3:F2} ms ({match.Iterations} iterations, exact scalar mode {tAmp * 1e3:F2} ms); "
        + $"pivot mode {tPv * 1e3:F2} ms ({pv.RhsEvaluations} rhs); BackgroundSolution.At {tAt * 1e9:F0} ns");
    double stages = Median(() => { var sw = Stopwatch.StartNew(); BenchDecks.Stages(s); return sw.Elapsed.TotalSeconds; });
    Console.WriteLine($"Stages, exactly 200 modes (no refinement): median {stages * 1e3:F1} ms");
    var grid = BenchDecks.PivotGrid(1000);
    var ns = new double[grid.Length];
    BenchDecks.RunSweep(grid, ns);
    double sweep = Median(() => { var sw = Stopwatch.StartNew(); BenchDecks.RunSweep(grid, ns); return sw.Elapsed.TotalSeconds; }, 3);
    Console.WriteLine($"Pivot sweep, 1000 models, {Environment.ProcessorCount} cores: median {sweep:F2} s = {grid.Length / sweep:F0} models/s");
    return;
}
BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
