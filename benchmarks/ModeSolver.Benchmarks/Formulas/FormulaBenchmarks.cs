using BenchmarkDotNet.Attributes;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Benchmarks.Formulas;

/// <summary>
/// Formula evaluation (value, and the order-3 jet) against hand-written C# for the same potentials:
/// the quadratic 0.5 m^2 phi^2 and the T-model V0 tanh^2(phi/sqrt(6 alpha)). Each invocation evaluates 1024 points.
/// Run: dotnet run -c Release --project benchmarks/ModeSolver.Benchmarks -- --filter '*FormulaBenchmarks*'
/// </summary>
[MemoryDiagnoser]
[SimpleJob(launchCount: 1, warmupCount: 3, iterationCount: 8)]
public class FormulaBenchmarks
{
    private const int N = 1024;
    private const double M = 6e-6, V0 = 2e-10, Alpha = 1.0;
    // The hand-written code reads its parameters at run time (as it would from a deck), not as compile-time constants.
    private double _m2 = M * M, _v0 = V0, _s = Math.Sqrt(6 * Alpha);
    private readonly double[] _phi = new double[N];
    private Formula _quadratic = null!;
    private Formula _tModel = null!;
    private Formula _quadraticProgram = null!;

    [GlobalSetup]
    public void Setup()
    {
        for (int i = 0; i < N; i++) _phi[i] = -10 + 20.0 * i / N;
        _quadratic = Formula.Parse("0.5*m^2*phi^2", new Dictionary<string, double> { ["m"] = M });
        // Same function written so that it misses the monomial fast path: its public Evaluate and Value run the generated
        // code (where the runtime compiles code), its *Interpreted entry points the register interpreter.
        _quadraticProgram = Formula.Parse("0.5*m^2*phi*phi", new Dictionary<string, double> { ["m"] = M });
        _tModel = Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2", new Dictionary<string, double> { ["V0"] = V0, ["alpha"] = Alpha });
    }

    private Jet3 QuadraticByHand(double phi)
    {
        double m2 = _m2;
        return new Jet3(0.5 * m2 * phi * phi, m2 * phi, m2, 0);
    }

    private Jet3 TModelByHand(double phi)
    {
        double S = _s, V0 = _v0;
        double x = phi / S, t = Math.Tanh(x), ch = Math.Cosh(x), sech2 = 1 / (ch * ch);
        return new Jet3(V0 * t * t, 2 * V0 * t * sech2 / S, 2 * V0 * sech2 * (sech2 - 2 * t * t) / (S * S),
            8 * V0 * t * sech2 * (t * t - 2 * sech2) / (S * S * S));
    }

    private static double Sum(Jet3 j) => j.Value + j.D1 + j.D2 + j.D3;

    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticJetHand()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(QuadraticByHand(p));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticJetFormula()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_quadratic.Evaluate(p));
        return s;
    }

    /// <summary>The order-3 interpreter on the non-monomial form (before, this ran the generated code through <c>Evaluate</c>).</summary>
    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticJetInterpreted()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_quadraticProgram.EvaluateInterpreted(p));
        return s;
    }

    /// <summary>The generated order-3 code on the non-monomial form (the public path where the runtime compiles code).</summary>
    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticJetGenerated()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_quadraticProgram.Evaluate(p));
        return s;
    }

    /// <summary>The value interpreter on the non-monomial form (before, this ran the generated code through <c>Value</c>).</summary>
    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticValueInterpreted()
    {
        double s = 0;
        foreach (double p in _phi) s += _quadraticProgram.ValueInterpreted(p);
        return s;
    }

    /// <summary>The generated value code on the non-monomial form.</summary>
    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticValueGenerated()
    {
        double s = 0;
        foreach (double p in _phi) s += _quadraticProgram.Value(p);
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticValueHand()
    {
        double s = 0;
        foreach (double p in _phi) s += 0.5 * _m2 * p * p;
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double QuadraticValueFormula()
    {
        double s = 0;
        foreach (double p in _phi) s += _quadratic.Value(p);
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double TModelJetHand()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(TModelByHand(p));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double TModelJetFormula()
    {
        double s = 0;
        foreach (double p in _phi) s += Sum(_tModel.Evaluate(p));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double TModelValueHand()
    {
        double s = 0;
        foreach (double p in _phi)
        {
            double t = Math.Tanh(p / _s);
            s += _v0 * t * t;
        }
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double TModelValueFormula()
    {
        double s = 0;
        foreach (double p in _phi) s += _tModel.Value(p);
        return s;
    }
}
