using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// How much a frozen super-horizon zeta can still be disturbed later. Outside the horizon zeta' ~ (k/aH)^2 zeta is
/// damped by the friction F = 3 - e1 + e2 of the zeta equation; where F &lt; 0 (ultra-slow roll, a kink transient)
/// it grows by exp(-int F dN). G(N) = max over later N2 &lt;= NEnd of exp(-int_N^N2 F dN) (at least 1), tabulated on a
/// grid; a mode may stop at N only when (k/aH)^2 G(N) is below the tolerance.
/// The same pass tabulates how fast the local indices nu (scalar and tensor) drift, times (aH)^3, so that a mode can
/// find cheaply whether a fast but smooth feature lies between the depth where it could start and where it would:
/// local vacuum data started after such a feature miss the excitation it left (see <see cref="ModeIntegrator"/>).
/// </summary>
public sealed class FrictionScan
{
    private readonly double _n0;
    private readonly double _dn;
    private readonly double[] _logG;
    private readonly double[] _logDrift;

    private FrictionScan(double n0, double dn, double[] logG, double[] logDrift)
    {
        _n0 = n0;
        _dn = dn;
        _logG = logG;
        _logDrift = logDrift;
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
        var nuS = new double[m];
        var nuT = new double[m];
        var lnAH = new double[m];
        for (int i = 0; i < m; i++)
        {
            double n = Math.Min(nEnd, nFrom + i * h);
            var p = background.At(n);
            f[i] = 3.0 - p.Epsilon1 + p.Epsilon2;
            nuS[i] = ModeIntegrator.ScalarIndexOf(p.Epsilon1, p.Epsilon2, p.Epsilon3);
            nuT[i] = ModeIntegrator.TensorIndexOf(p.Epsilon1);
            lnAH[i] = n + Math.Log(p.H);
        }
        // Per cell: ln(|d nu / dN| (aH)^3), with the later (larger) aH of the cell: conservative. A mode k has
        // |d nu/dN| / (k/aH)^3 = exp(logDrift - 3 ln k) there. Cells holding a non-smooth point are left out (-inf):
        // modes are started before those anyway.
        var logDrift = new double[m - 1];
        var kinks = background.NonSmoothTimes;
        for (int i = 0; i < m - 1; i++)
        {
            double a = nFrom + i * h, b = a + h;
            bool kink = false;
            for (int j = 0; j < kinks.Count; j++)
                if (kinks[j] >= a - 1e-12 && kinks[j] <= b + 1e-12) kink = true;
            double d = Math.Max(Math.Abs(nuS[i + 1] - nuS[i]), Math.Abs(nuT[i + 1] - nuT[i])) / h;
            logDrift[i] = kink || !(d > 0) ? double.NegativeInfinity : Math.Log(d) + 3.0 * Math.Max(lnAH[i], lnAH[i + 1]);
        }
        var logG = new double[m];
        logG[m - 1] = 0.0;
        for (int i = m - 2; i >= 0; i--)
        {
            // The smaller end value of F over the cell: conservative.
            double fc = Math.Min(f[i], f[i + 1]);
            logG[i] = Math.Max(0.0, logG[i + 1] - fc * h);
        }
        return new FrictionScan(nFrom, h, logG, logDrift);
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

    /// <summary>
    /// The start of the earliest grid cell in [<paramref name="nFrom"/>, <paramref name="nTo"/>) where the index drift
    /// of mode ln k = <paramref name="lnK"/>, |d nu/dN| / (k/aH)^3, exceeds exp(<paramref name="lnTolerance"/>); NaN when none.
    /// </summary>
    public double FirstDriftAbove(double nFrom, double nTo, double lnK, double lnTolerance)
    {
        double limit = lnTolerance + 3.0 * lnK;
        int i0 = Math.Max(0, (int)Math.Floor((nFrom - _n0) / _dn));
        int i1 = Math.Min(_logDrift.Length, (int)Math.Ceiling((nTo - _n0) / _dn));
        for (int i = i0; i < i1; i++)
            if (_logDrift[i] > limit) return _n0 + i * _dn;
        return double.NaN;
    }

    /// <summary>First N covered.</summary>
    public double NFrom => _n0;
}
