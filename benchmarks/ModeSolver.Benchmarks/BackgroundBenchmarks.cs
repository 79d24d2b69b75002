using BenchmarkDotNet.Attributes;
using ModeSolver.Background;
using ModeSolver.Models;

namespace ModeSolver.Benchmarks;

/// <summary>Background hot paths: dense output At(N), horizon exit, and a full solve (quadratic model).</summary>
[MemoryDiagnoser]
public class BackgroundBenchmarks
{
    private sealed class QuadraticTheory : IInflatonTheory
    {
        public string Description => "phi^2/2";
        public Jet3 Potential(double phi) => new(0.5 * phi * phi, phi, 1, 0);
        public Jet3 Kinetic(double phi) => new(1, 0, 0, 0);
        public bool IsCanonical => true;
        public IReadOnlyList<double> NonSmoothPoints => Array.Empty<double>();
        public (double Min, double Max) ValidRange => (double.NegativeInfinity, double.PositiveInfinity);
    }

    private BackgroundSolution _bg = null!;
    private double _k;

    [GlobalSetup]
    public void Setup()
    {
        _bg = BackgroundSolver.Solve(new QuadraticTheory(), new BackgroundSettings { Phi0 = 16 }).WithVScale(1e-10);
        _k = Math.Exp(_bg.NEnd - 50) * _bg.At(_bg.NEnd - 50).H;
    }

    /// <summary>1000 dense evaluations spread over the whole solution.</summary>
    [Benchmark]
    public double At1000()
    {
        double s = 0, stop = _bg.NStop;
        for (int i = 0; i < 1000; i++) s += _bg.At(stop * i / 1000.0).Epsilon2;
        return s;
    }

    [Benchmark]
    public double HorizonExit() => _bg.NAtHorizonExit(_k);

    [Benchmark]
    public BackgroundSolution SolveQuadratic() => BackgroundSolver.Solve(new QuadraticTheory(), new BackgroundSettings { Phi0 = 16 });
}
