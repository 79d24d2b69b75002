namespace ModeSolver.Background;

/// <summary>
/// The adiabatic view of an n-field background: the trajectory read as one background (H, epsilon_1, epsilon_2,
/// epsilon_3 along it, the V scale, non-smooth times, end crossings), so that the mode driver's start policy,
/// horizon-exit lookup, freeze-out tests, the pivot matching and the normalisation are those of single field. The
/// projection is exact: with sigma' = |phi'| = sqrt(2 epsilon_1), the component of the covariant equations along
/// e_sigma is the single-field equation of a canonical field with the potential along the trajectory, so H and the
/// Hubble-flow parameters are the n-field ones, not an approximation. <see cref="BackgroundPoint.Phi"/> is the first
/// field's value (for messages) and <see cref="BackgroundPoint.DPhi"/> the field-space speed |phi'|. The n x n mode
/// system reads the field-space quantities at the driver's N through <see cref="Evaluate"/>. Like
/// <see cref="BackgroundSolution"/>, backgrounds longer than <see cref="BackgroundSolution.LongBackgroundEFolds"/>
/// count N from the end of inflation (<see cref="Origin"/>). Read-only and safe to share between threads.
/// </summary>
public sealed class AdiabaticBackground : IScalableBackground
{
    private sealed class Shared
    {
        public required FieldBackgroundSolution Fields { get; init; }
        public required double Origin { get; init; }
        public required double[] EndCrossings { get; init; }
        public required double[] NonSmooth { get; init; }
        public required ThreadLocal<FieldPoint> Workspace { get; init; }
        public HorizonExitTable Exits { get; set; } = null!;
        public ShapeSlot Slot { get; } = new();
    }

    private readonly Shared _shared;
    private readonly double _halfLnScale;

    private AdiabaticBackground(Shared shared, double vScale)
    {
        _shared = shared;
        VScale = vScale;
        _halfLnScale = 0.5 * Math.Log(vScale);
    }

    /// <summary>The adiabatic view of <paramref name="fields"/> at V scale 1.</summary>
    public static AdiabaticBackground Of(FieldBackgroundSolution fields)
    {
        ArgumentNullException.ThrowIfNull(fields);
        double origin = fields.NEnd > BackgroundSolution.LongBackgroundEFolds ? fields.NEnd : 0.0;
        var grid = fields.StepGrid();
        double nEndField = fields.NEnd;
        int endIndex = grid.BinarySearch(nEndField);
        if (endIndex < 0)
        {
            endIndex = ~endIndex;
            grid.Insert(endIndex, nEndField);
        }
        var gridN = new double[grid.Count];
        for (int i = 0; i < gridN.Length; i++) gridN[i] = grid[i] - origin;
        int f = fields.FieldCount;
        var shared = new Shared
        {
            Fields = fields, Origin = origin,
            EndCrossings = Shift(fields.EndCrossings, origin), NonSmooth = Shift(fields.NonSmoothTimes, origin),
            Workspace = new ThreadLocal<FieldPoint>(() => new FieldPoint(f)),
        };
        var bg = new AdiabaticBackground(shared, 1.0);
        shared.Exits = new HorizonExitTable(bg, gridN, endIndex);
        return bg;
    }

    private static double[] Shift(IReadOnlyList<double> list, double origin)
    {
        var a = new double[list.Count];
        for (int i = 0; i < a.Length; i++) a[i] = list[i] - origin;
        return a;
    }

    /// <inheritdoc/>
    public string StartDescription => $"phi0 = [{Values(_shared.Fields.NStart)}] for ({string.Join(", ", _shared.Fields.Theory.FieldNames)})";

    /// <inheritdoc/>
    public string FieldsDescription(double n) => $"({string.Join(", ", _shared.Fields.Theory.FieldNames)}) = ({Values(n + _shared.Origin)})";

    private string Values(double fieldN)
    {
        double[] at = _shared.Fields.FieldsAt(fieldN);
        var text = new string[at.Length];
        for (int i = 0; i < at.Length; i++) text[i] = at[i].ToString("G6", System.Globalization.CultureInfo.InvariantCulture);
        return string.Join(", ", text);
    }

    /// <summary>The n-field solution this view reads.</summary>
    public FieldBackgroundSolution Fields => _shared.Fields;

    /// <summary>E-folds from the start of the n-field integration to this view's N = 0 (0, or N_total for long backgrounds).</summary>
    public double Origin => _shared.Origin;

    /// <inheritdoc/>
    public double NStart => _shared.Fields.NStart - _shared.Origin;

    /// <inheritdoc/>
    public double NStop => _shared.Fields.NStop - _shared.Origin;

    /// <inheritdoc/>
    public double NEnd => _shared.Fields.NEnd - _shared.Origin;

    /// <inheritdoc/>
    public double NTotal => _shared.Fields.NTotal;

    /// <inheritdoc/>
    public IReadOnlyList<double> EndCrossings => _shared.EndCrossings;

    /// <inheritdoc/>
    public IReadOnlyList<double> NonSmoothTimes => _shared.NonSmooth;

    /// <inheritdoc/>
    public double VScale { get; }

    /// <summary>The same background with the potential multiplied by <paramref name="scale"/> (absolute); H scales by its square root.</summary>
    public AdiabaticBackground WithVScale(double scale)
    {
        if (!(scale > 0) || double.IsInfinity(scale))
            throw new ArgumentOutOfRangeException(nameof(scale), scale, "V scale must be positive and finite.");
        return new AdiabaticBackground(_shared, scale);
    }

    /// <inheritdoc/>
    IScalableBackground IScalableBackground.WithVScale(double scale) => WithVScale(scale);

    /// <inheritdoc/>
    public T ShapeTable<T>(Func<IBackground, T> create) where T : class => _shared.Slot.Get(this, create);

    /// <summary>
    /// The n-field quantities at this view's N (the field-space ones do not depend on the V scale; H in
    /// <paramref name="point"/> is unscaled). Allocation-free.
    /// </summary>
    public void Evaluate(double n, FieldPoint point, bool riemann) => _shared.Fields.Evaluate(n + _shared.Origin, point, riemann);

    /// <inheritdoc/>
    public BackgroundPoint At(double n)
    {
        var w = _shared.Workspace.Value!;
        _shared.Fields.Evaluate(n + _shared.Origin, w);
        double e1 = w.Epsilon1;
        return new BackgroundPoint(w.N - _shared.Origin, w.Phi[0], Math.Sqrt(2.0 * e1), w.H * Math.Exp(_halfLnScale), e1, w.Epsilon2, w.Epsilon3);
    }

    /// <inheritdoc/>
    public double V(double n)
    {
        var w = _shared.Workspace.Value!;
        _shared.Fields.Evaluate(n + _shared.Origin, w);
        return VScale * w.V;
    }

    /// <inheritdoc/>
    public bool TryNAtHorizonExit(double kBackground, out double n) => _shared.Exits.TryFind(this, _halfLnScale, kBackground, out n);

    /// <inheritdoc/>
    public double NAtHorizonExit(double kBackground) => _shared.Exits.Find(this, _halfLnScale, kBackground, "fields");

    /// <inheritdoc/>
    public (double KMin, double KMax) KRange(double startDepth, double endDepth) => _shared.Exits.KRange(_halfLnScale, startDepth, endDepth);

    /// <inheritdoc/>
    public (double LnKMin, double LnKMax) LnKRange(double startDepth, double endDepth)
        => _shared.Exits.LnKRange(_halfLnScale, startDepth, endDepth);
}
