using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// How much a frozen super-horizon zeta can still be disturbed later. Outside the horizon zeta' ~ (k/aH)^2 zeta is
/// damped by the friction F = 3 - e1 + e2 of the zeta equation; where F &lt; 0 (ultra-slow roll, a kink transient)
/// it grows by exp(-int F dN). G(N) = max over later N2 &lt;= NEnd of exp(-int_N^N2 F dN) (at least 1), tabulated on a
/// grid; a mode may stop at N only when (k/aH)^2 G(N) is below the tolerance.
/// </summary>
public sealed class FrictionScan
{
    private readonly IBackground _background;
    private readonly double _n0;
    private readonly double _dn;
    private readonly double _nEnd;
    private readonly double[] _f;
    private readonly double[] _logG;
    private readonly object _gate = new();
    private int _lo; // lowest grid index computed so far (entries at and above it are final)

    private FrictionScan(IBackground background, double nFrom, double dn)
    {
        _background = background;
        _nEnd = background.NEnd;
        if (!(nFrom < _nEnd)) nFrom = _nEnd - dn;
        int m = Math.Max(2, (int)Math.Ceiling((_nEnd - nFrom) / dn) + 1);
        _n0 = nFrom;
        _dn = (_nEnd - nFrom) / (m - 1);
        _f = new double[m];
        _logG = new double[m];
        _lo = m;
    }

    /// <summary>Tabulates G on [<paramref name="nFrom"/>, background NEnd] with spacing <paramref name="dn"/> e-folds.</summary>
    public static FrictionScan Build(IBackground background, double nFrom, double dn = 0.01)
    {
        ArgumentNullException.ThrowIfNull(background);
        var scan = new FrictionScan(background, nFrom, dn);
        scan.ExtendTo(0);
        return scan;
    }

    /// <summary>
    /// The scan of <paramref name="background"/> from its start: for a <see cref="BackgroundSolution"/> one table shared
    /// by all its rescaled views and threads (F depends on e1 and e2 only, not on the V scale), filled backwards from the
    /// end only as far as the queries reach (the same grid and values as <see cref="Build"/>); otherwise built now.
    /// </summary>
    public static FrictionScan FromStart(IBackground background)
    {
        ArgumentNullException.ThrowIfNull(background);
        return background is BackgroundSolution b
            ? b.ScaleFreeTable(static x => new FrictionScan(x, x.NStart, 0.01))
            : Build(background, background.NStart);
    }

    /// <summary>Fills the table down to grid index <paramref name="target"/> (thread-safe; idempotent).</summary>
    private void ExtendTo(int target)
    {
        lock (_gate)
        {
            int lo = _lo, m = _f.Length;
            if (target >= lo) return;
            for (int i = lo - 1; i >= target; i--)
            {
                var p = _background.At(Math.Min(_nEnd, _n0 + i * _dn));
                _f[i] = 3.0 - p.Epsilon1 + p.Epsilon2;
                if (i == m - 1) { _logG[i] = 0.0; continue; }
                // The smaller end value of F over the cell: conservative.
                double fc = Math.Min(_f[i], _f[i + 1]);
                _logG[i] = Math.Max(0.0, _logG[i + 1] - fc * _dn);
            }
            Volatile.Write(ref _lo, target);
        }
    }

    /// <summary>ln G(N) (conservative: the larger of the two neighbouring grid values).</summary>
    public double LogGrowthAfter(double n)
    {
        double u = (n - _n0) / _dn;
        int i = u <= 0 ? 0 : (int)Math.Min(u, _logG.Length);
        if (i >= _logG.Length - 1) return 0.0;
        // Fill in blocks of at least 2 e-folds so that a sweep of queries extends the table only a few times.
        if (i < Volatile.Read(ref _lo)) ExtendTo(Math.Max(0, Math.Min(i, Volatile.Read(ref _lo) - 200)));
        if (u <= 0) return _logG[0];
        return Math.Max(_logG[i], _logG[i + 1]);
    }

    /// <summary>First N covered.</summary>
    public double NFrom => _n0;
}
