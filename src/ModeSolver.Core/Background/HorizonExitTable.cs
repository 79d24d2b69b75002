namespace ModeSolver.Background;

/// <summary>
/// The table of ln(aH) behind the fast horizon-exit lookup and the served k range of a scalable background (single
/// field and the adiabatic view of n fields share it): the suffix minimum of ln(aH) (unscaled) at the step times of the
/// solution up to the end of inflation, which is non-decreasing, so the last exit of k is bracketed by bisection and
/// solved by safeguarded Newton with the exact derivative d ln(aH)/dN = 1 - e1. Immutable after construction.
/// </summary>
internal sealed class HorizonExitTable
{
    private readonly double[] _gridN;
    private readonly double[] _suffixMin;
    private readonly int _end;

    /// <summary>The table of <paramref name="unscaled"/> (the view at V scale 1) on <paramref name="gridN"/>, whose entry <paramref name="endIndex"/> is NEnd.</summary>
    public HorizonExitTable(IBackground unscaled, double[] gridN, int endIndex)
    {
        _gridN = gridN;
        _end = endIndex;
        _suffixMin = new double[endIndex + 1];
        for (int i = 0; i <= endIndex; i++) _suffixMin[i] = gridN[i] + Math.Log(unscaled.At(gridN[i]).H);
        for (int i = endIndex - 1; i >= 0; i--) _suffixMin[i] = Math.Min(_suffixMin[i], _suffixMin[i + 1]);
    }

    /// <summary>The last N before the end with k = aH on <paramref name="view"/> (half the log of its V scale given); false outside the table.</summary>
    public bool TryFind(IBackground view, double halfLnScale, double kBackground, out double n)
    {
        n = double.NaN;
        if (!(kBackground > 0)) return false;
        double lnk = Math.Log(kBackground) - halfLnScale;
        var suf = _suffixMin;
        int last = _end;
        if (!(lnk > suf[0]) || lnk > suf[last]) return false;
        // suf is non-decreasing: find i with suf[i] < lnk <= suf[i+1].
        int lo = 0, hi = last;
        while (hi - lo > 1)
        {
            int mid = (lo + hi) >> 1;
            if (suf[mid] < lnk) lo = mid; else hi = mid;
        }
        var gn = _gridN;
        double a = gn[lo], b = gn[hi];
        double fa = a + Math.Log(view.At(a).H) - halfLnScale - lnk;
        double fb = b + Math.Log(view.At(b).H) - halfLnScale - lnk;
        if (fb == 0) { n = b; return true; }
        if (fa > 0) fa = -1e-300; // guard rounding at the bracket edge
        var exit = new LnAHMinus(view, lnk + halfLnScale);
        n = Numerics.Roots.SafeNewton(ref exit, a, b, fa, fb, 1e-14);
        return true;
    }

    /// <summary>As <see cref="TryFind"/>, throwing <see cref="Physics.PhysicsException"/> outside the table (<paramref name="fields"/> names the start in the advice).</summary>
    public double Find(IBackground view, double halfLnScale, double kBackground, string fields)
    {
        if (TryFind(view, halfLnScale, kBackground, out double n)) return n;
        var (kMin, kMax) = KRange(halfLnScale, 1.0, 1.0);
        throw new Physics.PhysicsException($"k = {kBackground:G6} (background units) never leaves the horizon during inflation; the background serves {kMin:G6} to {kMax:G6}; start the {fields} further up the potential or choose another k.");
    }

    /// <summary>The k range served at these depths (exponentials of <see cref="LnKRange"/>).</summary>
    public (double KMin, double KMax) KRange(double halfLnScale, double startDepth, double endDepth)
    {
        var (lnMin, lnMax) = LnKRange(halfLnScale, startDepth, endDepth);
        return (Math.Exp(lnMin), Math.Exp(lnMax));
    }

    /// <summary>ln k_min and ln k_max served at these depths by the view with half the log of its V scale given.</summary>
    public (double LnKMin, double LnKMax) LnKRange(double halfLnScale, double startDepth, double endDepth)
        => (Math.Log(startDepth) + _suffixMin[0] + halfLnScale, Math.Log(endDepth) + _suffixMin[_end] + halfLnScale);

    /// <summary>ln(aH)(N) - target = N + ln H - target and its exact derivative 1 - e1 (allocation-free).</summary>
    private readonly struct LnAHMinus(IBackground bg, double target) : Numerics.IRootFunctionWithDerivative
    {
        public (double Value, double Derivative) Evaluate(double x)
        {
            var p = bg.At(x);
            return (x + Math.Log(p.H) - target, 1.0 - p.Epsilon1);
        }
    }
}

/// <summary>The one slot of a shape-derived table shared by every rescaled view of a background (<see cref="IShapeSharedBackground"/>); thread-safe.</summary>
internal sealed class ShapeSlot
{
    private object? _held;

    /// <summary>The table, built by <paramref name="create"/> on <paramref name="view"/> on first use.</summary>
    public T Get<T>(IBackground view, Func<IBackground, T> create) where T : class
    {
        ArgumentNullException.ThrowIfNull(create);
        object? held = Volatile.Read(ref _held);
        if (held is null)
        {
            Interlocked.CompareExchange(ref _held, create(view), null);
            held = _held!;
        }
        return held as T ?? throw new InvalidOperationException(
            $"this background already holds a shape table of type {held.GetType().Name}; it has one slot");
    }
}
