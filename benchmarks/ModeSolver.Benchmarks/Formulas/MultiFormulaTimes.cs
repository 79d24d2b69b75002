using System.Diagnostics;
using ModeSolver.Formulas;

namespace ModeSolver.Benchmarks.Formulas;

/// <summary>
/// `--multi-times [ROUNDS]`: nanoseconds per evaluation of the formulas of <see cref="MultiFormulaBenchmarks"/> (two
/// fields), value and orders 2 and 3, through the public path (generated code where the runtime compiles) and the
/// interpreter; best of ROUNDS Stopwatch rounds of 1024 points x 20 (the least disturbed round on a shared machine).
/// </summary>
public static class MultiFormulaTimes
{
    private const int Points = 1024, Repeats = 20;

    /// <summary>Prints one line per formula.</summary>
    public static void Run(int rounds)
    {
        var p = new Dictionary<string, double> { ["V0"] = 2e-10, ["alpha"] = 1.0, ["m"] = 1e-6, ["b"] = 0.4, ["g"] = 0.1 };
        var cases = new (string Name, MultiFormula F)[]
        {
            ("potential", Formula.Compile("V0*tanh(phi/sqrt(6*alpha))^2 + 0.5*m^2*chi^2 + g*phi^2*chi^2", ["phi", "chi"], p)),
            ("metric", Formula.Compile("exp(2*b*phi)*(1 + g*chi^2)", ["phi", "chi"], p)),
        };
        var x = new double[2 * Points];
        for (int i = 0; i < Points; i++) { x[2 * i] = 0.1 + 5.0 * i / Points; x[2 * i + 1] = -1 + 2.0 * i / Points; }
        Console.WriteLine($"runtime compiles code: {System.Runtime.CompilerServices.RuntimeFeature.IsDynamicCodeCompiled}; best of {rounds} rounds, ns per evaluation (public path / interpreter)");
        foreach (var (name, f) in cases)
        {
            var line = new System.Text.StringBuilder(FormattableString.Invariant($"{name,-10}"));
            foreach (int order in new[] { 0, 2, 3 })
            {
                double pub = Best(f, x, order, false, rounds), interp = Best(f, x, order, true, rounds);
                line.Append(FormattableString.Invariant($"  {(order == 0 ? "value" : "order " + order)} {pub,7:F1} / {interp,7:F1}"));
            }
            Console.WriteLine(line);
        }
    }

    private static double Best(MultiFormula f, double[] x, int order, bool interpreted, int rounds)
    {
        double best = double.PositiveInfinity, sink = 0;
        var (g, h, t) = (new double[2], new double[order >= 2 ? 4 : 0], new double[order >= 3 ? 8 : 0]);
        for (int r = 0; r < rounds + 3; r++) // the first rounds warm up (tiered compilation, code generation)
        {
            var sw = Stopwatch.StartNew();
            for (int k = 0; k < Repeats; k++)
                for (int i = 0; i < Points; i++)
                {
                    var point = x.AsSpan(2 * i, 2);
                    sink += order == 0 ? (interpreted ? f.ValueInterpreted(point) : f.Value(point))
                          : interpreted ? f.EvaluateInterpreted(point, g, h, t) : f.Evaluate(point, g, h, t);
                }
            double ns = sw.Elapsed.TotalNanoseconds / (Repeats * Points);
            if (r >= 3) best = Math.Min(best, ns);
        }
        return double.IsNaN(sink) ? double.NaN : best;
    }
}
