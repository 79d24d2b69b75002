using BenchmarkDotNet.Attributes;
using ModeSolver.Integrators;

namespace ModeSolver.Benchmarks.Integrators;

/// <summary>
/// The integrators on the standard test problems: Arenstorf orbit (non-stiff; Hairer, Norsett and Wanner I,
/// sec. II.0), Van der Pol with eps = 1e-6 and Robertson to t = 1e11 (stiff; Hairer and Wanner II, sec. IV.1).
/// The work counters of every case are printed once in the global setup (they appear in the benchmark log).
/// DOP853 is not run on the stiff problems: it exhausts any reasonable step budget there.
/// </summary>
[MemoryDiagnoser]
public class IntegratorBenchmarks
{
    private const double Mu = 0.012277471;
    private const double ArenstorfPeriod = 17.0652165601579625588917206249;

    private static void Arenstorf(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        const double mup = 1.0 - Mu;
        double y1 = y[0], y2 = y[1];
        double d1 = Math.Pow((y1 + Mu) * (y1 + Mu) + y2 * y2, 1.5);
        double d2 = Math.Pow((y1 - mup) * (y1 - mup) + y2 * y2, 1.5);
        f[0] = y[2];
        f[1] = y[3];
        f[2] = y1 + 2 * y[3] - mup * (y1 + Mu) / d1 - Mu * (y1 - mup) / d2;
        f[3] = y2 - 2 * y[2] - mup * y2 / d1 - Mu * y2 / d2;
    }

    private static void VanDerPol(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        f[0] = y[1];
        f[1] = ((1 - y[0] * y[0]) * y[1] - y[0]) / 1e-6;
    }

    private static void Robertson(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        double r1 = 0.04 * y[0], r2 = 3e7 * y[1] * y[1], r3 = 1e4 * y[1] * y[2];
        f[0] = -r1 + r3;
        f[1] = r1 - r3 - r2;
        f[2] = r2;
    }

    private static OdeProblem ArenstorfProblem() =>
        new(Arenstorf, 0.0, new[] { 0.994, 0.0, 0.0, -2.00158510637908252240537862224 }, ArenstorfPeriod);
    private static OdeProblem VanDerPolProblem() => new(VanDerPol, 0.0, new[] { 2.0, -0.66 }, 2.0);
    private static OdeProblem RobertsonProblem() => new(Robertson, 0.0, new[] { 1.0, 0.0, 0.0 }, 1e11);

    private static readonly OdeOptions ArenstorfOptions = new() { RelativeTolerance = 1e-10, AbsoluteTolerance = 1e-10, DenseOutput = false };
    private static readonly OdeOptions VanDerPolOptions = new() { RelativeTolerance = 1e-8, AbsoluteTolerance = 1e-8, DenseOutput = false };
    private static readonly OdeOptions RobertsonOptions = new() { RelativeTolerance = 1e-8, AbsoluteTolerance = 1e-14, DenseOutput = false };

    private readonly OdeProblem _arenstorf = ArenstorfProblem();
    private readonly OdeProblem _vanDerPol = VanDerPolProblem();
    private readonly OdeProblem _robertson = RobertsonProblem();
    private readonly DormandPrince853 _dop853 = new();
    private readonly RadauIIA5 _radau = new();
    private readonly AutoSwitching _auto = new();

    /// <summary>Prints the work counters of every benchmarked case.</summary>
    [GlobalSetup]
    public void PrintStatistics() => WriteStatistics(Console.Out);

    /// <summary>The work counters of every case, one line each.</summary>
    public static void WriteStatistics(TextWriter w)
    {
        (string, IOdeMethod, OdeProblem, OdeOptions)[] cases =
        {
            ("Arenstorf rtol 1e-10", new DormandPrince853(), ArenstorfProblem(), ArenstorfOptions),
            ("Arenstorf rtol 1e-10", new RadauIIA5(), ArenstorfProblem(), ArenstorfOptions),
            ("Arenstorf rtol 1e-10", new AutoSwitching(), ArenstorfProblem(), ArenstorfOptions),
            ("Van der Pol rtol 1e-8", new RadauIIA5(), VanDerPolProblem(), VanDerPolOptions),
            ("Van der Pol rtol 1e-8", new AutoSwitching(), VanDerPolProblem(), VanDerPolOptions),
            ("Robertson rtol 1e-8", new RadauIIA5(), RobertsonProblem(), RobertsonOptions),
            ("Robertson rtol 1e-8", new AutoSwitching(), RobertsonProblem(), RobertsonOptions),
        };
        foreach (var (label, method, problem, options) in cases)
        {
            var s = method.Solve(problem, options).Statistics;
            w.WriteLine($"// {label,-22} {method.Name,-13} accepted {s.AcceptedSteps,6} rejected {s.RejectedSteps,5} " +
                        $"f-evals {s.RhsEvaluations,7} jacobians {s.JacobianEvaluations,5} LU {s.Factorizations,5} switches {s.MethodSwitches}");
        }
    }

    [Benchmark] public double Arenstorf_DOP853() => _dop853.Solve(_arenstorf, ArenstorfOptions).FinalState[0];
    [Benchmark] public double Arenstorf_RadauIIA5() => _radau.Solve(_arenstorf, ArenstorfOptions).FinalState[0];
    [Benchmark] public double Arenstorf_AutoSwitching() => _auto.Solve(_arenstorf, ArenstorfOptions).FinalState[0];
    [Benchmark] public double VanDerPol_RadauIIA5() => _radau.Solve(_vanDerPol, VanDerPolOptions).FinalState[0];
    [Benchmark] public double VanDerPol_AutoSwitching() => _auto.Solve(_vanDerPol, VanDerPolOptions).FinalState[0];
    [Benchmark] public double Robertson_RadauIIA5() => _radau.Solve(_robertson, RobertsonOptions).FinalState[0];
    [Benchmark] public double Robertson_AutoSwitching() => _auto.Solve(_robertson, RobertsonOptions).FinalState[0];
}
