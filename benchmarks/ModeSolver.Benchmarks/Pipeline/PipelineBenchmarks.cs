using System.Diagnostics;
using BenchmarkDotNet.Attributes;
using ModeSolver.Decks;
using ModeSolver.Diagnostics;
using ModeSolver.Pipeline;
using ModeSolver.Spectra;
using ModeSolver.Estimates;

namespace ModeSolver.Benchmarks.Pipeline;

/// <summary>Settings built in code for the pipeline benchmarks (scenarios of our own).</summary>
public static class BenchDecks
{
    /// <summary>An E-model plateau (alpha = 4) normalised to A_s = 2.1e-9, reheating to 1e10 GeV, 200 k in [1e-5, 1] /Mpc.</summary>
    public static RunSettings Plateau(int count = 200, double tolerance = 1e-5)
    {
        string deck = $$"""
            [model]
            catalogue = "e-model"
            [model.parameters]
            alpha = 4.0
            V0 = 1.0e-10
            [start]
            phi0 = 8.5
            [pivot]
            k = 0.05
            [reheating]
            w = 0.0
            temperature_gev = 1.0e10
            [normalisation]
            a_s = 2.1e-9
            [modes]
            k_min = 1.0e-5
            k_max = 1.0
            count = {{count}}
            tolerance = {{tolerance:R}}
            [output]
            dir = "unused"
            """;
        return SettingsResolver.Resolve(DeckReader.Parse(deck, "bench.toml"));
    }

    /// <summary>A grid of <paramref name="n"/> E-model variants: alpha in [1, 10] times T_reh in [1e6, 1e14] GeV.</summary>
    public static RunSettings[] PivotGrid(int n)
    {
        var baseSettings = Plateau(2);
        int nAlpha = (int)Math.Ceiling(Math.Sqrt(n));
        int nT = (n + nAlpha - 1) / nAlpha;
        var grid = new RunSettings[n];
        for (int i = 0; i < n; i++)
        {
            int ia = i % nAlpha, it = i / nAlpha;
            double alpha = nAlpha == 1 ? 4 : 1 + 9.0 * ia / (nAlpha - 1);
            double t = nT == 1 ? 1e10 : Math.Pow(10, 6 + 8.0 * it / (nT - 1));
            var pars = new Dictionary<string, double>(baseSettings.Model.Parameters) { ["alpha"] = alpha };
            grid[i] = baseSettings with
            {
                Model = baseSettings.Model with { Parameters = pars },
                Initial = new InitialConditions(2.2 * Math.Sqrt(alpha) + 4, null),
                Pivot = baseSettings.Pivot with { Reheating = baseSettings.Pivot.Reheating with { TemperatureGeV = t } },
            };
        }
        return grid;
    }

    /// <summary>Pivot-only runs of every grid point in parallel over all cores (as the sweep runner does); returns how many failed.</summary>
    public static int RunSweep(RunSettings[] grid, double[] ns)
    {
        int failed = 0;
        var po = new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount };
        Parallel.For(0, grid.Length, po, i =>
        {
            try { ns[i] = SpectrumPipeline.RunPivot(grid[i]).Exact.Ns; }
            catch (Exception) { Interlocked.Increment(ref failed); ns[i] = double.NaN; }
        });
        return failed;
    }

    /// <summary>The spectrum stages run directly: pivot run, exactly the 200 log-spaced k (no refinement), slow roll on every k.</summary>
    public static PrimordialSpectrum Stages(RunSettings s)
    {
        var run = SpectrumPipeline.RunPivot(s);
        var p = run.Pivot;
        var spec = SpectrumSolver.Compute(p.Background, new SpectrumSettings
        {
            KMin = p.ToBackgroundUnits(s.KRange.KMin), KMax = p.ToBackgroundUnits(s.KRange.KMax), KCount = s.KRange.Count,
            Tolerance = s.KRange.Tolerance, Refine = false,
        });
        double sum = 0;
        foreach (double k in spec.K) sum += SlowRoll.AtK(p.Background, k).SecondOrder.Ps;
        return sum > 0 ? spec : throw new InvalidOperationException("slow roll failed");
    }
}

/// <summary>
/// (b) A full 200-mode spectrum, 200 log-spaced k in [1e-5, 1] /Mpc, background, exact matching and normalisation
/// included: through <see cref="SpectrumPipeline.Run"/> (with its adaptive refinement and error-check re-runs) and
/// through the stages directly with refinement off (exactly 200 modes + error checks).
/// (c) A pivot-only sweep of 1,000 models over all cores.
/// </summary>
[MemoryDiagnoser]
public class PipelineBenchmarks
{
    private RunSettings _s = null!;
    private RunSettings[] _grid = null!;
    private readonly double[] _ns = new double[1000];

    [GlobalSetup]
    public void Setup()
    {
        _s = BenchDecks.Plateau();
        _grid = BenchDecks.PivotGrid(1000);
        var r = SpectrumPipeline.Run(_s);
        Console.WriteLine($"// pipeline: {r.Statistics.ModeCount} modes (200 asked, refinement on), {r.Statistics.RhsEvaluations} right-hand sides, "
            + $"{r.Pivot.RhsEvaluationsPerMode:F0} per mode, max rel. error {r.Pivot.MaxRelError:E2}, N_* = {r.Pivot.NStar:F4}, n_s = {r.Pivot.Ns:F6}");
        var st = BenchDecks.Stages(_s);
        long rhs = 0; foreach (int x in st.RhsEvaluations) rhs += x;
        Console.WriteLine($"// stages (refinement off): {st.K.Length} modes, mean {st.MeanRhsEvaluationsPerMode:F0} / max {st.MaxRhsEvaluationsPerMode} right-hand sides per mode, max rel. error {st.MaxRelativeError:E2}");
        var sw = Stopwatch.StartNew();
        int failed = BenchDecks.RunSweep(_grid, _ns);
        Console.WriteLine($"// pivot sweep: {_grid.Length} models, {failed} failed, {_grid.Length / sw.Elapsed.TotalSeconds:F0} models/s (first run)");
    }

    /// <summary>SpectrumPipeline.Run on 200 k (refinement and error checks as in the CLI).</summary>
    [Benchmark]
    public int FullSpectrumPipeline() => SpectrumPipeline.Run(_s).Statistics.ModeCount;

    /// <summary>Pivot run + exactly 200 modes (no refinement) + slow roll on every k.</summary>
    [Benchmark]
    public int FullSpectrumStages() => BenchDecks.Stages(_s).K.Length;

    /// <summary>1,000 pivot-only models (RunPivot) in parallel.</summary>
    [Benchmark]
    public int PivotSweep1000() => BenchDecks.RunSweep(_grid, _ns);
}
