using BenchmarkDotNet.Attributes;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Benchmarks.Formulas;

/// <summary>
/// The register interpreter alone (the path of builds without a JIT, e.g. the native library) against the generated
/// code, on the T-model and on a formula using most kernels. Each invocation evaluates 1024 points.
/// Run: dotnet run -c Release --project benchmarks/ModeSolver.Benchmarks -- --filter '*InterpreterBenchmarks*'
/// </summary>
[SimpleJob(launchCount: 1, warmupCount: 3, iterationCount: 8)]
public class InterpreterBenchmarks
{
    private const int N = 1024;
    private readonly double[] _phi = new double[N];
    private Formula _tModel = null!;
    private Formula _mixed = null!;

    [GlobalSetup]
    public void Setup()
    {
        for (int i = 0; i < N; i++) _phi[i] = 0.1 + 5.0 * i / N;
        _tModel = Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2", new Dictionary<string, double> { ["V0"] = 2e-10, ["alpha"] = 1.0 });
        _mixed = Formula.Parse("exp(-0.3*phi)*(1 + sin(phi)^2) / (2 + cos(phi)) + log(1 + phi^2) * sqrt(phi) - atan(phi)^3 + phi^1.5");
    }

    private static double Sum(Jet3 j) => j.Value + j.D1 + j.D2 + j.D3;

    [Benchmark(OperationsPerInvoke = N)]
    public double TModelJetInterpreted()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_tModel.EvaluateInterpreted(p));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double TModelValueInterpreted()
    {
        double s = 0;
        foreach (double p in _phi) s += _tModel.ValueInterpreted(p);
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double MixedJetInterpreted()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_mixed.EvaluateInterpreted(p));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double MixedValueInterpreted()
    {
        double s = 0;
        foreach (double p in _phi) s += _mixed.ValueInterpreted(p);
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double MixedJetGenerated()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_mixed.Evaluate(p));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double MixedValueGenerated()
    {
        double s = 0;
        foreach (double p in _phi) s += _mixed.Value(p);
        return s;
    }
}
