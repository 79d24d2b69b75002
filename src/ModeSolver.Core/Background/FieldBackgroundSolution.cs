using ModeSolver.Models;

namespace ModeSolver.Background;

/// <summary>The n-field background at one instant (the field values and velocities go to caller spans).</summary>
/// <param name="N">E-folds since the start of the integration.</param>
/// <param name="H">Hubble rate, reduced Planck units, unscaled potential.</param>
/// <param name="Epsilon1">G_IJ phi'^I phi'^J / 2.</param>
/// <param name="Epsilon2">d ln epsilon_1 / dN from the analytic e1' = phi'_I D_N phi'^I.</param>
public readonly record struct FieldBackgroundPoint(double N, double H, double Epsilon1, double Epsilon2);

/// <summary>
/// The exact background of an n-field theory in e-folds since the start (N = 0), with dense output of the 2n-dimensional
/// state. Made by <see cref="FieldBackgroundSolver"/>; read-only and safe to share between threads.
/// </summary>
public sealed class FieldBackgroundSolution
{
    private readonly BackgroundSegment[] _segments;
    private readonly double[] _starts;

    private FieldBackgroundSolution(IFieldTheory theory, BackgroundOutcome o)
    {
        Theory = theory;
        _segments = o.Segments.ToArray();
        _starts = new double[_segments.Length];
        for (int i = 0; i < _segments.Length; i++) _starts[i] = _segments[i].Start;
        NEnd = o.NEnd;
        EndCrossings = o.Crossings.ToArray();
        RisingCrossings = o.Rising.ToArray();
        NonSmoothTimes = o.NonSmooth.ToArray();
        EndedAtSurface = o.EndedAtSurface;
        ContinuationNote = o.ContinuationNote;
        ContinuationStop = o.ContinuationStop;
    }

    internal static FieldBackgroundSolution Create(IFieldTheory theory, BackgroundOutcome outcome) => new(theory, outcome);

    /// <summary>The theory this background solves.</summary>
    public IFieldTheory Theory { get; }

    /// <summary>The number of fields n.</summary>
    public int FieldCount => Theory.FieldCount;

    /// <summary>First N (0).</summary>
    public double NStart => _segments[0].Start;

    /// <summary>Last N (after the end when the run continued).</summary>
    public double NStop => _segments[^1].Stop;

    /// <summary>The N taken as the end of inflation.</summary>
    public double NEnd { get; }

    /// <summary>E-folds of inflation, NEnd - NStart.</summary>
    public double NTotal => NEnd - NStart;

    /// <summary>Every N where epsilon_1 crosses 1, either way, ascending.</summary>
    public IReadOnlyList<double> EndCrossings { get; }

    /// <summary>The upward epsilon_1 = 1 crossings, ascending.</summary>
    public IReadOnlyList<double> RisingCrossings { get; }

    /// <summary>N values where the fields crossed a non-smooth surface of the theory.</summary>
    public IReadOnlyList<double> NonSmoothTimes { get; }

    /// <summary>True when inflation ended on the end surface rather than at epsilon_1 = 1.</summary>
    public bool EndedAtSurface { get; }

    /// <summary>Null unless the continuation after the end stopped early (the warning line).</summary>
    public string? ContinuationNote { get; }

    /// <summary>Null unless the continuation stopped early as expected (the note line).</summary>
    public string? ContinuationStop { get; }

    /// <summary>Number of integration pieces.</summary>
    public int SegmentCount => _segments.Length;

    private int SegmentIndex(double n)
    {
        int lo = 0, hi = _starts.Length - 1;
        while (lo < hi)
        {
            int mid = (lo + hi + 1) >> 1;
            if (_starts[mid] <= n) lo = mid; else hi = mid - 1;
        }
        return lo;
    }

    /// <summary>
    /// The background at N: the fields into <paramref name="phi"/> and their velocities d phi^I/dN into <paramref name="dphi"/>
    /// (n each), H, epsilon_1 and epsilon_2 returned. Allocation-free for n up to 16.
    /// </summary>
    public FieldBackgroundPoint At(double n, Span<double> phi, Span<double> dphi)
    {
        n = EfoldRange.Clamp(n, NStart, NStop);
        int f = FieldCount;
        var seg = _segments[SegmentIndex(n)];
        int dim = seg.Regular ? 2 * f + 1 : 2 * f;
        Span<double> y = dim <= 64 ? stackalloc double[dim] : new double[dim];
        seg.Solution.Evaluate(Math.Min(n, seg.Stop), y);
        y[..f].CopyTo(phi);
        y.Slice(f, f).CopyTo(dphi);
        Span<double> grad = f <= 16 ? stackalloc double[f] : new double[f];
        Span<double> g = f <= 16 ? stackalloc double[f * f] : new double[f * f];
        double v = Theory.PotentialGradient(y, grad);
        Theory.Metric(y, g);
        var p = y.Slice(f, f);
        double e1 = CovariantBackgroundEquations.Epsilon1(g, p, f);
        double hsq = seg.Regular ? Math.Exp(2.0 * y[2 * f]) : v / (3.0 - e1);
        double dv = 0;
        for (int i = 0; i < f; i++) dv += p[i] * grad[i];
        double e1d = -(3.0 - e1) * 2.0 * e1 - dv / hsq;
        return new FieldBackgroundPoint(n, Math.Sqrt(hsq), e1, e1 != 0 ? e1d / e1 : 0.0);
    }

    /// <summary>
    /// The background at N with every field-space quantity of <see cref="FieldPoint"/> (the Riemann tensor only with
    /// <paramref name="riemann"/>), written into <paramref name="point"/>. Allocation-free.
    /// </summary>
    public void Evaluate(double n, FieldPoint point, bool riemann = false)
    {
        ArgumentNullException.ThrowIfNull(point);
        if (point.FieldCount != FieldCount) throw new ArgumentException($"the workspace is for {point.FieldCount} fields, the background has {FieldCount}", nameof(point));
        n = EfoldRange.Clamp(n, NStart, NStop);
        int f = FieldCount;
        var seg = _segments[SegmentIndex(n)];
        var y = point.State.AsSpan(0, seg.Regular ? 2 * f + 1 : 2 * f);
        seg.Solution.Evaluate(Math.Min(n, seg.Stop), y);
        y[..f].CopyTo(point.Phi);
        y.Slice(f, f).CopyTo(point.DPhi);
        point.Complete(Theory, n, seg.Regular ? y[2 * f] : double.NaN, riemann);
    }

    /// <summary>The accepted step times of every segment, ascending and distinct (the grid of derived tables).</summary>
    internal List<double> StepGrid()
    {
        var grid = new List<double>();
        foreach (var s in _segments)
        {
            var times = s.Solution.StepTimes;
            for (int j = 0; j < times.Length; j++)
                if (grid.Count == 0 || times[j] > grid[^1]) grid.Add(times[j]);
        }
        return grid;
    }

    /// <summary>The field values at N as a new array (convenience for tests and outputs, not for hot paths).</summary>
    public double[] FieldsAt(double n)
    {
        var phi = new double[FieldCount];
        var dphi = new double[FieldCount];
        At(n, phi, dphi);
        return phi;
    }
}
