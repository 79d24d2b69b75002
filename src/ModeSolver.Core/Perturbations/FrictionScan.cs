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
/// It also counts the extrema of e2 (sign changes of d e2/dN = e2 e3 between grid points), from which
/// <see cref="MaxOscillationFrequency"/> measures how fast the background oscillates (an oscillating term in V):
/// modes resonate with it at -k tau ~ omega/2 and must start deeper than that.
/// </summary>
public sealed class FrictionScan
{
    private readonly IBackground _background;
    private readonly double _n0;
    private readonly double _dn;
    private readonly double _nEnd;
    private readonly double[] _f;
    private readonly double[] _logG;
    private readonly double[] _nuS;
    private readonly double[] _nuT;
    private readonly double[] _lnAH; // ln(aH) at unit V scale, so that one table serves every rescaled view
    private readonly double _lnSqrtScale;
    private readonly double[] _logDrift;
    private readonly double[] _slopeE2; // d e2/dN at the grid points
    private readonly int[] _extremaAfter; // extrema of e2 in the cells at and after each index
    private double _lastExtremum = double.NaN; // e2 at the last extremum counted (the table fills backwards)
    private readonly double[] _sourceMax; // suffix maximum of ln G - 2 ln(aH) (unit V scale): the later sourced growth
    private readonly object _gate = new();
    private int _lo; // lowest grid index computed so far (entries at and above it are final)

    private FrictionScan(IBackground background, double nFrom, double dn)
    {
        _background = background;
        _lnSqrtScale = 0.5 * Math.Log(background.VScale);
        _nEnd = background.NEnd;
        if (!(nFrom < _nEnd)) nFrom = _nEnd - dn;
        int m = Math.Max(2, (int)Math.Ceiling((_nEnd - nFrom) / dn) + 1);
        _n0 = nFrom;
        _dn = (_nEnd - nFrom) / (m - 1);
        _f = new double[m];
        _logG = new double[m];
        _nuS = new double[m];
        _nuT = new double[m];
        _lnAH = new double[m];
        _logDrift = new double[m - 1];
        _slopeE2 = new double[m];
        _extremaAfter = new int[m];
        _sourceMax = new double[m];
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
    /// by all its rescaled views and threads (F and the indices depend on e1, e2, e3 only, not on the V scale; the drift
    /// table uses ln aH, which a V scale shifts by a constant that the caller's ln k carries too), filled backwards from
    /// the end only as far as the queries reach (the same grid and values as <see cref="Build"/>); otherwise built now.
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
            var kinks = _background.NonSmoothTimes;
            for (int i = lo - 1; i >= target; i--)
            {
                double n = Math.Min(_nEnd, _n0 + i * _dn);
                var p = _background.At(n);
                _f[i] = 3.0 - p.Epsilon1 + p.Epsilon2;
                _nuS[i] = CurvatureModeSystem.IndexOf(p.Epsilon1, p.Epsilon2, p.Epsilon3);
                _nuT[i] = TensorModeSystem.IndexOf(p.Epsilon1);
                _lnAH[i] = n + Math.Log(p.H) - _lnSqrtScale;
                _slopeE2[i] = p.Epsilon2 * p.Epsilon3;
                if (i == m - 1) { _logG[i] = 0.0; _sourceMax[i] = -2.0 * _lnAH[i]; continue; }
                // An extremum counts when e2 has swung by more than MinSwing since the last one counted: round-off
                // wiggles of a constant e2 (power law) are not an oscillation.
                bool extremum = _slopeE2[i] * _slopeE2[i + 1] < 0 || (_slopeE2[i] != 0 && _slopeE2[i + 1] == 0);
                bool counted = false;
                if (extremum)
                {
                    if (double.IsNaN(_lastExtremum)) _lastExtremum = p.Epsilon2;
                    else if (Math.Abs(p.Epsilon2 - _lastExtremum) > MinSwing) { counted = true; _lastExtremum = p.Epsilon2; }
                }
                _extremaAfter[i] = _extremaAfter[i + 1] + (counted ? 1 : 0);
                // The smaller end value of F over the cell: conservative.
                double fc = Math.Min(_f[i], _f[i + 1]);
                _logG[i] = Math.Max(0.0, _logG[i + 1] - fc * _dn);
                _sourceMax[i] = Math.Max(_sourceMax[i + 1], _logG[i] - 2.0 * _lnAH[i]);
                // Per cell: ln(|d nu / dN| (aH)^3), with the later (larger) aH of the cell: conservative. A mode k has
                // |d nu/dN| / (k/aH)^3 = exp(logDrift - 3 ln k) there. Cells holding a non-smooth point are left out
                // (-inf): modes are started before those anyway.
                double a = _n0 + i * _dn, b = a + _dn;
                bool kink = false;
                for (int j = 0; j < kinks.Count; j++)
                    if (kinks[j] >= a - 1e-12 && kinks[j] <= b + 1e-12) kink = true;
                double d = Math.Max(Math.Abs(_nuS[i + 1] - _nuS[i]), Math.Abs(_nuT[i + 1] - _nuT[i])) / _dn;
                _logDrift[i] = kink || !(d > 0) ? double.NegativeInfinity : Math.Log(d) + 3.0 * Math.Max(_lnAH[i], _lnAH[i + 1]);
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

    /// <summary>Cells faster than this change of the local index per e-fold count as a feature (slow roll drifts at ~1e-3).</summary>
    internal const double FastDrift = 0.1;

    private (double N, double LnAH, double DeltaU)[]? _fast;

    /// <summary>
    /// First-order bound on what fast features before <paramref name="nStart"/> excited in mode ln k = <paramref name="lnK"/>
    /// (unit V scale) while it was inside the horizon, relative to its amplitude: the sum of |Delta U| / (2 (k/aH)^2) over
    /// the cells where the local index changes faster than <see cref="FastDrift"/> per e-fold (|beta| &lt;= int |d ln omega|/2
    /// with omega^2 = k^2 (1 - U (aH/k)^2); no credit for the oscillation that suppresses it), plus |Delta f| / (k/aH) at
    /// each non-smooth point (a jump f of the friction kicks zeta'' by -Delta f zeta'). Local data started after such a
    /// feature miss this excitation; a mode started before it integrates it and gets nothing here.
    /// </summary>
    public double FeatureExcitationBefore(double nStart, double lnK)
    {
        var fast = FastCells();
        double sum = 0;
        foreach (var (n, lnAH, du) in fast)
        {
            if (!(n < nStart)) continue;
            double lnX = lnK - lnAH;
            if (lnX <= 0) continue;
            sum += du >= 0 ? du * Math.Exp(-2.0 * lnX) : -du * Math.Exp(-lnX);
        }
        return sum;
    }

    /// <summary>The earliest fast cell (not a non-smooth point) in [<paramref name="nFrom"/>, <paramref name="nTo"/>); NaN when none.</summary>
    public double FirstFastCell(double nFrom, double nTo)
    {
        foreach (var (n, _, du) in FastCells())
            if (du >= 0 && n >= nFrom && n < nTo) return n;
        return double.NaN;
    }

    private (double N, double LnAH, double DeltaU)[] FastCells()
    {
        var fast = _fast;
        if (fast is null)
        {
            if (Volatile.Read(ref _lo) > 0) ExtendTo(0);
            var list = new List<(double, double, double)>();
            var kinks = _background.NonSmoothTimes;
            for (int i = 0; i + 1 < _nuS.Length; i++)
            {
                if (double.IsNegativeInfinity(_logDrift[i]) && HasKink(i, kinks)) continue;
                double dS = Math.Abs(_nuS[i + 1] * _nuS[i + 1] - _nuS[i] * _nuS[i]), dT = Math.Abs(_nuT[i + 1] * _nuT[i + 1] - _nuT[i] * _nuT[i]);
                double dNu = Math.Max(Math.Abs(_nuS[i + 1] - _nuS[i]), Math.Abs(_nuT[i + 1] - _nuT[i]));
                if (dNu > FastDrift * _dn) list.Add((_n0 + i * _dn, Math.Min(_lnAH[i], _lnAH[i + 1]), 0.5 * Math.Max(dS, dT)));
            }
            for (int j = 0; j < kinks.Count; j++)
            {
                double t = kinks[j];
                if (!(t > _background.NStart && t < _nEnd)) continue;
                double h = 1e-9 * Math.Max(1.0, Math.Abs(t));
                var a = _background.At(t - h);
                var b = _background.At(t + h);
                double df = Math.Abs((b.Epsilon2 - b.Epsilon1) - (a.Epsilon2 - a.Epsilon1));
                // Marked with a negative N-slot convention: DeltaU < 0 carries |Delta f| (weighted by 1/x, not 1/x^2).
                list.Add((t, t + Math.Log(a.H) - _lnSqrtScale, -df));
            }
            list.Sort((a, b) => a.Item1.CompareTo(b.Item1));
            fast = list.ToArray();
            Interlocked.CompareExchange(ref _fast, fast, null);
            fast = _fast!;
        }
        return fast;
    }

    private bool HasKink(int i, IReadOnlyList<double> kinks)
    {
        double a = _n0 + i * _dn, b = a + _dn;
        for (int j = 0; j < kinks.Count; j++)
            if (kinks[j] >= a - 1e-12 && kinks[j] <= b + 1e-12) return true;
        return false;
    }

    /// <summary>
    /// ln of the largest (k/aH)^2 G over N2 in [<paramref name="n"/>, NEnd] for the mode ln k = <paramref name="lnK"/>
    /// (at unit V scale, as in <see cref="FirstDriftAbove"/>): how much the source (k/aH)^2 zeta of the zeta equation
    /// can still move a super-horizon zeta, relative to zeta, once later growth (ultra-slow roll) amplifies it. A mode
    /// frozen at N ignores every later change, so the stop needs this below the tolerance, not only (k/aH)^2 G at N.
    /// </summary>
    public double LogSourcedGrowthAfter(double n, double lnK)
    {
        double u = (n - _n0) / _dn;
        int i = u <= 0 ? 0 : (int)Math.Min(u, _sourceMax.Length - 1);
        if (i < Volatile.Read(ref _lo)) ExtendTo(i);
        return 2.0 * lnK + _sourceMax[i];
    }

    /// <summary>
    /// The largest ln G(N2) over N2 in [<paramref name="n"/>, NEnd]: how much a seed of zeta' made at any later time can
    /// still grow (the grid values, conservative like <see cref="LogGrowthAfter"/>).
    /// </summary>
    public double MaxLogGrowthAfter(double n)
    {
        double u = (n - _n0) / _dn;
        int i = u <= 0 ? 0 : (int)Math.Min(u, _logG.Length - 1);
        if (i < Volatile.Read(ref _lo)) ExtendTo(i);
        double max = 0.0;
        for (int j = i; j < _logG.Length; j++) max = Math.Max(max, _logG[j]);
        return max;
    }

    /// <summary>
    /// The start of the earliest grid cell in [<paramref name="nFrom"/>, <paramref name="nTo"/>) where the index drift
    /// of mode ln k = <paramref name="lnK"/>, |d nu/dN| / (k/aH)^3, exceeds exp(<paramref name="lnTolerance"/>); NaN when none.
    /// <paramref name="lnK"/> is ln k at unit V scale: ln k - ln sqrt(VScale) of the background the mode runs on.
    /// </summary>
    public double FirstDriftAbove(double nFrom, double nTo, double lnK, double lnTolerance)
    {
        double limit = lnTolerance + 3.0 * lnK;
        int i0 = Math.Max(0, (int)Math.Floor((nFrom - _n0) / _dn));
        int i1 = Math.Min(_logDrift.Length, (int)Math.Ceiling((nTo - _n0) / _dn));
        if (i0 < i1 && i0 < Volatile.Read(ref _lo)) ExtendTo(i0);
        for (int i = i0; i < i1; i++)
            if (_logDrift[i] > limit) return _n0 + i * _dn;
        return double.NaN;
    }

    /// <summary>
    /// Smallest swing of e2 between successive extrema that counts as an oscillation. A resonance of swing s moves P_s by
    /// about (s/4) sqrt(2 pi/omega) &lt;= 0.63 s (the first-order resonant amplitude with e2 = 6 b sin), so smaller swings
    /// matter below 1e-8 relative.
    /// </summary>
    public const double MinSwing = 1e-8;

    /// <summary>Width in e-folds of the window over which extrema of e2 are counted.</summary>
    public const double FrequencyWindow = 2.0;

    /// <summary>Fewest extrema of e2 in one window (two periods) that count as an oscillation; fewer give frequency 0.</summary>
    public const int MinExtrema = 4;

    /// <summary>
    /// The largest local oscillation frequency of the background (radians per e-fold) over windows of
    /// <see cref="FrequencyWindow"/> e-folds overlapping [<paramref name="nFrom"/>, <paramref name="nTo"/>]:
    /// pi times the extrema of e2 per e-fold (a sinusoid of frequency omega has omega/pi extrema per e-fold). 0 when no
    /// window holds <see cref="MinExtrema"/> extrema (a smooth background). The 0.01 e-fold grid resolves omega up to
    /// about 150; beyond that (an extremum in most cells) the count saturates and <see cref="OscillationUnresolved"/> is true.
    /// </summary>
    public double MaxOscillationFrequency(double nFrom, double nTo)
    {
        int w = (int)Math.Round(FrequencyWindow / _dn);
        int cells = _extremaAfter.Length - 1;
        int i0 = Math.Max(0, (int)Math.Floor((nFrom - _n0) / _dn) - w / 2);
        int i1 = Math.Min(cells, (int)Math.Ceiling((nTo - _n0) / _dn) + w / 2);
        if (i1 <= i0) return 0.0;
        if (i0 < Volatile.Read(ref _lo)) ExtendTo(i0);
        int best = 0;
        int step = Math.Max(1, w / 8);
        for (int a = i0; a < i1; a += step)
        {
            int b = Math.Min(cells, a + w);
            best = Math.Max(best, _extremaAfter[a] - _extremaAfter[b]);
            if (b == cells) break;
        }
        return best < MinExtrema ? 0.0 : Math.PI * best / (w * _dn);
    }

    /// <summary>True when a frequency this high is beyond what the scan's grid resolves (more than one extremum per three cells).</summary>
    public bool OscillationUnresolved(double omega) => omega * _dn > Math.PI / 3;

    /// <summary>First N covered.</summary>
    public double NFrom => _n0;
}
