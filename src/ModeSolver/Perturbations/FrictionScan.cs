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
    private readonly double _n0;
    private readonly double _dn;
    private readonly double[] _logG;

    private FrictionScan(double n0, double dn, double[] logG)
    {
        _n0 = n0;
        _dn = dn;
        _logG = logG;
    }

    /// <summary>Tabulates G on [<paramref name="nFrom"/>, background NEnd] with spacing <paramref name="dn"/> e-folds.</summary>
    public static FrictionScan Build(IBackground background, double nFrom, double dn = 0.01)
    {
        ArgumentNullException.ThrowIfNull(background);
        double nEnd = background.NEnd;
        if (!(nFrom < nEnd)) nFrom = nEnd - dn;
        int m = Math.Max(2, (int)Math.Ceiling((nEnd - nFrom) / dn) + 1);
        double h = (nEnd - nFrom) / (m - 1);
        var f = new double[m];
        for (int i = 0; i < m; i++)
        {
            var p = background.At(Math.Min(nEnd, nFrom + i * h));
            f[i] = 3.0 - p.Epsilon1 + p.Epsilon2;
        }
        var logG = new double[m];
        logG[m - 1] = 0.0;
        for (int i = m - 2; i >= 0; i--)
        {
            // The smaller end value of F over the cell: conservative.
            double fc = Math.Min(f[i], f[i + 1]);
            logG[i] = Math.Max(0.0, logG[i + 1] - fc * h);
        }
        return new FrictionScan(nFrom, h, logG);
    }

    /// <summary>
    /// The scan of <paramref name="background"/> from its start: for a <see cref="BackgroundSolution"/> built once and
    /// shared by all its rescaled views (F depends on e1 and e2 only, not on the V scale); otherwise built now.
    /// </summary>
    public static FrictionScan FromStart(IBackground background)
    {
        ArgumentNullException.ThrowIfNull(background);
        return background is BackgroundSolution b
            ? b.ScaleFreeTable(static x => Build(x, x.NStart))
            : Build(background, background.NStart);
    }

    /// <summary>ln G(N) (conservative: the larger of the two neighbouring grid values).</summary>
    public double LogGrowthAfter(double n)
    {
        double u = (n - _n0) / _dn;
        if (u <= 0) return _logG[0];
        int i = (int)u;
        if (i >= _logG.Length - 1) return 0.0;
        return Math.Max(_logG[i], _logG[i + 1]);
    }

    /// <summary>First N covered.</summary>
    public double NFrom => _n0;
}
