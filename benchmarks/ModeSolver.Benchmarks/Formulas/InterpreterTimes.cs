using System.Diagnostics;
using ModeSolver.Formulas;

namespace ModeSolver.Benchmarks.Formulas;

/// <summary>
/// `--interpreter-times [ROUNDS]`: nanoseconds per evaluation of the one-variable formula paths (the order-3
/// interpreter, the value interpreter, and the public path, which is generated code where the runtime compiles) on the
/// formulas of <see cref="InterpreterBenchmarks"/> and the quadratic of <see cref="FormulaBenchmarks"/>, best of ROUNDS
/// Stopwatch rounds of 1024 points x 20. A plain harness that also runs in a native AOT build, where BenchmarkDotNet
/// does not; the best round is the least disturbed one on a shared machine.
/// </summary>
public static class InterpreterTimes
{
    private const int Points = 1024, Repeats = 20;

    private enum Path { Jet, Value, PublicJet }

    /// <summary>Prints one line per formula.</summary>
    public static void Run(int rounds)
    {
        var cases = new (string Name, Formula F)[]
        {
            ("t-model", Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2", new Dictionary<string, double> { ["V0"] = 2e-10, ["alpha"] = 1.0 })),
            ("mixed", Formula.Parse("exp(-0.3*phi)*(1 + sin(phi)^2) / (2 + cos(phi)) + log(1 + phi^2) * sqrt(phi) - atan(phi)^3 + phi^1.5")),
            ("quadratic", Formula.Parse("0.5*m^2*phi*phi", new Dictionary<string, double> { ["m"] = 6e-6 })),
        };
        var phi = new double[Points];
        for (int i = 0; i < Points; i++) phi[i] = 0.1 + 5.0 * i / Points;
        Console.WriteLine($"runtime compiles code: {System.Runtime.CompilerServices.RuntimeFeature.IsDynamicCodeCompiled}; best of {rounds} rounds, ns per evaluation");
        foreach (var (name, f) in cases)
        {
            double jet = Best(f, phi, Path.Jet, rounds), value = Best(f, phi, Path.Value, rounds), pub = Best(f, phi, Path.PublicJet, rounds);
            Console.WriteLine(FormattableString.Invariant($"{name,-10} order-3 interpreter {jet,8:F1}   value interpreter {value,8:F1}   Evaluate (public path) {pub,8:F1}"));
        }
    }

    private static double Best(Formula f, double[] phi, Path path, int rounds)
    {
        double best = double.PositiveInfinity, sink = 0;
        for (int r = 0; r < rounds + 3; r++) // the first rounds warm up (tiered compilation)
        {
            var sw = Stopwatch.StartNew();
            for (int k = 0; k < Repeats; k++) sink += Loop(f, phi, path);
            double ns = sw.Elapsed.TotalNanoseconds / (Repeats * Points);
            if (r >= 3) best = Math.Min(best, ns);
        }
        return double.IsNaN(sink) ? double.NaN : best;
    }

    private static double Loop(Formula f, double[] phi, Path path)
    {
        double s = 0;
        switch (path)
        {
            case Path.Jet:
                foreach (double p in phi) { var j = f.EvaluateInterpreted(p); s += j.Value + j.D1 + j.D2 + j.D3; }
                break;
            case Path.Value:
                foreach (double p in phi) s += f.ValueInterpreted(p);
                break;
            default:
                foreach (double p in phi) { var j = f.Evaluate(p); s += j.Value + j.D1 + j.D2 + j.D3; }
                break;
        }
        return s;
    }
}
