using System.Collections.Immutable;
using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Estimates;

/// <summary>
/// The separate-universe (delta N) computation of physics.md section 7 (Starobinsky 1985; Sasaki &amp; Stewart 1996; Lyth &amp;
/// Rodriguez 2005): N(phi^I) is the number of e-folds from a flat slice at horizon exit, where the universe has the fields
/// phi_*^I + delta phi^I, to the final slice (by default the uniform-density slice H = H_end of the unperturbed background);
/// its derivatives give P_zeta = (H_*/2 pi)^2 G^IJ N_I N_J and f_NL^local = (5/6) N^I N^J N_;IJ / (N_K N^K)^2 on
/// super-horizon scales.
/// </summary>
/// <remarks>
/// Each N is a full re-solved background (<see cref="FieldBackgroundSolver"/>). N_I and d_I d_J N are central differences
/// at steps h_I, h_I / 2 and h_I / 4 (2n^2 backgrounds per level), extrapolated twice by Richardson (the h^2 term removed
/// from each pair); each error bar is the difference of the two extrapolations (which bounds the returned one's error by a
/// factor about 15 when the h^4 term dominates) plus the worst case of the integration error delta of each N through the
/// difference formulas (6 delta / h for N_I, 272 delta / (3 h^2) and 68 delta / (3 h_I h_J) for the diagonal and mixed
/// second differences), with delta twice the change
/// of the unperturbed N at a tenfold tighter tolerance. P_zeta's and f_NL's bars propagate those to first order (plus the
/// second-order term of P_zeta). The bars assume the differences are in their asymptotic regime (N smooth over the step):
/// a background with a feature inside the step is not covered. With the default start velocity delta N agrees with the
/// mode equations up to the slow-roll corrections at exit, of relative order epsilon_1 (physics.md section 7).
/// </remarks>
public static class DeltaN
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>
    /// delta N at horizon exit <paramref name="exitN"/> (e-folds since the start of <paramref name="background"/>), re-solving
    /// backgrounds with <paramref name="settings"/> (the run's background settings: end surface, end crossing, methods).
    /// Throws <see cref="PhysicsException"/> when a separate universe cannot be solved or never reaches the final slice.
    /// </summary>
    public static DeltaNResult Compute(FieldBackgroundSolution background, BackgroundSettings settings, double exitN, DeltaNSettings? options = null)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        options ??= new DeltaNSettings();
        options.Validate();
        var theory = background.Theory;
        int n = theory.FieldCount;
        if (!(exitN >= background.NStart && exitN < background.NEnd))
            throw new PhysicsException(string.Create(Inv,
                $"The delta N exit time N = {exitN:0.###} lies outside inflation (N = {background.NStart:0.###} .. {background.NEnd:0.###}); choose an exit before the end."));

        var phi = new double[n];
        var p = new double[n];
        var exit = background.At(exitN, phi, p);
        double sliceH = double.NaN;
        if (options.Slice == DeltaNSlice.UniformDensity)
        {
            double ns = background.NEnd + options.SliceOffset;
            if (!(ns > exitN && ns <= background.NStop))
                throw new PhysicsException(string.Create(Inv,
                    $"The delta N slice at N = {ns:0.###} (end of inflation {background.NEnd:0.###} + offset {options.SliceOffset:0.###}) is not between the exit N = {exitN:0.###} and the last computed N = {background.NStop:0.###}; choose an offset inside that range."));
            sliceH = background.At(ns, new double[n], new double[n]).H;
        }

        var metric = new double[n * n];
        theory.Metric(phi, metric);
        double speed = Math.Sqrt(2 * exit.Epsilon1);
        if (!(speed > 0))
            throw new PhysicsException(string.Create(Inv, $"epsilon_1 = {exit.Epsilon1:G3} at the delta N exit N = {exitN:0.###}: the fields do not move, so the step cannot be set; choose an exit where they roll."));
        var steps = new double[n];
        for (int i = 0; i < n; i++) steps[i] = options.Step * speed / Math.Sqrt(metric[i * n + i]);

        var universe = new Universe(theory, settings, options, sliceH, phi, p, exitN);
        var zero = new double[n];
        double f0 = universe.Efolds(zero, options.Tolerance);
        double f0Tight = universe.Efolds(zero, options.Tolerance / 10);
        double delta = 2 * Math.Abs(f0 - f0Tight) + 1e-15 * Math.Abs(f0);

        var grad = new double[Levels][];
        var hess = new double[Levels][];
        for (int level = 0; level < Levels; level++)
        {
            double scale = Math.ScaleB(1.0, -level);
            grad[level] = new double[n];
            hess[level] = new double[n * n];
            var plus = new double[n];
            var minus = new double[n];
            var d = new double[n];
            for (int i = 0; i < n; i++)
            {
                double h = steps[i] * scale;
                Array.Clear(d);
                d[i] = h;
                plus[i] = universe.Efolds(d, options.Tolerance);
                d[i] = -h;
                minus[i] = universe.Efolds(d, options.Tolerance);
                grad[level][i] = (plus[i] - minus[i]) / (2 * h);
                hess[level][i * n + i] = (plus[i] - 2 * f0 + minus[i]) / (h * h);
            }
            for (int i = 0; i < n; i++)
                for (int j = i + 1; j < n; j++)
                {
                    double hi = steps[i] * scale, hj = steps[j] * scale;
                    double s = 0;
                    for (int corner = 0; corner < 4; corner++)
                    {
                        double si = (corner & 1) == 0 ? 1 : -1, sj = (corner & 2) == 0 ? 1 : -1;
                        Array.Clear(d);
                        d[i] = si * hi;
                        d[j] = sj * hj;
                        s += si * sj * universe.Efolds(d, options.Tolerance);
                    }
                    hess[level][i * n + j] = hess[level][j * n + i] = s / (4 * hi * hj);
                }
        }

        var ni = new double[n];
        var niErr = new double[n];
        var nij = new double[n * n];
        var nijErr = new double[n * n];
        for (int i = 0; i < n; i++)
        {
            (ni[i], niErr[i]) = Extrapolate(grad[0][i], grad[1][i], grad[2][i]);
            niErr[i] += 6 * delta / steps[i];
            for (int j = 0; j < n; j++)
            {
                int k = i * n + j;
                (nij[k], nijErr[k]) = Extrapolate(hess[0][k], hess[1][k], hess[2][k]);
                nijErr[k] += i == j ? 272.0 / 3 * delta / (steps[i] * steps[i]) : 68.0 / 3 * delta / (steps[i] * steps[j]);
            }
        }

        // Covariant second derivative N_;IJ = d_I d_J N - Gamma^K_IJ N_K, its bar with the Gamma N_K part.
        var covariant = (double[])nij.Clone();
        var covErr = (double[])nijErr.Clone();
        if (!theory.IsCanonical)
        {
            var gamma = new double[n * n * n];
            theory.Christoffel(phi, gamma);
            for (int i = 0; i < n; i++)
                for (int j = 0; j < n; j++)
                    for (int k = 0; k < n; k++)
                    {
                        double g = gamma[(k * n + i) * n + j];
                        covariant[i * n + j] -= g * ni[k];
                        covErr[i * n + j] += Math.Abs(g) * niErr[k];
                    }
        }

        var inverse = new double[n * n];
        if (!theory.InverseMetric(phi, inverse))
            throw new PhysicsException($"The field-space metric is not positive definite at the delta N exit, {BackgroundRun.DescribeFields(theory, phi)}.");
        var (pz, pzErr, fnl, fnlErr) = Observables(exit.H, inverse, ni, niErr, covariant, covErr, n);
        return new DeltaNResult(exitN, exit.H, exit.Epsilon1, f0, ni.ToImmutableArray(), niErr.ToImmutableArray(),
            nij.ToImmutableArray(), covariant.ToImmutableArray(), covErr.ToImmutableArray(), pz, pzErr, fnl, fnlErr, delta, sliceH,
            steps.ToImmutableArray(), options.Velocity, options.Slice, universe.Solved);
    }

    /// <summary>Step halvings of the finite differences: h, h/2, h/4.</summary>
    private const int Levels = 3;

    /// <summary>
    /// The Richardson table of central differences D(h), D(h/2), D(h/4) (error c h^2 + d h^4 + ...): R1 = (4 D(h/2) - D(h))/3
    /// and R2 = (4 D(h/4) - D(h/2))/3 remove the h^2 term; R2 is returned with |R2 - R1| as its bar (asymptotically
    /// 15/64 d h^4 against R2's own d h^4/64).
    /// </summary>
    private static (double Value, double Error) Extrapolate(double d0, double d1, double d2)
    {
        double r1 = (4 * d1 - d0) / 3, r2 = (4 * d2 - d1) / 3;
        return (r2, Math.Abs(r2 - r1));
    }

    /// <summary>
    /// P_zeta = (H/2 pi)^2 G^IJ N_I N_J and f_NL = (5/6) N^I N^J N_;IJ / (N_K N^K)^2 with first-order error propagation
    /// (P_zeta also with its second-order term).
    /// </summary>
    internal static (double Pzeta, double PzetaError, double FNL, double FNLError) Observables(double h, ReadOnlySpan<double> inverse,
        ReadOnlySpan<double> ni, ReadOnlySpan<double> niErr, ReadOnlySpan<double> nij, ReadOnlySpan<double> nijErr, int n)
    {
        var up = new double[n];
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++) up[i] += inverse[i * n + j] * ni[j];
        double b = 0, a = 0;
        var contracted = new double[n]; // N_;IJ N^J
        for (int i = 0; i < n; i++)
        {
            b += up[i] * ni[i];
            for (int j = 0; j < n; j++) contracted[i] += nij[i * n + j] * up[j];
            a += up[i] * contracted[i];
        }
        double amp = h * h / (4 * Math.PI * Math.PI);
        double pz = amp * b;
        double pzErr = 0, fErr = 0;
        for (int i = 0; i < n; i++)
        {
            pzErr += 2 * Math.Abs(up[i]) * niErr[i];
            for (int j = 0; j < n; j++) pzErr += Math.Abs(inverse[i * n + j]) * niErr[i] * niErr[j];
        }
        pzErr *= amp;
        double fnl = 5.0 / 6 * a / (b * b);
        for (int k = 0; k < n; k++)
        {
            double raised = 0;
            for (int i = 0; i < n; i++) raised += inverse[k * n + i] * contracted[i];
            double dfdn = 5.0 / 6 * (2 * raised / (b * b) - 4 * a * up[k] / (b * b * b));
            fErr += Math.Abs(dfdn) * niErr[k];
            for (int j = 0; j < n; j++) fErr += 5.0 / 6 * Math.Abs(up[k] * up[j]) / (b * b) * nijErr[k * n + j];
        }
        return (pz, pzErr, fnl, fErr);
    }

    /// <summary>The separate universes of one computation: a displaced start, its velocity, its background and its e-fold count.</summary>
    private sealed class Universe
    {
        private readonly IFieldTheory _theory;
        private readonly BackgroundSettings _settings;
        private readonly DeltaNSettings _options;
        private readonly double _sliceH, _exitN;
        private readonly double[] _phi, _velocity, _correction;
        private readonly double[]? _christoffel;
        private readonly double[] _metric, _lower, _gradient;

        public Universe(IFieldTheory theory, BackgroundSettings settings, DeltaNSettings options, double sliceH,
            double[] phi, double[] velocity, double exitN)
        {
            _theory = theory;
            int n = theory.FieldCount;
            _settings = settings with
            {
                Phi0 = double.NaN,
                DPhi0 = null,
                // Continue past the end only as far as a slice after it needs: a displaced universe ends at most a few steps
                // (in e-folds) earlier than the unperturbed one.
                EFoldsAfterEnd = options.Slice == DeltaNSlice.UniformDensity ? Math.Max(0, options.SliceOffset + 3 * options.Step + 0.2) : 0,
            };
            _options = options;
            _sliceH = sliceH;
            _exitN = exitN;
            _phi = phi;
            _velocity = velocity;
            _metric = new double[n * n];
            _lower = new double[n * n];
            _gradient = new double[n];
            _correction = new double[n];
            SlowRollVelocity(phi, _correction);
            for (int i = 0; i < n; i++) _correction[i] = velocity[i] - _correction[i];
            if (!theory.IsCanonical)
            {
                _christoffel = new double[n * n * n];
                theory.Christoffel(phi, _christoffel);
            }
        }

        public int Solved { get; private set; }

        /// <summary>N from the exit slice with the fields displaced by <paramref name="displacement"/> to the final slice.</summary>
        public double Efolds(double[] displacement, double tolerance)
        {
            int n = _phi.Length;
            var start = new double[n];
            var velocity = new double[n];
            for (int i = 0; i < n; i++) start[i] = _phi[i] + displacement[i];
            switch (_options.Velocity)
            {
                case ExitVelocity.Background:
                    _velocity.CopyTo(velocity, 0);
                    break;
                case ExitVelocity.SlowRoll:
                    SlowRollVelocity(start, velocity);
                    break;
                default:
                    // The slow-roll field plus the exit correction c = phi'_bg - phi'_SR, parallel-transported to the
                    // displaced start to first order (c^I - Gamma^I_JK c^J delta^K), so the choice is the same in every chart.
                    SlowRollVelocity(start, velocity);
                    for (int i = 0; i < n; i++)
                    {
                        double transported = _correction[i];
                        if (_christoffel is not null)
                            for (int j = 0; j < n; j++)
                                for (int k = 0; k < n; k++) transported -= _christoffel[(i * n + j) * n + k] * _correction[j] * displacement[k];
                        velocity[i] += transported;
                    }
                    break;
            }
            FieldBackgroundSolution bg;
            try
            {
                bg = FieldBackgroundSolver.Solve(_theory, _settings with { Fields0 = start, Velocity0 = velocity, Tolerance = tolerance });
            }
            catch (PhysicsException ex)
            {
                throw new PhysicsException($"delta N: the separate universe started at {BackgroundRun.DescribeFields(_theory, start)} (exit N = {_exitN.ToString("0.###", Inv)}) could not be solved: {ex.Message}", ex);
            }
            Solved++;
            if (_options.Slice == DeltaNSlice.EndOfInflation) return bg.NEnd - bg.NStart;
            return SliceTime(bg, start);
        }

        /// <summary>The N where H falls through the slice's H (H decreases monotonically: dH/dN = -epsilon_1 H).</summary>
        private double SliceTime(FieldBackgroundSolution bg, double[] start)
        {
            int n = _phi.Length;
            var phi = new double[n];
            var dphi = new double[n];
            double LogRatio(double t) => Math.Log(bg.At(t, phi, dphi).H / _sliceH);
            double guess = Math.Clamp(bg.NEnd + _options.SliceOffset, bg.NStart, bg.NStop);
            double lo = Math.Max(bg.NStart, guess - 0.5), hi = Math.Min(bg.NStop, guess + 0.5);
            double flo = LogRatio(lo), fhi = LogRatio(hi);
            while (flo < 0 && lo > bg.NStart)
            {
                lo = Math.Max(bg.NStart, lo - 2 * (guess - lo + 0.5));
                flo = LogRatio(lo);
            }
            while (fhi > 0 && hi < bg.NStop)
            {
                hi = Math.Min(bg.NStop, hi + 2 * (hi - guess + 0.5));
                fhi = LogRatio(hi);
            }
            if (fhi > 0)
                throw new PhysicsException(string.Create(Inv,
                    $"delta N: the separate universe started at {BackgroundRun.DescribeFields(_theory, start)} stops at N = {bg.NStop:0.###} with H above the slice's H = {_sliceH:G6}; count to an earlier slice (a negative slice offset), take a smaller step, or count to each universe's end of inflation."));
            if (flo < 0)
                throw new PhysicsException(string.Create(Inv,
                    $"delta N: the separate universe started at {BackgroundRun.DescribeFields(_theory, start)} starts below the slice's H = {_sliceH:G6}; take the exit earlier."));
            if (flo == 0) return lo - bg.NStart;
            if (fhi == 0) return hi - bg.NStart;
            return Numerics.Roots.Brent(LogRatio, lo, hi, flo, fhi, 1e-15 * Math.Max(1.0, hi)) - bg.NStart;
        }

        /// <summary>-G^IJ V_J / V at <paramref name="at"/>.</summary>
        private void SlowRollVelocity(double[] at, double[] velocity)
        {
            int n = at.Length;
            double v = _theory.PotentialGradient(at, _gradient);
            _theory.Metric(at, _metric);
            if (!FieldGeometry.Cholesky(_metric, n, _lower))
                throw new PhysicsException($"delta N: the field-space metric is not positive definite at {BackgroundRun.DescribeFields(_theory, at)}; take a smaller step.");
            FieldGeometry.CholeskySolve(_lower, n, _gradient, velocity);
            for (int i = 0; i < n; i++) velocity[i] = -velocity[i] / v;
        }
    }
}
