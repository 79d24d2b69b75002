namespace ModeSolver.Integrators;

/// <summary>Kinds of per-step interpolants held by a <see cref="DenseStore"/>.</summary>
internal enum DenseKind : byte
{
    /// <summary>DOP853 7th-order continuous extension: 8n coefficients, s = (t - tRef)/h with tRef the step start.</summary>
    Dop853 = 1,
    /// <summary>Radau IIA collocation polynomial: 4n coefficients, s = (t - tRef)/h with tRef the step end (s in [-1, 0]).</summary>
    Radau5 = 2,
}

/// <summary>
/// Growable storage of the dense output of every accepted step: step boundaries (monotone in the direction of
/// integration), and per step its interpolant kind, reference time, step size and coefficient block.
/// </summary>
internal sealed class DenseStore
{
    private readonly int _n;
    private double[] _bounds = new double[64];
    private double[] _tRef = new double[64];
    private double[] _h = new double[64];
    private int[] _offset = new int[64];
    private DenseKind[] _kind = new DenseKind[64];
    private double[] _coeffs;
    private int _segments;
    private int _used;

    public DenseStore(int n, double t0)
    {
        _n = n;
        _coeffs = new double[Math.Max(64, 8 * n * 16)];
        _bounds[0] = t0;
    }

    public int Segments => _segments;

    /// <summary>Boundaries T0..TFinal, length Segments + 1.</summary>
    public ReadOnlySpan<double> Bounds => _bounds.AsSpan(0, _segments + 1);

    /// <summary>Reserves a coefficient block for one step ending at <paramref name="tEnd"/>; the caller fills it.</summary>
    public Span<double> Add(DenseKind kind, double tRef, double h, double tEnd, int blocks)
    {
        int len = blocks * _n;
        if (_segments + 2 > _bounds.Length)
        {
            int cap = _bounds.Length * 2;
            Array.Resize(ref _bounds, cap);
            Array.Resize(ref _tRef, cap);
            Array.Resize(ref _h, cap);
            Array.Resize(ref _offset, cap);
            Array.Resize(ref _kind, cap);
        }
        if (_used + len > _coeffs.Length) Array.Resize(ref _coeffs, Math.Max(_coeffs.Length * 2, _used + len));
        _kind[_segments] = kind;
        _tRef[_segments] = tRef;
        _h[_segments] = h;
        _offset[_segments] = _used;
        _segments++;
        _bounds[_segments] = tEnd;
        var block = _coeffs.AsSpan(_used, len);
        _used += len;
        return block;
    }

    /// <summary>Moves the end of the last step back (a terminal event inside it).</summary>
    public void TruncateLast(double tEnd) => _bounds[_segments] = tEnd;

    /// <summary>Index of the step containing t (binary search over the boundaries).</summary>
    public int Find(double t)
    {
        bool forward = _bounds[_segments] >= _bounds[0];
        int lo = 0, hi = _segments - 1;
        while (lo < hi)
        {
            int mid = (lo + hi + 1) >> 1;
            bool afterStart = forward ? t >= _bounds[mid] : t <= _bounds[mid];
            if (afterStart) lo = mid; else hi = mid - 1;
        }
        return lo;
    }

    public void Evaluate(double t, Span<double> y)
    {
        int i = Find(t);
        Evaluate(_kind[i], _coeffs.AsSpan(_offset[i], (_kind[i] == DenseKind.Dop853 ? 8 : 4) * _n), _tRef[i], _h[i], t, y);
    }

    public double Evaluate(double t, int component)
    {
        int i = Find(t);
        var c = _coeffs.AsSpan(_offset[i], (_kind[i] == DenseKind.Dop853 ? 8 : 4) * _n);
        return EvaluateComponent(_kind[i], c, _n, _tRef[i], _h[i], t, component);
    }

    /// <summary>Evaluates one interpolant block (shared by the steppers for their current step).</summary>
    public static void Evaluate(DenseKind kind, ReadOnlySpan<double> c, double tRef, double h, double t, Span<double> y)
    {
        int n = y.Length;
        for (int i = 0; i < n; i++) y[i] = EvaluateComponent(kind, c, n, tRef, h, t, i);
    }

    public static double EvaluateComponent(DenseKind kind, ReadOnlySpan<double> c, int n, double tRef, double h, double t, int i)
    {
        double s = (t - tRef) / h;
        if (kind == DenseKind.Dop853)
        {
            // Hairer, Norsett and Wanner I, sec. II.10 (dense output of DOP853): nested form in s and 1 - s.
            double s1 = 1.0 - s;
            double inner = c[4 * n + i] + s * (c[5 * n + i] + s1 * (c[6 * n + i] + s * c[7 * n + i]));
            return c[i] + s * (c[n + i] + s1 * (c[2 * n + i] + s * (c[3 * n + i] + s1 * inner)));
        }
        // Radau IIA collocation polynomial through the stage values (Hairer and Wanner II, sec. IV.8), s in [-1, 0].
        double c1m1 = Radau5Coefficients.C1 - 1.0, c2m1 = Radau5Coefficients.C2 - 1.0;
        return c[i] + s * (c[n + i] + (s - c2m1) * (c[2 * n + i] + (s - c1m1) * c[3 * n + i]));
    }
}
