using static ModeSolver.Integrators.Radau5Coefficients;

namespace ModeSolver.Integrators;

/// <summary>
/// The implicit 3-stage Radau IIA method of order 5, L-stable (Hairer and Wanner II, sec. IV.8): simplified
/// Newton iteration on the stage increments, decoupled by the transformation T into one real and one complex
/// n x n system; convergence monitored by the contraction rate theta; error estimate (8.19-8.20) with the extra
/// filtering evaluation after a rejection; Gustafsson's predictive step control; Jacobian reused while Newton
/// converges fast; the collocation polynomial as dense output and as predictor for the next step's stages.
/// </summary>
internal sealed class Radau5Stepper : Stepper
{
    private const int MaxNewton = 7;          // nit
    private const double Safe = 0.9;
    private const double FacL = 5.0;           // h_new / h >= 1/5
    private const double FacR = 1.0 / 8.0;     // h_new / h <= 8
    private const double ThetaJac = 0.001;     // reuse the Jacobian below this contraction rate
    private const double Quot1 = 1.0, Quot2 = 1.2; // keep h (and the LU) if h_new/h is in [Quot1, Quot2]
    private const double Uround = 1.0e-16;

    private readonly JacobianFunction? _jacobian;
    private readonly double _rtol;
    private readonly double[] _atol, _scal;
    private readonly double[] _fjac, _e1, _e2r, _e2i;
    private readonly int[] _ip1, _ip2;
    private readonly double[] _z1, _z2, _z3, _f1, _f2, _f3, _g1, _g2, _g3, _y0f, _tmp, _ferr, _cont;
    private readonly double _fnewt;

    private bool _first, _reject, _jacFresh, _needJac, _lastRejectNonFinite;
    private double _decompH, _hold, _faccon, _theta, _thqold, _dynold, _hacc, _erracc;
    private int _accepted;

    public Radau5Stepper(OdeProblem problem, OdeOptions options, WorkCounters counters, double fixedStep)
        : base(problem, options, counters, fixedStep)
    {
        _jacobian = problem.Jacobian;
        // Tolerance transformation of RADAU5 (the error estimate is of lower order): rtol' = 0.1 rtol^(2/3).
        const double expm = 2.0 / 3.0;
        _rtol = 0.1 * Math.Pow(Rtol, expm);
        _atol = new double[N];
        for (int i = 0; i < N; i++) _atol[i] = _rtol * (Atol[i] / Rtol);
        _fnewt = Math.Max(10 * Uround / _rtol, Math.Min(0.03, Math.Sqrt(_rtol)));
        int nn = N * N;
        _fjac = new double[nn]; _e1 = new double[nn]; _e2r = new double[nn]; _e2i = new double[nn];
        _ip1 = new int[N]; _ip2 = new int[N];
        _scal = new double[N];
        _z1 = new double[N]; _z2 = new double[N]; _z3 = new double[N];
        _f1 = new double[N]; _f2 = new double[N]; _f3 = new double[N];
        _g1 = new double[N]; _g2 = new double[N]; _g3 = new double[N];
        _y0f = new double[N]; _tmp = new double[N]; _ferr = new double[N];
        _cont = new double[4 * N];
    }

    public override string Name => "RadauIIA5";

    /// <summary>Estimate of the spectral radius of the last Jacobian (power iteration), for the switch back to explicit.</summary>
    public double SpectralRadius { get; private set; }

    /// <summary>Accepted steps since the Jacobian was last evaluated.</summary>
    public int JacobianAge { get; private set; }

    /// <summary>Asks for a fresh Jacobian (hence a fresh <see cref="SpectralRadius"/>) before the next step.</summary>
    public void RequestJacobian() => _needJac = true;

    /// <summary>Newton iterations of the last accepted step.</summary>
    public int LastNewtonIterations { get; private set; }

    public override void Start(double t, ReadOnlySpan<double> y, double hTrial)
    {
        T = t;
        TOld = t;
        y.CopyTo(Y);
        y.CopyTo(YOld);
        CallRhs(T, Y, _y0f);
        if (!AllFinite(_y0f)) throw NonFinite("the derivative");
        ComputeScal();
        _first = true;
        _reject = false;
        _jacFresh = false;
        _needJac = true;
        _decompH = double.NaN;
        _faccon = 1.0;
        _theta = ThetaJac;
        _thqold = 1.0;
        _dynold = 1.0;
        _hacc = 0;
        _erracc = 1e-2;
        _accepted = 0;
        _lastRejectNonFinite = false;
        if (hTrial != 0) HNext = Direction * Math.Abs(hTrial);
        else HNext = InitialStep(5, _y0f, _tmp, _g1);
        _hold = HNext;
    }

    private void ComputeScal()
    {
        for (int i = 0; i < N; i++) _scal[i] = _atol[i] + _rtol * Math.Abs(Y[i]);
    }

    private void ComputeJacobian()
    {
        int n = N;
        if (_jacobian is not null)
        {
            _jacobian(T, Y, _fjac);
        }
        else
        {
            // Forward differences column by column, increment sqrt(uround * max(1e-5, |y_j|)) (RADAU5's choice).
            for (int j = 0; j < n; j++)
            {
                double ysafe = Y[j];
                double delt = Math.Sqrt(Uround * Math.Max(1e-5, Math.Abs(ysafe)));
                Y[j] = ysafe + delt;
                delt = Y[j] - ysafe;
                CallRhs(T, Y, _tmp);
                for (int i = 0; i < n; i++) _fjac[i * n + j] = (_tmp[i] - _y0f[i]) / delt;
                Y[j] = ysafe;
            }
        }
        Counters.Jacobians++;
        JacobianAge = 0;
        _jacFresh = true;
        _needJac = false;
        _decompH = double.NaN;
        SpectralRadius = EstimateSpectralRadius();
    }

    /// <summary>rho(J) ~ (|J^k v| / |v|)^(1/k) by power iteration (k = 12), robust for complex pairs.</summary>
    private double EstimateSpectralRadius()
    {
        int n = N;
        Span<double> v = _g1, w = _g2;
        for (int i = 0; i < n; i++) v[i] = 1.0 + 0.1 * i;
        double logSum = 0;
        const int k = 12;
        for (int it = 0; it < k; it++)
        {
            double norm = 0;
            for (int i = 0; i < n; i++)
            {
                double s = 0;
                for (int j = 0; j < n; j++) s += _fjac[i * n + j] * v[j];
                w[i] = s;
                norm += s * s;
            }
            double vn = 0;
            for (int i = 0; i < n; i++) vn += v[i] * v[i];
            norm = Math.Sqrt(norm);
            vn = Math.Sqrt(vn);
            if (norm == 0 || !double.IsFinite(norm)) return norm == 0 ? 0 : double.PositiveInfinity;
            logSum += Math.Log(norm / vn);
            for (int i = 0; i < n; i++) v[i] = w[i] / norm;
        }
        return Math.Exp(logSum / k);
    }

    /// <summary>E1 = (gamma/h) I - J and E2 = ((alpha + i beta)/h) I - J, factored.</summary>
    private bool Decompose(double h)
    {
        int n = N;
        double fac1 = Gamma / h, alphn = Alpha / h, betan = Beta / h;
        for (int i = 0; i < n * n; i++)
        {
            _e1[i] = -_fjac[i];
            _e2r[i] = -_fjac[i];
            _e2i[i] = 0;
        }
        for (int i = 0; i < n; i++)
        {
            _e1[i * n + i] += fac1;
            _e2r[i * n + i] += alphn;
            _e2i[i * n + i] = betan;
        }
        Counters.Factorizations++;
        _decompH = h;
        return DenseLu.Factor(_e1, _ip1, n) && DenseLu.Factor(_e2r, _e2i, _ip2, n);
    }

    public override void Advance(double tEnd)
    {
        int n = N;
        while (true)
        {
            double h = ClipStep(HNext, tEnd, out bool last);
            if (TooSmall(h)) throw _lastRejectNonFinite ? NonFinite("the state or its derivative") : Underflow(h);
            Counters.BeforeAttempt(T, Y);
            if (_needJac) ComputeJacobian();
            if (h != _decompH && !Decompose(h))
            {
                UnexpectedRejection(h, nonFinite: false);
                continue;
            }
            double tNew = last ? tEnd : T + h;

            // Starting values: zero on the first step, otherwise the previous collocation polynomial extrapolated.
            if (_first)
            {
                Array.Clear(_z1); Array.Clear(_z2); Array.Clear(_z3);
                Array.Clear(_f1); Array.Clear(_f2); Array.Clear(_f3);
            }
            else
            {
                double c3q = h / _hold, c1q = C1 * c3q, c2q = C2 * c3q;
                for (int i = 0; i < n; i++)
                {
                    double ak1 = _cont[n + i], ak2 = _cont[2 * n + i], ak3 = _cont[3 * n + i];
                    double z1i = c1q * (ak1 + (c1q - C2M1) * (ak2 + (c1q - C1M1) * ak3));
                    double z2i = c2q * (ak1 + (c2q - C2M1) * (ak2 + (c2q - C1M1) * ak3));
                    double z3i = c3q * (ak1 + (c3q - C2M1) * (ak2 + (c3q - C1M1) * ak3));
                    _z1[i] = z1i; _z2[i] = z2i; _z3[i] = z3i;
                    _f1[i] = TI11 * z1i + TI12 * z2i + TI13 * z3i;
                    _f2[i] = TI21 * z1i + TI22 * z2i + TI23 * z3i;
                    _f3[i] = TI31 * z1i + TI32 * z2i + TI33 * z3i;
                }
            }

            // Simplified Newton iteration.
            double fac1 = Gamma / h, alphn = Alpha / h, betan = Beta / h;
            int newt = 0;
            _faccon = Math.Pow(Math.Max(_faccon, Uround), 0.8);
            _theta = Math.Abs(ThetaJac);
            bool converged = false, retry = false, nonFinite = false;
            while (true)
            {
                if (newt >= (FixedStep > 0 ? 60 : MaxNewton)) break;
                for (int i = 0; i < n; i++) _tmp[i] = Y[i] + _z1[i];
                CallRhs(T + C1 * h, _tmp, _g1);
                for (int i = 0; i < n; i++) _tmp[i] = Y[i] + _z2[i];
                CallRhs(T + C2 * h, _tmp, _g2);
                for (int i = 0; i < n; i++) _tmp[i] = Y[i] + _z3[i];
                CallRhs(tNew, _tmp, _g3);
                if (!AllFinite(_g1) || !AllFinite(_g2) || !AllFinite(_g3))
                {
                    nonFinite = true;
                    break;
                }
                for (int i = 0; i < n; i++)
                {
                    double a1 = _g1[i], a2 = _g2[i], a3 = _g3[i];
                    double r1 = TI11 * a1 + TI12 * a2 + TI13 * a3;
                    double r2 = TI21 * a1 + TI22 * a2 + TI23 * a3;
                    double r3 = TI31 * a1 + TI32 * a2 + TI33 * a3;
                    _g1[i] = r1 - fac1 * _f1[i];
                    _g2[i] = r2 - alphn * _f2[i] + betan * _f3[i];
                    _g3[i] = r3 - alphn * _f3[i] - betan * _f2[i];
                }
                DenseLu.Solve(_e1, _ip1, n, _g1);
                DenseLu.Solve(_e2r, _e2i, _ip2, n, _g2, _g3);
                newt++;
                double dyno = 0;
                for (int i = 0; i < n; i++)
                {
                    double s = 1.0 / _scal[i];
                    dyno += (_g1[i] * s) * (_g1[i] * s) + (_g2[i] * s) * (_g2[i] * s) + (_g3[i] * s) * (_g3[i] * s);
                }
                dyno = Math.Sqrt(dyno / (3 * n));
                if (!double.IsFinite(dyno))
                {
                    nonFinite = true;
                    break;
                }
                if (newt > 1 && newt < MaxNewton && FixedStep == 0)
                {
                    double thq = dyno / _dynold;
                    _theta = newt == 2 ? thq : Math.Sqrt(thq * _thqold);
                    _thqold = thq;
                    if (_theta < 0.99)
                    {
                        _faccon = _theta / (1.0 - _theta);
                        double dyth = _faccon * dyno * Math.Pow(_theta, MaxNewton - 1 - newt) / _fnewt;
                        if (dyth >= 1.0 && FixedStep == 0)
                        {
                            // Convergence too slow for this step: shrink it (no rejection counted by RADAU5).
                            double qnewt = Math.Max(1e-4, Math.Min(20.0, dyth));
                            HNext = h * 0.8 * Math.Pow(qnewt, -1.0 / (4.0 + MaxNewton - 1 - newt));
                            retry = true;
                            break;
                        }
                    }
                    else
                    {
                        break; // diverging: unexpected rejection
                    }
                }
                _dynold = Math.Max(dyno, Uround);
                for (int i = 0; i < n; i++)
                {
                    double f1i = _f1[i] + _g1[i], f2i = _f2[i] + _g2[i], f3i = _f3[i] + _g3[i];
                    _f1[i] = f1i; _f2[i] = f2i; _f3[i] = f3i;
                    _z1[i] = T11 * f1i + T12 * f2i + T13 * f3i;
                    _z2[i] = T21 * f1i + T22 * f2i + T23 * f3i;
                    _z3[i] = T31 * f1i + T32 * f2i + T33 * f3i;
                }
                if (_faccon * dyno <= _fnewt)
                {
                    converged = true;
                    break;
                }
            }

            if (retry)
            {
                Counters.Rejected++;
                _reject = true;
                if (!_jacFresh) _needJac = true;
                continue;
            }
            if (!converged)
            {
                if (FixedStep > 0 && !nonFinite)
                    throw new IntegrationException(IntegrationFailure.StepSizeUnderflow, T, (double[])Y.Clone(),
                        $"{Name}: fixed step {FixedStep:E3} too large for the Newton iteration to converge at t = {T:R}");
                UnexpectedRejection(h, nonFinite);
                continue;
            }

            double err = FixedStep > 0 ? 0.0 : ErrorEstimate(h);
            if (!double.IsFinite(err))
            {
                UnexpectedRejection(h, nonFinite: true);
                continue;
            }

            // Step-size proposal, with Gustafsson's predictive controller (Hairer and Wanner II, eq. IV.8.25).
            double fac = Math.Min(Safe, Safe * (1 + 2 * MaxNewton) / (newt + 2 * MaxNewton));
            double quot = Math.Max(FacR, Math.Min(FacL, Math.Pow(err, 0.25) / fac));
            double hNew = h / quot;

            if (err < 1.0)
            {
                if (_accepted >= 1)
                {
                    double facgus = (_hacc / h) * Math.Pow(err * err / _erracc, 0.25) / Safe;
                    facgus = Math.Max(FacR, Math.Min(FacL, facgus));
                    quot = Math.Max(quot, facgus);
                    hNew = h / quot;
                }
                _hacc = h;
                _erracc = Math.Max(1e-2, err);
                Accept(h, tNew, newt, hNew, last, tEnd);
                return;
            }

            // Rejected by the error test.
            _reject = true;
            _lastRejectNonFinite = false;
            Counters.Rejected++;
            HNext = _first ? 0.1 * h : hNew;
            if (!_jacFresh) _needJac = true;
        }
    }

    private void UnexpectedRejection(double h, bool nonFinite)
    {
        HNext = 0.5 * h;
        _reject = true;
        _lastRejectNonFinite = nonFinite;
        Counters.Rejected++;
        if (!_jacFresh) _needJac = true;
    }

    /// <summary>Error estimate of RADAU5 (Hairer and Wanner II, eqs. IV.8.19-8.20), filtered by (gamma/h I - J)^-1.</summary>
    private double ErrorEstimate(double h)
    {
        int n = N;
        double hee1 = DD1 / h, hee2 = DD2 / h, hee3 = DD3 / h;
        for (int i = 0; i < n; i++)
        {
            double f2 = hee1 * _z1[i] + hee2 * _z2[i] + hee3 * _z3[i];
            _ferr[i] = f2;
            _tmp[i] = f2 + _y0f[i];
        }
        DenseLu.Solve(_e1, _ip1, n, _tmp);
        double err = Norm(_tmp);
        if (err >= 1.0 && (_first || _reject))
        {
            for (int i = 0; i < n; i++) _tmp[i] += Y[i];
            CallRhs(T, _tmp, _g1);
            for (int i = 0; i < n; i++) _tmp[i] = _g1[i] + _ferr[i];
            DenseLu.Solve(_e1, _ip1, n, _tmp);
            err = Norm(_tmp);
        }
        return err;
    }

    private double Norm(ReadOnlySpan<double> v)
    {
        double s = 0;
        for (int i = 0; i < N; i++)
        {
            double q = v[i] / _scal[i];
            s += q * q;
        }
        return Math.Max(Math.Sqrt(s / N), 1e-10);
    }

    private void Accept(double h, double tNew, int newt, double hNew, bool last, double tEnd)
    {
        int n = N;
        _first = false;
        _accepted++;
        JacobianAge++;
        Counters.Accepted++;
        LastNewtonIterations = newt;
        TOld = T;
        Array.Copy(Y, YOld, n);
        _hold = h;
        HLast = h;
        for (int i = 0; i < n; i++)
        {
            double yNew = Y[i] + _z3[i];
            Y[i] = yNew;
            double z1i = _z1[i], z2i = _z2[i], z3i = _z3[i];
            double c1 = (z2i - z3i) / C2M1;
            double ak = (z1i - z2i) / C1MC2;
            double acont3 = (ak - z1i / C1) / C2;
            double c2 = (ak - c1) / C1M1;
            _cont[i] = yNew;
            _cont[n + i] = c1;
            _cont[2 * n + i] = c2;
            _cont[3 * n + i] = c2 - acont3;
        }
        T = last ? tEnd : tNew;
        if (!AllFinite(Y)) throw NonFinite("the state");
        ComputeScal();
        CallRhs(T, Y, _y0f);
        if (!AllFinite(_y0f)) throw NonFinite("the derivative");
        _jacFresh = false;
        _lastRejectNonFinite = false;

        hNew = Direction * Math.Min(Math.Abs(hNew), HMax);
        if (_reject) hNew = Direction * Math.Min(Math.Abs(hNew), Math.Abs(h));
        _reject = false;
        double qt = hNew / h;
        if (_theta <= ThetaJac && qt >= Quot1 && qt <= Quot2)
        {
            HNext = h; // keep the step, the Jacobian and the factorisation
            if (last) HNext = hNew;
            return;
        }
        HNext = hNew;
        if (_theta > ThetaJac) _needJac = true;
    }

    public override void Interpolate(double t, Span<double> y) =>
        DenseStore.Evaluate(DenseKind.Radau5, _cont, T, HLast, t, y);

    public override void StoreDense(DenseStore store) =>
        _cont.CopyTo(store.Add(DenseKind.Radau5, T, HLast, T, 4));
}
