using System.Numerics;
using ModeSolver.Background;
using MathNet.Numerics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Integrates one Fourier mode of the scalar (zeta) and tensor (h = 2u/a) perturbations in e-folds, with their first
/// and second derivatives with respect to ln k (sensitivity equations), from local-index Hankel Bunch-Davies data to
/// freeze-out. Equations (physics.md 3):
///   zeta'' + (3 - e1 + e2) zeta' + x^2 zeta = 0,  h'' + (3 - e1) h' + x^2 h = 0,  x = k/(aH);
///   d/dln k: Z1'' + F Z1' + x^2 Z1 = -2 x^2 Z0;  Z2'' + F Z2' + x^2 Z2 = -4 x^2 (Z1 + Z0).
/// The zeta form needs no e3 and keeps zeta, zeta' continuous where V_phi jumps (e2 jumps but stays finite).
/// A reusable, single-threaded workspace: keep one per thread. The right-hand side does not allocate.
/// </summary>
public sealed class ModeIntegrator
{
    // Dormand-Prince 5(4) tableau (Dormand & Prince 1980, J. Comput. Appl. Math. 6, 19), FSAL.
    private const double C2 = 1.0 / 5, C3 = 3.0 / 10, C4 = 4.0 / 5, C5 = 8.0 / 9;
    private const double A21 = 1.0 / 5;
    private const double A31 = 3.0 / 40, A32 = 9.0 / 40;
    private const double A41 = 44.0 / 45, A42 = -56.0 / 15, A43 = 32.0 / 9;
    private const double A51 = 19372.0 / 6561, A52 = -25360.0 / 2187, A53 = 64448.0 / 6561, A54 = -212.0 / 729;
    private const double A61 = 9017.0 / 3168, A62 = -355.0 / 33, A63 = 46732.0 / 5247, A64 = 49.0 / 176, A65 = -5103.0 / 18656;
    private const double B1 = 35.0 / 384, B3 = 500.0 / 1113, B4 = 125.0 / 192, B5 = -2187.0 / 6784, B6 = 11.0 / 84;
    private const double E1 = 71.0 / 57600, E3 = -71.0 / 16695, E4 = 71.0 / 1920, E5 = -17253.0 / 339200, E6 = 22.0 / 525, E7 = -1.0 / 40;

    private const int MaxDim = 20;
    private readonly double[] _y = new double[MaxDim];
    private readonly double[] _yNew = new double[MaxDim];
    private readonly double[] _yStage = new double[MaxDim];
    private readonly double[] _k1 = new double[MaxDim];
    private readonly double[] _k2 = new double[MaxDim];
    private readonly double[] _k3 = new double[MaxDim];
    private readonly double[] _k4 = new double[MaxDim];
    private readonly double[] _k5 = new double[MaxDim];
    private readonly double[] _k6 = new double[MaxDim];
    private readonly double[] _k7 = new double[MaxDim];

    private IBackground _bg = null!;
    private double _lnK;
    private bool _scalar, _tensor, _derivs;
    private int _dim, _tOff, _blockS, _blockT;
    private int _rhsCount, _steps;
    private double _scaleS = 1, _scaleT = 1;

    /// <summary>Right-hand-side evaluations of the last integration.</summary>
    public int RhsEvaluations => _rhsCount;

    /// <summary>
    /// Integrates the mode <paramref name="k"/> to freeze-out (or NEnd) and returns P_s, P_t and their exact log-derivatives.
    /// <paramref name="scan"/> may be shared between modes of one background (built on demand when null).
    /// </summary>
    public ModeResult Solve(IBackground background, double k, ModeSettings settings, FrictionScan? scan = null)
    {
        Setup(background, k, settings);
        double xs = settings.EffectiveStartDepth;
        double n0 = StartTime(xs);
        SetInitialData(n0, settings.InitialData);
        double tol = settings.Tolerance;
        double xStop = settings.EffectiveStopDepth;
        double rtol = tol * settings.StepToleranceRatio;
        double nEnd = background.NEnd;
        double n = n0;
        double h = InitialStep(xs, rtol);
        bool frozen = false;
        double stopCorrection = 0;
        var nonSmooth = background.NonSmoothTimes;
        int segIndex = 0;
        while (segIndex < nonSmooth.Count && nonSmooth[segIndex] <= n0) segIndex++;
        Rhs(n, _y, _k1);
        while (!frozen)
        {
            double segEnd = segIndex < nonSmooth.Count && nonSmooth[segIndex] < nEnd ? nonSmooth[segIndex] : nEnd;
            while (true)
            {
                bool last = false;
                if (n + h >= segEnd - 1e-12 * Math.Max(1.0, Math.Abs(segEnd))) { h = segEnd - n; last = true; }
                if (_steps++ >= settings.MaxSteps)
                    throw new InvalidOperationException($"mode k = {k:G6}: step budget {settings.MaxSteps} exhausted at N = {n:G8}");
                double err = Step(n, h, rtol);
                if (!(err <= 1.0))
                {
                    if (double.IsNaN(err)) throw new InvalidOperationException($"mode k = {k:G6}: non-finite state at N = {n:G8}");
                    h *= Math.Max(0.2, 0.9 * Math.Pow(err, -0.2));
                    continue;
                }
                n = last ? segEnd : n + h;
                Array.Copy(_yNew, _y, _dim);
                Array.Copy(_k7, _k1, _dim);
                double fac = err == 0 ? 5.0 : Math.Min(5.0, Math.Max(0.2, 0.9 * Math.Pow(err, -0.2)));
                h *= fac;
                if (last) break;
                double x = Math.Exp(_lnK - n) / background.At(n).H;
                if (x <= xStop)
                {
                    scan ??= FrictionScan.Build(background, n);
                    if (x * x * Math.Exp(scan.LogGrowthAfter(n)) <= tol && TryFreeze(tol, out stopCorrection))
                    {
                        frozen = true;
                        break;
                    }
                }
            }
            if (frozen || segEnd >= nEnd) break;
            segIndex++;
            Rhs(n, _y, _k1); // restart cleanly after a non-smooth point
        }
        double xf = Math.Exp(_lnK - n) / background.At(n).H;
        double err0 = 10.0 * rtol + 0.1 * stopCorrection;
        return Results(k, n0, n, xs, xf, frozen, err0);
    }

    /// <summary>Integrates the mode from its start to <paramref name="nTarget"/> (no stop) and returns zeta, zeta', h, h' there (unscaled).</summary>
    public ModeSnapshot EvolveTo(IBackground background, double k, double nTarget, ModeSettings settings)
    {
        Setup(background, k, settings);
        double xs = settings.EffectiveStartDepth;
        double n0 = StartTime(xs);
        if (!(nTarget >= n0 && nTarget <= background.NEnd))
            throw new ArgumentOutOfRangeException(nameof(nTarget), nTarget, $"target N must lie in [{n0:G8}, {background.NEnd:G8}]");
        SetInitialData(n0, settings.InitialData);
        double rtol = settings.Tolerance * settings.StepToleranceRatio;
        double n = n0, h = InitialStep(xs, rtol);
        var nonSmooth = background.NonSmoothTimes;
        Rhs(n, _y, _k1);
        while (n < nTarget)
        {
            double segEnd = nTarget;
            for (int i = 0; i < nonSmooth.Count; i++)
                if (nonSmooth[i] > n && nonSmooth[i] < segEnd) { segEnd = nonSmooth[i]; break; }
            bool last = false;
            if (n + h >= segEnd) { h = segEnd - n; last = true; }
            if (_steps++ >= settings.MaxSteps) throw new InvalidOperationException($"mode k = {k:G6}: step budget exhausted");
            double err = Step(n, h, rtol);
            if (!(err <= 1.0)) { h *= Math.Max(0.2, 0.9 * Math.Pow(err, -0.2)); continue; }
            n = last ? segEnd : n + h;
            Array.Copy(_yNew, _y, _dim);
            Array.Copy(_k7, _k1, _dim);
            h *= err == 0 ? 5.0 : Math.Min(5.0, Math.Max(0.2, 0.9 * Math.Pow(err, -0.2)));
            if (last && n < nTarget) Rhs(n, _y, _k1);
        }
        Complex z = Complex.NaN, dz = Complex.NaN, t = Complex.NaN, dt = Complex.NaN;
        if (_scalar)
        {
            z = new Complex(_y[0], _y[1]) / _scaleS;
            dz = new Complex(_y[2], _y[3]) / _scaleS;
        }
        if (_tensor)
        {
            t = new Complex(_y[_tOff], _y[_tOff + 1]) / _scaleT;
            dt = new Complex(_y[_tOff + 2], _y[_tOff + 3]) / _scaleT;
        }
        return new ModeSnapshot(k, n, z, dz, t, dt, _rhsCount);
    }

    private void Setup(IBackground background, double k, ModeSettings settings)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        settings.Validate();
        if (!(k > 0) || double.IsInfinity(k)) throw new ArgumentOutOfRangeException(nameof(k), k, "wavenumber must be positive and finite");
        _bg = background;
        _lnK = Math.Log(k);
        _scalar = (settings.Kinds & ModeKinds.Scalar) != 0;
        _tensor = (settings.Kinds & ModeKinds.Tensor) != 0;
        _derivs = settings.Derivatives;
        _blockS = _scalar ? (_derivs ? 12 : 4) : 0;
        _blockT = _tensor ? (_derivs ? 8 : 4) : 0;
        _tOff = _blockS;
        _dim = _blockS + _blockT;
        _rhsCount = 0;
        _steps = 0;
        Array.Clear(_y);
    }

    /// <summary>The N where k/aH = <paramref name="depth"/>; throws when the background starts too late.</summary>
    private double StartTime(double depth)
    {
        double lnTarget = Math.Log(depth);
        double nA = _bg.NStart, nB = _bg.NEnd;
        double fA = LnDepth(nA) - lnTarget;
        if (fA < 0)
        {
            double kMin = Math.Exp(lnTarget + nA) * _bg.At(nA).H;
            throw new ArgumentOutOfRangeException("k", Math.Exp(_lnK),
                $"mode k = {Math.Exp(_lnK):G6} cannot start at k/aH = {depth:G3}: the background starts at k/aH = {Math.Exp(fA + lnTarget):G4}; the smallest k allowed is {kMin:G6}");
        }
        double fB = LnDepth(nB) - lnTarget;
        if (fB > 0)
            throw new ArgumentOutOfRangeException("k", Math.Exp(_lnK),
                $"mode k = {Math.Exp(_lnK):G6} is still at k/aH = {Math.Exp(fB + lnTarget):G4} at the end of inflation (N = {nB:G8})");
        // Newton on ln(k/aH) with d/dN = -(1 - e1), safeguarded by the bracket.
        double n = nA + fA / Math.Max(0.05, 1.0 - _bg.At(nA).Epsilon1);
        for (int it = 0; it < 100; it++)
        {
            if (!(n > nA && n < nB)) n = 0.5 * (nA + nB);
            var p = _bg.At(n);
            double f = _lnK - n - Math.Log(p.H) - lnTarget;
            if (f > 0) nA = n; else nB = n;
            double step = f / Math.Max(0.05, 1.0 - p.Epsilon1);
            n += step;
            if (Math.Abs(step) < 1e-13 * Math.Max(1.0, Math.Abs(n)) || nB - nA < 1e-13 * Math.Max(1.0, Math.Abs(n))) break;
        }
        // Keep the finite-difference stencil of the initial data (+-0.008/x) inside the background and away from
        // non-smooth points (start slightly later, i.e. a little shallower, when needed).
        double margin = 0.01 / Math.Max(1.0, depth);
        n = Math.Max(n, _bg.NStart + margin);
        var ns = _bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
            if (Math.Abs(ns[i] - n) < margin) n = ns[i] + margin;
        return Math.Min(n, _bg.NEnd);
    }

    private double LnDepth(double n) => _lnK - n - Math.Log(_bg.At(n).H);

    private static double InitialStep(double xs, double rtol) =>
        Math.Min(0.5, 0.4 / xs * Math.Pow(rtol / 1e-7, 0.2));

    // Frozen local data at one N: [0..5] zeta, zeta', zeta_k, zeta_k', zeta_kk, zeta_kk'; [6..9] h, h', h_k, h_k'.
    private const int DataWidth = 10;
    private readonly Complex[] _data = new Complex[9 * DataWidth];
    private readonly double[] _dataX2 = new double[9];
    private readonly double[] _dataF = new double[9];
    private readonly double[] _dataFt = new double[9];
    private readonly double[] _dataC = new double[9];

    /// <summary>
    /// Bunch-Davies data at <paramref name="n0"/>. Without derivatives: the frozen local-index Hankel solution.
    /// With derivatives: the k-derivatives are TOTAL derivatives along the start path x(N0(k)) = const, so that the
    /// computed n_s, alpha_s are the exact derivatives of the computed P(k) (which is smooth in k because every mode
    /// starts at the same depth). A fixed-N0 derivative would differentiate the small initial-data mismatch
    /// ~ exp(2i k tau0) and amplify it by (2 k/aH)^j. Moving N0 by dN0 = c dln k, c = 1/(1 - e1), adds
    /// c (d/dN data - f(data)) (the defect of the data as a solution) to the next derivative block; the N-derivatives
    /// of the data are 5-point central differences in N (no right-hand-side calls).
    /// </summary>
    private void SetInitialData(double n0, InitialDataKind kind)
    {
        if (!_derivs)
        {
            LocalData(n0, kind, _data.AsSpan(0, DataWidth), out _, out _, out _, out _);
            if (_scalar) { Put(0, _data[0], _data[1]); }
            if (_tensor) { Put(_tOff, _data[6], _data[7]); }
        }
        else
        {
            double x0 = Math.Exp(_lnK - n0) / _bg.At(n0).H;
            double dn = 0.005 / Math.Max(1.0, x0);
            for (int j = 0; j < 9; j++)
                LocalData(n0 + (j - 4) * dn, kind, _data.AsSpan(j * DataWidth, DataWidth), out _dataX2[j], out _dataF[j], out _dataFt[j], out _dataC[j]);
            int c0 = 4 * DataWidth;
            double c = _dataC[4];
            if (_scalar)
            {
                Span<Complex> z1 = stackalloc Complex[10]; // Z1 (value, derivative) at j = 2..6 (offsets -2..2)
                for (int j = 2; j <= 6; j++)
                {
                    int o = j * DataWidth;
                    Complex rho0 = D5(0, j, dn) - _data[o + 1];
                    Complex rho1 = D5(1, j, dn) - (-_dataF[j] * _data[o + 1] - _dataX2[j] * _data[o]);
                    z1[2 * (j - 2)] = _data[o + 2] + _dataC[j] * rho0;
                    z1[2 * (j - 2) + 1] = _data[o + 3] + _dataC[j] * rho1;
                }
                // d/dln k of Z1 at fixed N, then the defect sigma of Z1 as a solution of the first sensitivity equation.
                Complex krho0 = D5(2, 4, dn) - _data[c0 + 3];
                Complex krho1 = D5(3, 4, dn) - (-_dataF[4] * _data[c0 + 3] - _dataX2[4] * (_data[c0 + 2] + 2.0 * _data[c0]));
                Complex z1v = z1[4], z1d = z1[5];
                Complex dz1v = (z1[0] - 8.0 * z1[2] + 8.0 * z1[6] - z1[8]) / (12.0 * dn);
                Complex dz1d = (z1[1] - 8.0 * z1[3] + 8.0 * z1[7] - z1[9]) / (12.0 * dn);
                Complex sig0 = dz1v - z1d;
                Complex sig1 = dz1d - (-_dataF[4] * z1d - _dataX2[4] * (z1v + 2.0 * _data[c0]));
                Put(0, _data[c0], _data[c0 + 1]);
                Put(4, z1v, z1d);
                Put(8, _data[c0 + 4] + c * krho0 + c * sig0, _data[c0 + 5] + c * krho1 + c * sig1);
            }
            if (_tensor)
            {
                Complex rho0 = D5(6, 4, dn) - _data[c0 + 7];
                Complex rho1 = D5(7, 4, dn) - (-_dataFt[4] * _data[c0 + 7] - _dataX2[4] * _data[c0 + 6]);
                Put(_tOff, _data[c0 + 6], _data[c0 + 7]);
                Put(_tOff + 4, _data[c0 + 8] + c * rho0, _data[c0 + 9] + c * rho1);
            }
        }
        double xs = Math.Exp(_lnK - n0) / _bg.At(n0).H;
        if (_scalar)
        {
            _scaleS = xs / Math.Sqrt(_y[0] * _y[0] + _y[1] * _y[1]); // |zeta| of order 1 after horizon exit
            for (int i = 0; i < _blockS; i++) _y[i] *= _scaleS;
        }
        if (_tensor)
        {
            _scaleT = xs / Math.Sqrt(_y[_tOff] * _y[_tOff] + _y[_tOff + 1] * _y[_tOff + 1]);
            for (int i = _tOff; i < _dim; i++) _y[i] *= _scaleT;
        }
    }

    /// <summary>5-point central N-derivative of data component <paramref name="comp"/> at grid point <paramref name="j"/>.</summary>
    private Complex D5(int comp, int j, double dn) =>
        (_data[(j - 2) * DataWidth + comp] - 8.0 * _data[(j - 1) * DataWidth + comp]
         + 8.0 * _data[(j + 1) * DataWidth + comp] - _data[(j + 2) * DataWidth + comp]) / (12.0 * dn);

    /// <summary>The frozen local-index solution at N and its k-derivatives at fixed N (unscaled).</summary>
    private void LocalData(double n, InitialDataKind kind, Span<Complex> d, out double x2, out double f, out double ft, out double c)
    {
        var p = _bg.At(n);
        double e1 = p.Epsilon1, e2 = p.Epsilon2, e3 = p.Epsilon3;
        if (!(e1 < 1)) throw new ArgumentOutOfRangeException("k", Math.Exp(_lnK), $"mode k = {Math.Exp(_lnK):G6} would start at N = {n:G8} where epsilon_1 = {e1:G4} >= 1 (not inflating)");
        double oneMinus = 1.0 - e1;
        double x = Math.Exp(_lnK - n) / p.H;
        x2 = x * x;
        f = 3.0 - e1 + e2;
        ft = 3.0 - e1;
        c = 1.0 / oneMinus;
        double bigX = x / oneMinus; // -k tau
        double lnMinusTau = -n - Math.Log(oneMinus * p.H); // ln(-tau) = -ln((1 - e1) a H)
        Span<Complex> g = stackalloc Complex[4];
        if (_scalar)
        {
            if (!(e1 > 0)) throw new ArgumentOutOfRangeException("background", $"scalar modes need epsilon_1 > 0 (found {e1:G4} at N = {n:G8}); use tensor modes only on de Sitter");
            double nu = kind == InitialDataKind.QuasiDeSitter ? 1.5
                : IndexFrom(2.0 - e1 + 1.5 * e2 - 0.5 * e1 * e2 + 0.25 * e2 * e2 + 0.5 * e2 * e3, oneMinus);
            HankelDerivatives(nu, bigX, g);
            // zeta = v / z, z = a sqrt(2 e1), z'/z = 1 + e2/2.
            Complex cn = Normalisation(nu, lnMinusTau, n + 0.5 * Math.Log(2.0 * e1));
            double zp = 1.0 + 0.5 * e2;
            for (int j = 0; j < 3; j++)
            {
                Complex v = cn * g[j];
                Complex dv = -oneMinus * cn * (0.5 * g[j] + g[j + 1]);
                d[2 * j] = v;
                d[2 * j + 1] = dv - zp * v;
            }
        }
        if (_tensor)
        {
            double nu = kind == InitialDataKind.QuasiDeSitter ? 1.5 : IndexFrom(2.0 - e1, oneMinus);
            HankelDerivatives(nu, bigX, g);
            // h = 2u/a, h' = 2(u' - u)/a.
            Complex cn = Normalisation(nu, lnMinusTau, n - Math.Log(2.0));
            for (int j = 0; j < 2; j++)
            {
                Complex u = cn * g[j];
                Complex du = -oneMinus * cn * (0.5 * g[j] + g[j + 1]);
                d[6 + 2 * j] = u;
                d[6 + 2 * j + 1] = du - u;
            }
        }
    }

    private static double IndexFrom(double u, double oneMinusE1)
    {
        double nu2 = u / (oneMinusE1 * oneMinusE1) + 0.25;
        return Math.Sqrt(Math.Max(nu2, 0.0));
    }

    /// <summary>(sqrt(pi)/2) exp(i (nu + 1/2) pi/2) sqrt(-tau) / z, the factor of H_nu in zeta (or of h with z = a/2).</summary>
    private static Complex Normalisation(double nu, double lnMinusTau, double lnZ) =>
        Complex.FromPolarCoordinates(0.5 * Math.Sqrt(Math.PI) * Math.Exp(0.5 * lnMinusTau - lnZ), (nu + 0.5) * Math.PI / 2);

    /// <summary>g[j] = (X d/dX)^j H^(1)_nu(X), j = 0..3, from the Bessel equation: D^2 H = (nu^2 - X^2) H.</summary>
    internal static void HankelDerivatives(double nu, double bigX, Span<Complex> g)
    {
        Complex hn = SpecialFunctions.HankelH1(nu, new Complex(bigX, 0));
        Complex hp = SpecialFunctions.HankelH1(nu + 1.0, new Complex(bigX, 0));
        // H'_nu = (nu/X) H_nu - H_{nu+1}  =>  X H' = nu H_nu - X H_{nu+1}
        Complex d1 = nu * hn - bigX * hp;
        double q = nu * nu - bigX * bigX;
        g[0] = hn;
        g[1] = d1;
        g[2] = q * hn;
        g[3] = -2.0 * bigX * bigX * hn + q * d1;
    }

    private void Put(int off, Complex f, Complex df)
    {
        _y[off] = f.Real;
        _y[off + 1] = f.Imaginary;
        _y[off + 2] = df.Real;
        _y[off + 3] = df.Imaginary;
    }

    private void Rhs(double n, double[] y, double[] dy)
    {
        _rhsCount++;
        var p = _bg.At(n);
        double x = Math.Exp(_lnK - n) / p.H;
        double x2 = x * x;
        if (_scalar)
        {
            double f = 3.0 - p.Epsilon1 + p.Epsilon2;
            dy[0] = y[2];
            dy[1] = y[3];
            dy[2] = -f * y[2] - x2 * y[0];
            dy[3] = -f * y[3] - x2 * y[1];
            if (_derivs)
            {
                dy[4] = y[6];
                dy[5] = y[7];
                dy[6] = -f * y[6] - x2 * (y[4] + 2.0 * y[0]);
                dy[7] = -f * y[7] - x2 * (y[5] + 2.0 * y[1]);
                dy[8] = y[10];
                dy[9] = y[11];
                dy[10] = -f * y[10] - x2 * (y[8] + 4.0 * (y[4] + y[0]));
                dy[11] = -f * y[11] - x2 * (y[9] + 4.0 * (y[5] + y[1]));
            }
        }
        if (_tensor)
        {
            int o = _tOff;
            double f = 3.0 - p.Epsilon1;
            dy[o] = y[o + 2];
            dy[o + 1] = y[o + 3];
            dy[o + 2] = -f * y[o + 2] - x2 * y[o];
            dy[o + 3] = -f * y[o + 3] - x2 * y[o + 1];
            if (_derivs)
            {
                dy[o + 4] = y[o + 6];
                dy[o + 5] = y[o + 7];
                dy[o + 6] = -f * y[o + 6] - x2 * (y[o + 4] + 2.0 * y[o]);
                dy[o + 7] = -f * y[o + 7] - x2 * (y[o + 5] + 2.0 * y[o + 1]);
            }
        }
    }

    /// <summary>One Dormand-Prince step from (n, _y) with _k1 = f(n, _y); fills _yNew, _k7; returns the scaled error norm.</summary>
    private double Step(double n, double h, double rtol)
    {
        int d = _dim;
        double[] y = _y, ys = _yStage;
        for (int i = 0; i < d; i++) ys[i] = y[i] + h * A21 * _k1[i];
        Rhs(n + C2 * h, ys, _k2);
        for (int i = 0; i < d; i++) ys[i] = y[i] + h * (A31 * _k1[i] + A32 * _k2[i]);
        Rhs(n + C3 * h, ys, _k3);
        for (int i = 0; i < d; i++) ys[i] = y[i] + h * (A41 * _k1[i] + A42 * _k2[i] + A43 * _k3[i]);
        Rhs(n + C4 * h, ys, _k4);
        for (int i = 0; i < d; i++) ys[i] = y[i] + h * (A51 * _k1[i] + A52 * _k2[i] + A53 * _k3[i] + A54 * _k4[i]);
        Rhs(n + C5 * h, ys, _k5);
        for (int i = 0; i < d; i++) ys[i] = y[i] + h * (A61 * _k1[i] + A62 * _k2[i] + A63 * _k3[i] + A64 * _k4[i] + A65 * _k5[i]);
        Rhs(n + h, ys, _k6);
        for (int i = 0; i < d; i++) _yNew[i] = y[i] + h * (B1 * _k1[i] + B3 * _k3[i] + B4 * _k4[i] + B5 * _k5[i] + B6 * _k6[i]);
        Rhs(n + h, _yNew, _k7);
        // Error norm: each complex quantity is scaled by the size of its block (|f| + |f'|), so a zero crossing
        // of one real component does not force tiny steps; absolute floor rtol (states are normalised to O(1)).
        double sum = 0;
        for (int b = 0; b < d; b += 4)
        {
            double s0 = Math.Abs(y[b]) + Math.Abs(y[b + 1]) + Math.Abs(y[b + 2]) + Math.Abs(y[b + 3]);
            double s1 = Math.Abs(_yNew[b]) + Math.Abs(_yNew[b + 1]) + Math.Abs(_yNew[b + 2]) + Math.Abs(_yNew[b + 3]);
            double sc = rtol * (1e-3 + Math.Max(s0, s1));
            for (int i = b; i < b + 4; i++)
            {
                double e = h * (E1 * _k1[i] + E3 * _k3[i] + E4 * _k4[i] + E5 * _k5[i] + E6 * _k6[i] + E7 * _k7[i]) / sc;
                sum += e * e;
            }
        }
        return Math.Sqrt(sum / d);
    }

    /// <summary>
    /// Checks that every carried quantity f has stopped changing: outside the horizon f tends to a constant as
    /// f_inf - f = f'/r with r = -zeta''/zeta' (one decay rate; Aitken-type). Frozen when every |f'/r| is below
    /// <paramref name="tol"/> relative to |zeta| (or |h|); the correction f'/r is then added.
    /// </summary>
    private bool TryFreeze(double tol, out double correction)
    {
        correction = 0;
        if (_scalar && !TryFreezeBlock(0, _derivs ? 3 : 1, tol, ref correction)) return false;
        if (_tensor && !TryFreezeBlock(_tOff, _derivs ? 2 : 1, tol, ref correction)) return false;
        if (_scalar) ApplyFreeze(0, _derivs ? 3 : 1);
        if (_tensor) ApplyFreeze(_tOff, _derivs ? 2 : 1);
        return true;
    }

    private bool TryFreezeBlock(int off, int blocks, double tol, ref double correction)
    {
        var f1 = new Complex(_y[off + 2], _y[off + 3]);
        var f2 = new Complex(_k1[off + 2], _k1[off + 3]);
        double mag = new Complex(_y[off], _y[off + 1]).Magnitude;
        if (f1 == Complex.Zero) return true;
        Complex r = -f2 / f1;
        if (!(r.Real > 0.5)) return false; // not decaying: keep going
        for (int j = 0; j < blocks; j++)
        {
            var d = new Complex(_y[off + 4 * j + 2], _y[off + 4 * j + 3]) / r;
            double rel = d.Magnitude / mag;
            if (!(rel <= tol)) return false;
            correction = Math.Max(correction, rel);
        }
        return true;
    }

    private void ApplyFreeze(int off, int blocks)
    {
        var f1 = new Complex(_y[off + 2], _y[off + 3]);
        if (f1 == Complex.Zero) return;
        Complex r = -new Complex(_k1[off + 2], _k1[off + 3]) / f1;
        for (int j = 0; j < blocks; j++)
        {
            int o = off + 4 * j;
            var d = new Complex(_y[o + 2], _y[o + 3]) / r;
            _y[o] += d.Real;
            _y[o + 1] += d.Imaginary;
        }
    }

    private ModeResult Results(double k, double n0, double nf, double xs, double xf, bool frozen, double err)
    {
        double lnK3 = 3.0 * _lnK;
        double ps = double.NaN, pt = double.NaN, nsm1 = double.NaN, alpha = double.NaN, nt = double.NaN;
        if (_scalar)
        {
            var z0 = new Complex(_y[0], _y[1]);
            double s = z0.Real * z0.Real + z0.Imaginary * z0.Imaginary;
            ps = Math.Exp(lnK3 + Math.Log(s) - 2.0 * Math.Log(_scaleS)) / (2.0 * Math.PI * Math.PI);
            if (_derivs)
            {
                var z1 = new Complex(_y[4], _y[5]);
                var z2 = new Complex(_y[8], _y[9]);
                double sk = 2.0 * (z0.Real * z1.Real + z0.Imaginary * z1.Imaginary);
                double skk = 2.0 * (z1.Real * z1.Real + z1.Imaginary * z1.Imaginary + z0.Real * z2.Real + z0.Imaginary * z2.Imaginary);
                nsm1 = 3.0 + sk / s;
                alpha = skk / s - (sk / s) * (sk / s);
            }
        }
        if (_tensor)
        {
            int o = _tOff;
            var h0 = new Complex(_y[o], _y[o + 1]);
            double s = h0.Real * h0.Real + h0.Imaginary * h0.Imaginary;
            // P_t = 8 k^3 |u/a|^2/(2 pi^2) = k^3 |h|^2 / pi^2.
            pt = Math.Exp(lnK3 + Math.Log(s) - 2.0 * Math.Log(_scaleT)) / (Math.PI * Math.PI);
            if (_derivs)
            {
                var h1 = new Complex(_y[o + 4], _y[o + 5]);
                nt = 3.0 + 2.0 * (h0.Real * h1.Real + h0.Imaginary * h1.Imaginary) / s;
            }
        }
        return new ModeResult(k, ps, pt, nsm1, alpha, nt, n0, nf, xs, xf, frozen, _rhsCount, _steps, err);
    }
}

/// <summary>A mode at one instant (unnormalised physical values, background units).</summary>
/// <param name="K">Wavenumber.</param>
/// <param name="N">E-folds.</param>
/// <param name="Zeta">Comoving curvature perturbation zeta_k = v_k / z.</param>
/// <param name="DZeta">d zeta / dN.</param>
/// <param name="H">Tensor amplitude h = 2u/a of one polarisation.</param>
/// <param name="DH">dh/dN.</param>
/// <param name="RhsEvaluations">Work so far.</param>
public readonly record struct ModeSnapshot(double K, double N, Complex Zeta, Complex DZeta, Complex H, Complex DH, int RhsEvaluations);
