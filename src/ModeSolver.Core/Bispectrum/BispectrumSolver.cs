using ModeSolver.Background;
using ModeSolver.Physics;

namespace ModeSolver.Bispectrum;

/// <summary>
/// The tree-level scalar bispectrum of a single-field background by numerical in-in integration (<see cref="CubicVertices"/>,
/// <see cref="InInIntegral"/>) over shared mode histories (<see cref="ModeHistoryBuilder"/>: one integration per distinct k,
/// reused by every triangle with that side). Theories with a kinetic function K(phi) enter only through the background
/// (the Hubble-flow parameters and z = a sqrt(2 e1)): their cubic action in zeta is the canonical one.
/// Convention: zeta is the comoving curvature perturbation with spatial metric a^2 e^(2 zeta) delta_ij;
/// &lt;zeta zeta zeta&gt; = (2 pi)^3 delta(k1 + k2 + k3) B and f_NL = (5/6) B / (P1 P2 + P2 P3 + P3 P1), P = 2 pi^2 P_s / k^3
/// (physics.md 8), so that the squeezed limit is +(5/12)(1 - n_s).
/// </summary>
public sealed class BispectrumSolver
{
    private readonly IBackground _bg;
    private readonly BispectrumSettings _settings;

    /// <summary>A solver on <paramref name="background"/> (k in its units: k/aH = k e^-N / H).</summary>
    public BispectrumSolver(IBackground background, BispectrumSettings? settings = null)
    {
        ArgumentNullException.ThrowIfNull(background);
        _bg = background;
        _settings = settings ?? new BispectrumSettings();
        _settings.Validate();
    }

    /// <summary>The settings in use.</summary>
    public BispectrumSettings Settings => _settings;

    /// <summary>
    /// f_NL of every triangle with its error estimate, on up to <paramref name="threads"/> threads. Throws
    /// <see cref="PhysicsException"/> when a triangle cannot be integrated on this background (a side not deep enough
    /// inside the horizon at its start).
    /// </summary>
    public BispectrumPoint[] Solve(IReadOnlyList<Triangle> triangles, int threads = 1)
    {
        ArgumentNullException.ThrowIfNull(triangles);
        if (triangles.Count == 0) return [];
        var plans = new TrianglePlan[triangles.Count];
        for (int i = 0; i < plans.Length; i++) plans[i] = Plan(triangles[i]);
        var main = Pass(triangles, plans, _settings.Tolerance, threads, out int work);
        PassResult[]? fine = null;
        int fineWork = 0;
        if (_settings.EstimateTolerance) fine = Pass(triangles, plans, 0.1 * _settings.Tolerance, threads, out fineWork);
        var result = new BispectrumPoint[triangles.Count];
        for (int i = 0; i < result.Length; i++)
        {
            var m = main[i];
            var best = fine is null ? m : fine[i];
            double tolErr = fine is null ? double.NaN : Math.Abs(fine[i].Value - m.Value);
            double err = best.Early + best.Start + best.End + best.Quadrature + (double.IsNaN(tolErr) ? 0 : tolErr);
            result[i] = new BispectrumPoint(triangles[i], best.Value, err)
            {
                EarlyTimeError = best.Early, StartError = best.Start, EndError = best.End, QuadratureError = best.Quadrature, ToleranceError = tolErr,
                StartDepth = _settings.StartDepth, EndDepth = plans[i].EndDepth, EndCapped = plans[i].Capped,
                RhsEvaluations = work + fineWork, IntegrandEvaluations = 10 * (m.Panels + (fine is null ? 0 : fine[i].Panels)),
            };
        }
        return result;
    }

    /// <summary>f_NL of one triangle.</summary>
    public BispectrumPoint Solve(in Triangle triangle) => Solve([triangle])[0];

    private PassResult[] Pass(IReadOnlyList<Triangle> triangles, TrianglePlan[] plans, double tol, int threads, out int work)
    {
        // Distinct sides, with the depth and the end each needs.
        var index = new Dictionary<double, int>();
        var ks = new List<double>();
        var depth = new List<double>();
        var ends = new List<double>();
        for (int i = 0; i < triangles.Count; i++)
        {
            var t = triangles[i];
            for (int s = 0; s < 3; s++)
            {
                double k = t.Side(s);
                double need = Math.Max(20.0, 1.1 * 2.0 * _settings.StartDepth * k / t.Perimeter); // the stencil of EarlyTimes reaches 0.04 e-folds before
                if (!index.TryGetValue(k, out int j))
                {
                    j = ks.Count;
                    index[k] = j;
                    ks.Add(k);
                    depth.Add(need);
                    ends.Add(plans[i].NEnd);
                }
                else
                {
                    depth[j] = Math.Max(depth[j], need);
                    ends[j] = Math.Max(ends[j], plans[i].NEnd);
                }
            }
        }
        var histories = new ModeHistory[ks.Count];
        var options = new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, threads) };
        Parallel.For(0, ks.Count, options, () => new ModeHistoryBuilder(),
            (j, _, builder) => { histories[j] = builder.Build(_bg, ks[j], depth[j], ends[j], tol); return builder; }, _ => { });
        work = 0;
        for (int j = 0; j < histories.Length; j++) work += histories[j].RhsEvaluations;
        var results = new PassResult[triangles.Count];
        Parallel.For(0, triangles.Count, options, i =>
        {
            var t = triangles[i];
            var p = plans[i];
            var sums = InInIntegral.Integrate(_bg, t, histories[index[t.K1]], histories[index[t.K2]], histories[index[t.K3]],
                p.NDeep, p.NStart, p.NEarly, p.NEnd, _settings);
            results[i] = PassResult.From(sums);
        });
        return results;
    }

    private TrianglePlan Plan(in Triangle t)
    {
        double xs = _settings.StartDepth;
        double kTot = t.Perimeter, kMax = t.Largest;
        double xFirst = kTot * Math.Exp(-_bg.NStart) / _bg.At(_bg.NStart).H;
        if (!(xFirst >= 2.0 * xs * 1.1))
            throw new PhysicsException($"bispectrum: triangle ({t.K1:G6}, {t.K2:G6}, {t.K3:G6}) is only at K/aH = {xFirst:G4} at the start of the background (N = {_bg.NStart:G8}); the in-in integral starts at K/aH = {2 * xs:G4}: start the field further up the potential or choose larger k");
        double nDeep = HorizonExit.Find(_bg, kTot / (2.0 * xs));
        double nStart = HorizonExit.Find(_bg, kTot / xs);
        double xAtEnd = kMax * Math.Exp(-_bg.NEnd) / _bg.At(_bg.NEnd).H;
        double xe = _settings.EndDepth;
        bool capped = xAtEnd > xe;
        if (xAtEnd > 0.1)
            throw new PhysicsException($"bispectrum: the side k = {kMax:G6} is still at k/aH = {xAtEnd:G3} at the end of inflation (N = {_bg.NEnd:G8}); it must have left the horizon (k/aH <= 0.1): choose smaller k");
        if (capped) xe = xAtEnd;
        double nEnd = capped ? _bg.NEnd : HorizonExit.Find(_bg, kMax / xe);
        double nEarly = HorizonExit.Find(_bg, kMax / (10.0 * xe));
        return new TrianglePlan(nDeep, nStart, nEarly, nEnd, xe, capped);
    }

    private readonly record struct TrianglePlan(double NDeep, double NStart, double NEarly, double NEnd, double EndDepth, bool Capped);

    /// <summary>One pass (one tolerance): the value and its convergence terms.</summary>
    private readonly record struct PassResult(double Value, double Early, double Start, double End, double Quadrature, int Panels)
    {
        public static PassResult From(in InInSums s)
        {
            double v = s.FNL(false, false);
            // The late-time terms (the gradient terms of the field redefinition left out, the tail of the integral) fall off at
            // least as k/aH after exit (as (k/aH)^2 in slow roll): the end at 10x the end depth overstates them by 10x or more.
            return new PassResult(v, s.AsFNL(s.TailTerm), Math.Abs(s.FNL(true, false) - v), 0.1 * Math.Abs(s.FNL(false, true) - v),
                s.AsFNL(s.QuadratureError), s.Panels);
        }
    }
}

/// <summary>f_NL of one triangle and its error estimate.</summary>
/// <param name="Triangle">The triangle (background units).</param>
/// <param name="FNL">f_NL = (5/6) B / (P1 P2 + P2 P3 + P3 P1), at the finer tolerance.</param>
/// <param name="Error">
/// Estimated absolute error of <paramref name="FNL"/>: the sum of the early-time, start, end, quadrature and tolerance terms below.
/// </param>
public sealed record BispectrumPoint(Triangle Triangle, double FNL, double Error)
{
    /// <summary>The last (fourth) term of the analytic early-time limit at the start, as an error of f_NL.</summary>
    public double EarlyTimeError { get; init; }
    /// <summary>|f_NL with the integral started twice as deep - f_NL|.</summary>
    public double StartError { get; init; }
    /// <summary>|f_NL ended at ten times the end depth - f_NL| / 10 (the late-time terms fall off at least as k/aH).</summary>
    public double EndError { get; init; }
    /// <summary>The disagreement of the adaptive Gauss-Legendre panels with their halves, left at the accepted level.</summary>
    public double QuadratureError { get; init; }
    /// <summary>|f_NL at the tolerance - f_NL at a tenth of it| (NaN when not estimated).</summary>
    public double ToleranceError { get; init; }
    /// <summary>K/aH at the start of the integral.</summary>
    public double StartDepth { get; init; }
    /// <summary>k_max/aH at the end of the integral.</summary>
    public double EndDepth { get; init; }
    /// <summary>True when the end of inflation came before k_max/aH reached the end depth.</summary>
    public bool EndCapped { get; init; }
    /// <summary>Evaluations of the in-in integrand of this triangle (both tolerance passes).</summary>
    public int IntegrandEvaluations { get; init; }
    /// <summary>Right-hand sides of the mode histories of the whole call (shared by its triangles).</summary>
    public int RhsEvaluations { get; init; }
}
