using static ModeSolver.Integrators.Dop853Coefficients;

namespace ModeSolver.Integrators;

/// <summary>
/// The explicit Dormand-Prince 8(5,3) stepper (Hairer, Norsett and Wanner I, sec. II.10): 12 stages per step plus
/// the FSAL evaluation, error err = |h| E5^2 / sqrt(n (E5^2 + 0.01 E3^2)) from the 5th- and 3rd-order
/// estimators, a stabilised PI step-size controller, 3 extra stages for the 7th-order dense output (only when
/// the dense output is needed), and the h|lambda| stiffness estimate from stages 12 and 13.
/// </summary>
internal sealed class Dop853Stepper : Stepper
{
    // Step-size control (Hairer, Norsett and Wanner I, sec. II.4 and IV.2 of part II for the PI form):
    // h_new = h * safe * err^(-Alpha) * errOld^Beta, clipped to [MinFactor, MaxFactor] * h.
    private const double Safe = 0.9;
    private const double Beta = 0.04;
    private const double Alpha = 1.0 / 8.0 - 0.2 * Beta;
    private const double MinFactor = 0.333;
    private const double MaxFactor = 6.0;

    private readonly bool _dense;
    private readonly double[] _k1, _k2, _k3, _k4, _k5, _k6, _k7, _k8, _k9, _k10, _k11, _k12, _k13, _k14, _k15, _k16;
    private readonly double[] _yStage, _y12, _yNew, _bsum, _cont;
    private double _errOld = 1e-4;
    private bool _lastRejected;
    private int _nonFiniteRejections;
    // True while the latest rejection was caused by NaN/infinity: a step-size underflow then reports that instead.
    private bool _lastRejectNonFinite;

    public Dop853Stepper(OdeProblem problem, OdeOptions options, WorkCounters counters, bool dense, double fixedStep)
        : base(problem, options, counters, fixedStep)
    {
        _dense = dense;
        _k1 = new double[N]; _k2 = new double[N]; _k3 = new double[N]; _k4 = new double[N];
        _k5 = new double[N]; _k6 = new double[N]; _k7 = new double[N]; _k8 = new double[N];
        _k9 = new double[N]; _k10 = new double[N]; _k11 = new double[N]; _k12 = new double[N];
        _k13 = new double[N]; _k14 = new double[N]; _k15 = new double[N]; _k16 = new double[N];
        _yStage = new double[N]; _y12 = new double[N]; _yNew = new double[N]; _bsum = new double[N];
        _cont = new double[8 * N];
    }

    public override string Name => "DOP853";

    /// <summary>h|lambda| estimate of the last accepted step (Hairer and Wanner II, sec. IV.2), 0 if undetermined.</summary>
    public double StiffnessIndicator { get; private set; }

    /// <inheritdoc/>
    /// <remarks>
    /// Valid after Start and each accepted step: after a step, the first-same-as-last stage f(tNew, yNew), computed
    /// with the new T and Y themselves.
    /// </remarks>
    public override ReadOnlySpan<double> EndDerivative => _k1;

    public override void Start(double t, ReadOnlySpan<double> y, double hTrial)
    {
        T = t;
        TOld = t;
        y.CopyTo(Y);
        y.CopyTo(YOld);
        CallRhs(T, Y, _k1);
        if (!AllFinite(_k1)) throw NonFinite("the derivative");
        _errOld = 1e-4;
        _lastRejected = false;
        _nonFiniteRejections = 0;
        _lastRejectNonFinite = false;
        HNext = hTrial != 0 ? Direction * Math.Abs(hTrial) : InitialStep(8, _k1, _yStage, _k2);
    }

    public override void Advance(double tEnd)
    {
        int n = N;
        var y = Y;
        while (true)
        {
            double h = ClipStep(HNext, tEnd, out bool last);
            if (TooSmall(h)) throw _lastRejectNonFinite ? NonFinite("the state or its derivative") : Underflow(h);
            Counters.BeforeAttempt(T, Y);
            double t = T;

            for (int i = 0; i < n; i++) _yStage[i] = y[i] + h * A21 * _k1[i];
            CallRhs(t + C2 * h, _yStage, _k2);
            for (int i = 0; i < n; i++) _yStage[i] = y[i] + h * (A31 * _k1[i] + A32 * _k2[i]);
            CallRhs(t + C3 * h, _yStage, _k3);
            for (int i = 0; i < n; i++) _yStage[i] = y[i] + h * (A41 * _k1[i] + A43 * _k3[i]);
            CallRhs(t + C4 * h, _yStage, _k4);
            for (int i = 0; i < n; i++) _yStage[i] = y[i] + h * (A51 * _k1[i] + A53 * _k3[i] + A54 * _k4[i]);
            CallRhs(t + C5 * h, _yStage, _k5);
            for (int i = 0; i < n; i++) _yStage[i] = y[i] + h * (A61 * _k1[i] + A64 * _k4[i] + A65 * _k5[i]);
            CallRhs(t + C6 * h, _yStage, _k6);
            for (int i = 0; i < n; i++) _yStage[i] = y[i] + h * (A71 * _k1[i] + A74 * _k4[i] + A75 * _k5[i] + A76 * _k6[i]);
            CallRhs(t + C7 * h, _yStage, _k7);
            for (int i = 0; i < n; i++)
                _yStage[i] = y[i] + h * (A81 * _k1[i] + A84 * _k4[i] + A85 * _k5[i] + A86 * _k6[i] + A87 * _k7[i]);
            CallRhs(t + C8 * h, _yStage, _k8);
            for (int i = 0; i < n; i++)
                _yStage[i] = y[i] + h * (A91 * _k1[i] + A94 * _k4[i] + A95 * _k5[i] + A96 * _k6[i] + A97 * _k7[i] + A98 * _k8[i]);
            CallRhs(t + C9 * h, _yStage, _k9);
            for (int i = 0; i < n; i++)
                _yStage[i] = y[i] + h * (A101 * _k1[i] + A104 * _k4[i] + A105 * _k5[i] + A106 * _k6[i] + A107 * _k7[i]
                                         + A108 * _k8[i] + A109 * _k9[i]);
            CallRhs(t + C10 * h, _yStage, _k10);
            for (int i = 0; i < n; i++)
                _yStage[i] = y[i] + h * (A111 * _k1[i] + A114 * _k4[i] + A115 * _k5[i] + A116 * _k6[i] + A117 * _k7[i]
                                         + A118 * _k8[i] + A119 * _k9[i] + A1110 * _k10[i]);
            CallRhs(t + C11 * h, _yStage, _k11);
            double tNew = last ? tEnd : t + h;
            for (int i = 0; i < n; i++)
                _y12[i] = y[i] + h * (A121 * _k1[i] + A124 * _k4[i] + A125 * _k5[i] + A126 * _k6[i] + A127 * _k7[i]
                                      + A128 * _k8[i] + A129 * _k9[i] + A1210 * _k10[i] + A1211 * _k11[i]);
            CallRhs(tNew, _y12, _k12);

            // 8th-order solution and the two error estimators.
            double e5 = 0, e3 = 0;
            for (int i = 0; i < n; i++)
            {
                double b = B1 * _k1[i] + B6 * _k6[i] + B7 * _k7[i] + B8 * _k8[i] + B9 * _k9[i] + B10 * _k10[i]
                           + B11 * _k11[i] + B12 * _k12[i];
                _bsum[i] = b;
                _yNew[i] = y[i] + h * b;
                double sk = Atol[i] + Rtol * Math.Max(Math.Abs(y[i]), Math.Abs(_yNew[i]));
                double d3 = (b - Bhh1 * _k1[i] - Bhh2 * _k9[i] - Bhh3 * _k12[i]) / sk;
                double d5 = (Er1 * _k1[i] + Er6 * _k6[i] + Er7 * _k7[i] + Er8 * _k8[i] + Er9 * _k9[i] + Er10 * _k10[i]
                             + Er11 * _k11[i] + Er12 * _k12[i]) / sk;
                e3 += d3 * d3;
                e5 += d5 * d5;
            }
            double deno = e5 + 0.01 * e3;
            if (deno <= 0) deno = 1.0;
            double err = Math.Abs(h) * e5 * Math.Sqrt(1.0 / (n * deno));
            bool finite = double.IsFinite(err) && AllFinite(_yNew);
            if (finite && FixedStep > 0) err = 0;

            if (finite && err <= 1.0)
            {
                CallRhs(tNew, _yNew, _k13);
                if (!AllFinite(_k13))
                {
                    finite = false;
                }
                else
                {
                    AcceptStep(t, tNew, h, err);
                    if (last) T = tEnd;
                    return;
                }
            }

            if (!finite)
            {
                // A NaN or infinity in a trial step: shrink hard a few times, then report it.
                if (++_nonFiniteRejections > 12) throw NonFinite("the state or its derivative");
                Counters.Rejected++;
                HNext = 0.1 * h;
                _lastRejected = true;
                _lastRejectNonFinite = true;
                continue;
            }

            // Rejected: shrink with the I-part only, never by more than MaxFactor.
            double fac11 = Math.Pow(err, Alpha);
            HNext = h / Math.Min(1.0 / MinFactor, fac11 / Safe);
            Counters.Rejected++;
            _lastRejected = true;
            _lastRejectNonFinite = false;
        }
    }

    private void AcceptStep(double t, double tNew, double h, double err)
    {
        int n = N;
        Counters.Accepted++;
        _nonFiniteRejections = 0;

        // Stiffness indicator h*|lambda| ~ |h| |f(y13) - f(y12)| / |y13 - y12| (both stages sit at t + h).
        double stNum = 0, stDen = 0;
        for (int i = 0; i < n; i++)
        {
            double df = _k13[i] - _k12[i];
            double dy = _yNew[i] - _y12[i];
            stNum += df * df;
            stDen += dy * dy;
        }
        StiffnessIndicator = stDen > 0 ? Math.Abs(h) * Math.Sqrt(stNum / stDen) : 0.0;

        // Stabilised PI controller.
        double fac11 = Math.Pow(Math.Max(err, 1e-300), Alpha);
        double fac = fac11 / Math.Pow(_errOld, Beta);
        fac = Math.Max(1.0 / MaxFactor, Math.Min(1.0 / MinFactor, fac / Safe));
        double hNew = h / fac;
        _errOld = Math.Max(err, 1e-4);
        if (_lastRejected) hNew = Direction * Math.Min(Math.Abs(hNew), Math.Abs(h));
        _lastRejected = false;

        if (_dense) PrepareDense(t, h);

        TOld = t;
        Array.Copy(Y, YOld, n);
        Array.Copy(_yNew, Y, n);
        Array.Copy(_k13, _k1, n);
        T = tNew;
        HLast = h;
        HNext = hNew;
    }

    private void PrepareDense(double t, double h)
    {
        int n = N;
        var y = Y;
        var c = _cont;
        for (int i = 0; i < n; i++)
        {
            double ydiff = _yNew[i] - y[i];
            double bspl = h * _k1[i] - ydiff;
            c[i] = y[i];
            c[n + i] = ydiff;
            c[2 * n + i] = bspl;
            c[3 * n + i] = ydiff - h * _k13[i] - bspl;
            c[4 * n + i] = D41 * _k1[i] + D46 * _k6[i] + D47 * _k7[i] + D48 * _k8[i] + D49 * _k9[i] + D410 * _k10[i]
                           + D411 * _k11[i] + D412 * _k12[i];
            c[5 * n + i] = D51 * _k1[i] + D56 * _k6[i] + D57 * _k7[i] + D58 * _k8[i] + D59 * _k9[i] + D510 * _k10[i]
                           + D511 * _k11[i] + D512 * _k12[i];
            c[6 * n + i] = D61 * _k1[i] + D66 * _k6[i] + D67 * _k7[i] + D68 * _k8[i] + D69 * _k9[i] + D610 * _k10[i]
                           + D611 * _k11[i] + D612 * _k12[i];
            c[7 * n + i] = D71 * _k1[i] + D76 * _k6[i] + D77 * _k7[i] + D78 * _k8[i] + D79 * _k9[i] + D710 * _k10[i]
                           + D711 * _k11[i] + D712 * _k12[i];
        }
        for (int i = 0; i < n; i++)
            _yStage[i] = y[i] + h * (A141 * _k1[i] + A147 * _k7[i] + A148 * _k8[i] + A149 * _k9[i] + A1410 * _k10[i]
                                     + A1411 * _k11[i] + A1412 * _k12[i] + A1413 * _k13[i]);
        CallRhs(t + C14 * h, _yStage, _k14);
        for (int i = 0; i < n; i++)
            _yStage[i] = y[i] + h * (A151 * _k1[i] + A156 * _k6[i] + A157 * _k7[i] + A158 * _k8[i] + A1511 * _k11[i]
                                     + A1512 * _k12[i] + A1513 * _k13[i] + A1514 * _k14[i]);
        CallRhs(t + C15 * h, _yStage, _k15);
        for (int i = 0; i < n; i++)
            _yStage[i] = y[i] + h * (A161 * _k1[i] + A166 * _k6[i] + A167 * _k7[i] + A168 * _k8[i] + A169 * _k9[i]
                                     + A1613 * _k13[i] + A1614 * _k14[i] + A1615 * _k15[i]);
        CallRhs(t + C16 * h, _yStage, _k16);
        for (int i = 0; i < n; i++)
        {
            c[4 * n + i] = h * (c[4 * n + i] + D413 * _k13[i] + D414 * _k14[i] + D415 * _k15[i] + D416 * _k16[i]);
            c[5 * n + i] = h * (c[5 * n + i] + D513 * _k13[i] + D514 * _k14[i] + D515 * _k15[i] + D516 * _k16[i]);
            c[6 * n + i] = h * (c[6 * n + i] + D613 * _k13[i] + D614 * _k14[i] + D615 * _k15[i] + D616 * _k16[i]);
            c[7 * n + i] = h * (c[7 * n + i] + D713 * _k13[i] + D714 * _k14[i] + D715 * _k15[i] + D716 * _k16[i]);
        }
    }

    public override void Interpolate(double t, Span<double> y)
    {
        if (!_dense) throw new InvalidOperationException("DOP853: dense output was not prepared for this integration.");
        DenseStore.Evaluate(DenseKind.Dop853, _cont, TOld, HLast, t, y);
    }

    public override void StoreDense(DenseStore store) =>
        _cont.CopyTo(store.Add(DenseKind.Dop853, TOld, HLast, T, 8));
}
