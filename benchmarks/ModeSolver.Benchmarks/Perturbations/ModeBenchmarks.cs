using BenchmarkDotNet.Attributes;
using ModeSolver.Background;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Perturbations;
using ModeSolver.Spectra;

namespace ModeSolver.Benchmarks.Perturbations;

/// <summary>
/// One exact mode of the quadratic model at its pivot (N_* = 60, tolerance 1e-6) and a 200-mode spectrum around it.
/// Prints the right-hand-side evaluations per mode (the target is at most 600 at 1e-6).
/// </summary>
[MemoryDiagnoser]
public class ModeBenchmarks
{
    private sealed class Quadratic : IInflatonTheory
    {
        public string Description => "m^2 phi^2 / 2";
        public Jet3 Potential(double phi) => new(0.5e-10 * phi * phi, 1e-10 * phi, 1e-10, 0);
        public Jet3 Kinetic(double phi) => new(1, 0, 0, 0);
        public bool IsCanonical => true;
        public IReadOnlyList<double> NonSmoothPoints => Array.Empty<double>();
        public (double Min, double Max) ValidRange => (double.NegativeInfinity, double.PositiveInfinity);
    }

    private BackgroundSolution _bg = null!;
    private double _kPivot;
    private readonly ModeIntegrator _integrator = new();
    private readonly ModeSettings _settings = new() { Tolerance = 1e-6 };

    [GlobalSetup]
    public void Setup()
    {
        _bg = BackgroundSolver.Solve(new Quadratic(), new BackgroundSettings { Phi0 = 17.5, Tolerance = 1e-12, InflationMethod = new DormandPrince853() });
        double n = _bg.NEnd - 60;
        _kPivot = Math.Exp(n) * _bg.At(n).H;
        var m = _integrator.Solve(_bg, _kPivot, _settings);
        var reference = _integrator.Solve(_bg, _kPivot, new ModeSettings { Tolerance = 1e-9 });
        Console.WriteLine($"// pivot mode: {m.RhsEvaluations} right-hand sides, start k/aH = {m.StartDepth:F1}, stop k/aH = {m.FinalDepth:E1}, "
            + $"P_s off the 1e-9 run by {m.Ps / reference.Ps - 1:E2}, P_t by {m.Pt / reference.Pt - 1:E2}, n_s by {m.Ns - reference.Ns:E2}; error estimate {m.ErrorEstimate:E2}");
        var spec = Spectrum();
        Console.WriteLine($"// 200-mode spectrum: {spec.Count} samples, right-hand sides per mode mean {spec.MeanRhsEvaluationsPerMode:F0}, max {spec.MaxRhsEvaluationsPerMode}, largest error estimate {spec.MaxRelativeError:E2}");
    }

    /// <summary>One scalar+tensor mode with k-derivatives at the pivot, tolerance 1e-6.</summary>
    [Benchmark]
    public double PivotMode() => _integrator.Solve(_bg, _kPivot, _settings).Ps;

    /// <summary>200 log-spaced modes over 10 e-folds of k around the pivot (no refinement), all cores.</summary>
    [Benchmark]
    public PrimordialSpectrum Spectrum() => SpectrumSolver.Compute(_bg, new SpectrumSettings
    {
        KMin = _kPivot * Math.Exp(-5), KMax = _kPivot * Math.Exp(5), KCount = 200, Tolerance = 3e-6, Refine = false, ErrorChecks = 3,
    });
}
