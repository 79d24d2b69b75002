using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Background;

/// <summary>One integration piece of the background: a dense solution between two restarts.</summary>
/// <param name="Start">First N of the piece.</param>
/// <param name="Stop">Last N of the piece.</param>
/// <param name="Solution">Dense output; state (phi, phi') or (phi, phi', ln H).</param>
/// <param name="Regular">True when the state carries ln H (after the end of inflation).</param>
internal sealed record BackgroundSegment(double Start, double Stop, OdeSolution Solution, bool Regular);

/// <summary>
/// The exact background of an inflaton theory in e-folds (N = 0 at the start, or at the end of inflation for long
/// backgrounds: see <see cref="Origin"/>), with dense output.
/// The shape (phi(N), e_n(N)) does not depend on the scale of V; <see cref="WithVScale"/> gives a rescaled view
/// sharing the same storage, in which only H (and V) change.
/// </summary>
public sealed class BackgroundSolution : IScalableBackground
{
    private readonly Shared _shared;

    /// <summary>Storage common to all rescaled views.</summary>
    private sealed class Shared
    {
        public required IInflatonTheory Theory { get; init; }
        public required BackgroundSegment[] Segments { get; init; }
        public required double[] SegmentStarts { get; init; }
        public required double NEnd { get; init; }
        public required double Origin { get; init; }
        public required string? ContinuationNote { get; init; }
        public required string? ContinuationStop { get; init; }
        public required double[] EndCrossings { get; init; }
        public required double[] RisingCrossings { get; init; }
        public required double[] NonSmoothTimes { get; init; }
        public required bool EndedAtPhiEnd { get; init; }
        // Tables at the accepted step times.
        public required double[] GridN { get; init; }      // all step times over [NStart, NStop]
        public required double[] GridPhi { get; init; }
        public required int GridEndIndex { get; init; }     // GridN[GridEndIndex] == NEnd
        // The ln(aH) table of the horizon-exit lookup (set once in Create).
        public HorizonExitTable Exits { get; set; } = null!;
        // One derived table that does not depend on the V scale (built once, shared by every view and thread).
        public ShapeSlot Slot { get; } = new();
    }

    /// <inheritdoc/>
    public T ShapeTable<T>(Func<IBackground, T> create) where T : class => _shared.Slot.Get(this, create);

    private BackgroundSolution(Shared shared, double vScale)
    {
        _shared = shared;
        VScale = vScale;
        _halfLnScale = 0.5 * Math.Log(vScale);
    }

    private readonly double _halfLnScale;

    /// <summary>The theory this background solves.</summary>
    public IInflatonTheory Theory => _shared.Theory;

    /// <inheritdoc/>
    public double NStart => _shared.Segments[0].Start;

    /// <inheritdoc/>
    public double NStop => _shared.Segments[^1].Stop;

    /// <inheritdoc/>
    public double NEnd => _shared.NEnd;

    /// <summary>E-folds of inflation, NEnd - NStart.</summary>
    public double NTotal => NEnd - NStart;

    /// <inheritdoc/>
    public IReadOnlyList<double> EndCrossings => _shared.EndCrossings;

    /// <summary>The upward epsilon_1 = 1 crossings (candidate ends), ascending.</summary>
    public IReadOnlyList<double> RisingCrossings => _shared.RisingCrossings;

    /// <inheritdoc/>
    public IReadOnlyList<double> NonSmoothTimes => _shared.NonSmoothTimes;

    /// <summary>
    /// Null when the continuation after the end of inflation ran as planned; otherwise the one warning line saying where
    /// and why it stopped (the background then ends there, <see cref="NStop"/>).
    /// </summary>
    public string? ContinuationNote => _shared.ContinuationNote;

    /// <summary>
    /// Null unless the continuation after the end of inflation stopped early as expected (fast oscillations about a smooth
    /// minimum, after a stated number of oscillations): then the line saying where and why, a note
    /// rather than a warning (the background then ends there, <see cref="NStop"/>).
    /// </summary>
    public string? ContinuationStop => _shared.ContinuationStop;

    /// <summary>True when inflation was ended by <see cref="BackgroundSettings.PhiEnd"/> rather than by epsilon_1 = 1.</summary>
    public bool EndedAtPhiEnd => _shared.EndedAtPhiEnd;

    /// <inheritdoc/>
    public double VScale { get; }

    /// <summary>Number of integration pieces (restarts at kinks and crossings).</summary>
    public int SegmentCount => _shared.Segments.Length;

    /// <summary>A view of the same background with the theory's potential multiplied by <paramref name="scale"/> (absolute, not relative to this view); H scales by its square root.</summary>
    public BackgroundSolution WithVScale(double scale)
    {
        if (!(scale > 0) || double.IsInfinity(scale))
            throw new ArgumentOutOfRangeException(nameof(scale), scale, "V scale must be positive and finite.");
        return new BackgroundSolution(_shared, scale);
    }

    /// <inheritdoc/>
    IScalableBackground IScalableBackground.WithVScale(double scale) => WithVScale(scale);

    /// <summary>
    /// Backgrounds whose end of inflation lies more than this many e-folds after the start measure N from the end of
    /// inflation instead (N_end = 0), so that k = aH = e^N H stays a finite double near the pivot whatever the length
    /// of inflation (e^N overflows past N of about 709). Shorter backgrounds keep N = 0 at the start.
    /// </summary>
    public const double LongBackgroundEFolds = 300;

    /// <summary>
    /// E-folds from the start of the integration to this background's N = 0: 0 (N counted from the start) or, for a
    /// background longer than <see cref="LongBackgroundEFolds"/>, N_total (N counted from the end of inflation).
    /// User-facing e-fold values are N - <see cref="NStart"/>, e-folds since the start, either way.
    /// </summary>
    public double Origin => _shared.Origin;

    internal static BackgroundSolution Create(IInflatonTheory theory, List<BackgroundSegment> segments, double nEnd,
        List<double> crossings, List<double> rising, List<double> nonSmooth, bool endedAtPhiEnd, string? continuationNote, string? continuationStop = null)
    {
        double origin = nEnd > LongBackgroundEFolds ? nEnd : 0.0;
        if (origin != 0)
        {
            segments = segments.ConvertAll(g => g with { Start = g.Start - origin, Stop = g.Stop - origin });
            crossings = crossings.ConvertAll(c => c - origin);
            rising = rising.ConvertAll(c => c - origin);
            nonSmooth = nonSmooth.ConvertAll(c => c - origin);
            nEnd = 0.0;
        }
        var segs = segments.ToArray();
        var starts = new double[segs.Length];
        for (int i = 0; i < segs.Length; i++) starts[i] = segs[i].Start;

        var gridN = new List<double>();
        foreach (var s in segs)
        {
            var times = s.Solution.StepTimes;
            for (int j = 0; j < times.Length; j++)
            {
                double t = times[j] - origin;
                if (gridN.Count > 0 && t <= gridN[^1]) continue;
                gridN.Add(t);
            }
        }
        // Make sure NEnd is a grid point.
        int endIndex = gridN.BinarySearch(nEnd);
        if (endIndex < 0)
        {
            endIndex = ~endIndex;
            gridN.Insert(endIndex, nEnd);
        }

        var shared0 = new Shared
        {
            Theory = theory, Segments = segs, SegmentStarts = starts, NEnd = nEnd, Origin = origin, ContinuationNote = continuationNote, ContinuationStop = continuationStop,
            EndCrossings = crossings.ToArray(), RisingCrossings = rising.ToArray(), NonSmoothTimes = nonSmooth.ToArray(),
            EndedAtPhiEnd = endedAtPhiEnd, GridN = gridN.ToArray(), GridPhi = new double[gridN.Count],
            GridEndIndex = endIndex,
        };
        var bg = new BackgroundSolution(shared0, 1.0);
        for (int i = 0; i < shared0.GridN.Length; i++) shared0.GridPhi[i] = bg.At(shared0.GridN[i]).Phi;
        shared0.Exits = new HorizonExitTable(bg, shared0.GridN, endIndex);
        return bg;
    }

    private int SegmentIndex(double n)
    {
        var starts = _shared.SegmentStarts;
        int lo = 0, hi = starts.Length - 1;
        while (lo < hi)
        {
            int mid = (lo + hi + 1) >> 1;
            if (starts[mid] <= n) lo = mid; else hi = mid - 1;
        }
        return lo;
    }

    /// <inheritdoc/>
    public BackgroundPoint At(double n)
    {
        n = EfoldRange.Clamp(n, NStart, NStop);
        var seg = _shared.Segments[SegmentIndex(n)];
        Span<double> y = stackalloc double[3];
        double t = Math.Min(n, seg.Stop) + _shared.Origin; // the segment's solution runs in e-folds since the start
        var theory = _shared.Theory;
        if (seg.Regular)
        {
            seg.Solution.Evaluate(t, y);
            return BackgroundEquations.Point(theory, n, y[0], y[1], Math.Exp(2.0 * y[2]), VScale);
        }
        seg.Solution.Evaluate(t, y[..2]);
        // V and K once each (the same values ConstraintHubbleSquared and Point would compute separately).
        var (v, kj) = theory.Jets(y[0]);
        double hsq = v.Value / (3.0 - 0.5 * kj.Value * y[1] * y[1]);
        return BackgroundEquations.Point(v, kj, n, y[0], y[1], hsq, VScale);
    }

    /// <summary>The scaled potential V(phi(N)).</summary>
    public double V(double n) => VScale * _shared.Theory.Potential(At(n).Phi).Value;

    /// <summary>ln(aH) at N in background units (a = e^N, H in M_pl, scaled).</summary>
    public double LnAH(double n) => n + Math.Log(At(n).H);

    /// <summary>The first N at which the field takes the value <paramref name="phi"/>; throws <see cref="PhysicsException"/> if it never does.</summary>
    public double NAtPhi(double phi)
    {
        var gn = _shared.GridN;
        var gp = _shared.GridPhi;
        for (int i = 0; i + 1 < gn.Length; i++)
        {
            double a = gp[i] - phi, b = gp[i + 1] - phi;
            if (a == 0) return gn[i];
            if (a * b < 0 || b == 0)
                return Numerics.Roots.Brent(x => At(x).Phi - phi, gn[i], gn[i + 1], a, b, 1e-14);
        }
        // Dense check inside steps would only matter for non-monotone field motion within one step; the grid is fine enough.
        throw new PhysicsException($"The field never takes the value phi = {phi:G6} between N = {NStart:G6} and {NStop:G6}; choose a value the field passes through.");
    }

    /// <summary>
    /// The last N before the end of inflation at which k = aH (final horizon exit), k in background units
    /// (k = aH with a = e^N, H in M_pl, in this view's scale). Returns false when k is outside the served range.
    /// </summary>
    public bool TryNAtHorizonExit(double kBackground, out double n) => _shared.Exits.TryFind(this, _halfLnScale, kBackground, out n);

    /// <summary>As <see cref="TryNAtHorizonExit"/>, throwing <see cref="PhysicsException"/> when k is outside the range served.</summary>
    public double NAtHorizonExit(double kBackground) => _shared.Exits.Find(this, _halfLnScale, kBackground, "field");

    /// <summary>
    /// The k range (background units, this view's scale) the background can serve: k/aH reaches <paramref name="startDepth"/>
    /// after the start (k &gt;= startDepth times the smallest aH before its exit) and k/aH &lt;= <paramref name="endDepth"/> at NEnd.
    /// </summary>
    public (double KMin, double KMax) KRange(double startDepth, double endDepth) => _shared.Exits.KRange(_halfLnScale, startDepth, endDepth);

    /// <summary>The logarithms of <see cref="KRange"/> (finite even where k itself under- or overflows a double).</summary>
    public (double LnKMin, double LnKMax) LnKRange(double startDepth, double endDepth)
        => _shared.Exits.LnKRange(_halfLnScale, startDepth, endDepth);
}
