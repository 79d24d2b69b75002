using BenchmarkDotNet.Attributes;
using ModeSolver.Formulas;

namespace ModeSolver.Benchmarks.Formulas;

/// <summary>
/// Formulas in two fields (<see cref="MultiFormula"/>): a two-field potential and a field-space metric component, value,
/// order 2 (gradient and Hessian) and order 3 (third partials too), generated code against the interpreter (the path
/// of builds without a JIT). Each invocation evaluates 1024 points.
/// Run: dotnet run -c Release --project benchmarks/ModeSolver.Benchmarks -- --filter '*MultiFormulaBenchmarks*'
/// </summary>
[SimpleJob(launchCount: 1, warmupCount: 3, iterationCount: 8)]
public class MultiFormulaBenchmarks
{
    private const int N = 1024;
    private readonly double[] _x = new double[2 * N];
    private readonly double[] _g = new double[2], _h = new double[4], _t = new double[8];
    private MultiFormula _potential = null!;
    private MultiFormula _metric = null!;

    /// <summary>The formula: a two-field potential or an exponential metric component.</summary>
    [Params("potential", "metric")]
    public string Case { get; set; } = "potential";

    private MultiFormula F => Case == "potential" ? _potential : _metric;

    [GlobalSetup]
    public void Setup()
    {
        for (int i = 0; i < N; i++) { _x[2 * i] = 0.1 + 5.0 * i / N; _x[2 * i + 1] = -1 + 2.0 * i / N; }
        var p = new Dictionary<string, double> { ["V0"] = 2e-10, ["alpha"] = 1.0, ["m"] = 1e-6, ["b"] = 0.4, ["g"] = 0.1 };
        _potential = Formula.Compile("V0*tanh(phi/sqrt(6*alpha))^2 + 0.5*m^2*chi^2 + g*phi^2*chi^2", ["phi", "chi"], p);
        _metric = Formula.Compile("exp(2*b*phi)*(1 + g*chi^2)", ["phi", "chi"], p);
        Order3Generated(); Order3Interpreted(); Order2Generated(); ValueGenerated(); // compile every order first
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double ValueGenerated()
    {
        var f = F;
        double s = 0;
        for (int i = 0; i < N; i++) s += f.Value(_x.AsSpan(2 * i, 2));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double ValueInterpreted()
    {
        var f = F;
        double s = 0;
        for (int i = 0; i < N; i++) s += f.ValueInterpreted(_x.AsSpan(2 * i, 2));
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double Order2Generated()
    {
        var f = F;
        double s = 0;
        for (int i = 0; i < N; i++) s += f.Evaluate(_x.AsSpan(2 * i, 2), _g, _h) + _h[1];
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double Order2Interpreted()
    {
        var f = F;
        double s = 0;
        for (int i = 0; i < N; i++) s += f.EvaluateInterpreted(_x.AsSpan(2 * i, 2), _g, _h, Span<double>.Empty) + _h[1];
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double Order3Generated()
    {
        var f = F;
        double s = 0;
        for (int i = 0; i < N; i++) s += f.Evaluate(_x.AsSpan(2 * i, 2), _g, _h, _t) + _t[3];
        return s;
    }

    [Benchmark(OperationsPerInvoke = N)]
    public double Order3Interpreted()
    {
        var f = F;
        double s = 0;
        for (int i = 0; i < N; i++) s += f.EvaluateInterpreted(_x.AsSpan(2 * i, 2), _g, _h, _t) + _t[3];
        return s;
    }
}
