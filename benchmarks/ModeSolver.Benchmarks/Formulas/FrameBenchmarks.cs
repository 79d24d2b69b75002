using System.Diagnostics;
using BenchmarkDotNet.Attributes;
using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Benchmarks.Formulas;

/// <summary>
/// One background right-hand side (V and K jets and the equation of motion, <c>BackgroundEquations.Constrained</c>) of
/// the metric Higgs-like theory Omega^2 = 1 + xi phi^2, V_J = lambda phi^4/4, in three forms:
/// the Jordan-frame deck on the fused generated program, the same Jordan-frame input on the former path (Taylor
/// arithmetic on the formulas' derivative series), and the equivalent Einstein-frame deck written out by hand
/// (V = V_J/Omega^4, K = 1/Omega^2 + (3/2)(2 xi phi/Omega^2)^2, both formulas on generated code).
/// Each invocation evaluates 1024 field values.
/// Run: dotnet run -c Release --project benchmarks/ModeSolver.Benchmarks -- --filter '*FrameBenchmarks*'
/// or the Stopwatch console mode `--frames` (ratios within one run).
/// </summary>
[SimpleJob(launchCount: 1, warmupCount: 3, iterationCount: 8)]
public class FrameBenchmarks
{
    private const int N = 1024;
    private readonly double[] _phi = new double[N];
    private readonly double[] _y = new double[2];
    private readonly double[] _dy = new double[2];
    private IInflatonTheory _fused = null!, _taylor = null!, _einstein = null!;

    /// <summary>The three theories (fused Jordan, Taylor-path Jordan, hand-written Einstein-frame equivalent).</summary>
    public static (IInflatonTheory Fused, IInflatonTheory Taylor, IInflatonTheory Einstein) Theories()
    {
        var pars = new Dictionary<string, double> { ["lambda"] = 0.1, ["xi"] = 100.0 };
        var w = Formula.Parse("1 + xi * phi^2", pars);
        var vj = Formula.Parse("lambda * phi^4 / 4", pars);
        var fused = JordanFrameTheory.FromFormulas(w, null, vj);
        if (!fused.IsFused) throw new InvalidOperationException("the fused program was not built");
        var taylor = new JordanFrameTheory(TheoryFactory.Wrap(w), null, TheoryFactory.Wrap(vj));
        var einstein = new EinsteinFrameTheory(Formula.Parse("lambda * phi^4 / 4 / (1 + xi * phi^2)^2", pars),
            Formula.Parse("1 / (1 + xi * phi^2) + 1.5 * (2 * xi * phi / (1 + xi * phi^2))^2", pars), "Einstein-frame equivalent");
        return (fused, taylor, einstein);
    }

    [GlobalSetup]
    public void Setup()
    {
        for (int i = 0; i < N; i++) _phi[i] = 0.05 + 1.0 * i / N;
        (_fused, _taylor, _einstein) = Theories();
    }

    private double Run(IInflatonTheory theory)
    {
        double s = 0;
        _y[1] = -0.01;
        foreach (double phi in _phi)
        {
            _y[0] = phi;
            BackgroundEquations.Constrained(theory, phi, _y, _dy);
            s += _dy[1];
        }
        return s;
    }

    /// <summary>The equivalent Einstein-frame formulas (the reference cost).</summary>
    [Benchmark(Baseline = true)]
    public double EinsteinEquivalent() => Run(_einstein);

    /// <summary>Jordan frame, fused generated program.</summary>
    [Benchmark]
    public double JordanFused() => Run(_fused);

    /// <summary>Jordan frame, the former Taylor-arithmetic path.</summary>
    [Benchmark]
    public double JordanTaylorPath() => Run(_taylor);

    /// <summary>Stopwatch medians of the three, interleaved in one process (console mode `--frames`).</summary>
    public static void Console(int rounds)
    {
        var b = new FrameBenchmarks();
        b.Setup();
        var names = new[] { "Einstein-frame equivalent (formulas V, K)", "Jordan frame, fused program", "Jordan frame, Taylor path (before)" };
        var runs = new Func<double>[] { b.EinsteinEquivalent, b.JordanFused, b.JordanTaylorPath };
        var t = new double[3][];
        for (int j = 0; j < 3; j++) t[j] = new double[rounds];
        for (int warm = 0; warm < 2000; warm++) foreach (var r in runs) r();
        for (int i = 0; i < rounds; i++)
            for (int j = 0; j < 3; j++)
            {
                var sw = Stopwatch.StartNew();
                for (int rep = 0; rep < 20; rep++) runs[j]();
                t[j][i] = sw.Elapsed.TotalSeconds / (20.0 * N);
            }
        double refNs = 0;
        for (int j = 0; j < 3; j++)
        {
            Array.Sort(t[j]);
            double ns = t[j][rounds / 2] * 1e9;
            if (j == 0) refNs = ns;
            System.Console.WriteLine($"{names[j],-45} {ns,7:F1} ns per right-hand side   {ns / refNs:F2}x");
        }
    }
}
