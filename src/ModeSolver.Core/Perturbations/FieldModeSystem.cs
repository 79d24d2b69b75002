using System.Numerics;
using ModeSolver.Background;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// The n coupled covariant field perturbations Q^I of an n-field theory in spatially flat gauge (physics.md 7; Sasaki
/// &amp; Stewart 1996, Prog. Theor. Phys. 95, 71; Langlois &amp; Renaux-Petel 2008, JCAP 04, 017), in e-folds:
///   D_N D_N Q^I + (3 - e1) D_N Q^I + x^2 Q^I + (M^I_J / H^2) Q^J = 0,
///   M^I_J / H^2 = (3 - e1) G^IK (nabla_K nabla_J V)/V - R^I_KLJ phi'^K phi'^L
///                 - [(3 - e1) phi'^I phi'_J + (D_N phi'^I) phi'_J + phi'^I (D_N phi'_J)],
/// with D_N Q^I = Q'^I + Gamma^I_JK phi'^J Q^K, for n independent Bunch-Davies realisations alpha = 1..n.
/// Carried state (4 n^2 doubles): for each realisation alpha the coordinate components Q^I_alpha (complex) and their
/// covariant velocities P^I_alpha = D_N Q^I_alpha (complex), at [(alpha n + I) 2 + re/im] and 2 n^2 after that. As a
/// first-order system: Q' = P - Gamma phi' Q, P' = -Gamma phi' P - (3 - e1) P - x^2 Q - (M/H^2) Q. Like the single-field
/// systems the block is the physical one relative to the amplitude reference times a scale chosen at the start
/// (k/aH over |Q| there), so |Q| is of order one after horizon exit whatever k and H are.
/// Initial data (physics.md 7): Q^I_alpha = e^I_alpha u_alpha/a with e_alpha the orthonormal kinematic frame at the
/// start (e_sigma along phi', the others orthonormalised in G) and u_alpha the local-index Bunch-Davies form of that
/// direction (<see cref="Vacuum"/>); D_N Q includes the turning of the frame.
/// Curvature and isocurvature (physics.md 7): R = phi'_I Q^I/(2 e1); the isocurvature is the part of Q normal to
/// phi', S = e_sI Q^I/sqrt(2 e1) for n = 2 with (e_sigma, e_s) positively oriented in the field coordinates; for n &gt; 2
/// P_S is the power of the whole normal part and C_RS is not defined (NaN).
/// The block carries no k-derivatives: n_s and alpha_s come from finite differences of ln P in ln k
/// (<see cref="FieldModeIntegrator"/>). A per-mode workspace bound to one n-field background (any of its rescaled
/// views); the right-hand side is allocation-free.
/// </summary>
internal sealed class FieldModeSystem : IModeSystem
{
    /// <summary>Block name.</summary>
    public const string BlockName = "fields";

    private readonly AdiabaticBackground _bg;
    private readonly int _n;
    private readonly FieldPoint _w;
    private readonly double[] _mass, _turn, _pLow, _aLow, _frame, _sLow;
    private readonly CurvatureModeSystem _zeta = new();
    private readonly MassiveFieldData _massive = new();
    private readonly double[] _frameRate;
    private readonly bool _curved;
    private double _scale = 1, _e1, _e2;

    /// <summary>A workspace for the modes of <paramref name="background"/>.</summary>
    public FieldModeSystem(AdiabaticBackground background)
    {
        _bg = background;
        _n = background.Fields.FieldCount;
        int n = _n;
        _w = new FieldPoint(n);
        _mass = new double[n * n];
        _turn = new double[n * n];
        _pLow = new double[n];
        _aLow = new double[n];
        _sLow = new double[n];
        _frame = new double[n * n];
        _frameRate = new double[n * n];
        _curved = !background.Fields.Theory.IsCanonical;
    }

    /// <inheritdoc />
    public string Name => BlockName;

    /// <summary>Number of fields (and of realisations).</summary>
    public int FieldCount => _n;

    /// <inheritdoc />
    public int StateSize(bool derivatives) => derivatives
        ? throw new InvalidOperationException("the n-field system carries no k-derivative blocks: its n_s and alpha_s are finite differences in ln k")
        : 4 * _n * _n;

    /// <summary>No: the driver's super-horizon growth scan is the single-field zeta friction; the n-field R is tested by <see cref="TryFreeze"/>.</summary>
    public bool GrowsOutsideHorizon => false;

    /// <inheritdoc />
    public double AmplitudeSquared(ReadOnlySpan<double> block) => Curvature(block, out _, out _);

    /// <inheritdoc />
    public void Tolerances(Span<double> atol, double value, double derivative)
    {
        int half = 2 * _n * _n;
        atol[..half].Fill(value);
        atol[half..].Fill(derivative);
    }

    /// <summary>The index of a massless field (z = a), that of the tensor mode.</summary>
    public double LocalIndex(in BackgroundPoint p) => TensorModeSystem.IndexOf(p.Epsilon1);

    /// <summary>Six complex entries (value, N-derivative and two ln k orders) per frame direction.</summary>
    public int VacuumWidth => 6 * _n;

    /// <summary>
    /// The Bunch-Davies data per direction of the kinematic frame at the point: along e_sigma = phi'/|phi'| the
    /// single-field curvature data (Q_sigma = sqrt(2 e1) zeta, the exact local index of zeta), along each other
    /// direction e_a (Gram-Schmidt in G) the data of a field with z = a and mass e_a.M.e_a H^2 (local index from
    /// 2 - e1 - m_a^2/H^2; a heavy direction takes index 0, its amplitude then starts off by about (m/H)^2/(k/aH)^2
    /// and decays). The couplings between the directions (turn rate, off-diagonal masses) are left out of the data.
    /// </summary>
    public void Vacuum(in VacuumPoint v, Span<Complex> data)
    {
        Prepare(v.Background.N);
        KinematicFrame();
        _zeta.Vacuum(v, data[..6]);
        int f = _n;
        for (int a = 1; a < f; a++)
        {
            _massive.Mass2 = FrameMass(a);
            _massive.Vacuum(v, data.Slice(6 * a, 6));
        }
    }

    /// <summary>
    /// The kinematic frame at the prepared point into <see cref="_frame"/> (column a = e_a): e_0 = e_sigma, then the
    /// coordinate directions orthonormalised against it in G (dropping any that are dependent), and D_N e_a into
    /// <see cref="_frameRate"/>: D_N e_sigma = (D_N phi' - (e2/2) phi')/|phi'|, D_N e_a = -G(e_a, D_N e_sigma) e_sigma
    /// (a frame transported so that only e_sigma turns).
    /// </summary>
    private void KinematicFrame()
    {
        int f = _n;
        var w = _w;
        double speed = Math.Sqrt(2.0 * _e1);
        Span<double> u = stackalloc double[f];
        Span<double> v = stackalloc double[f];
        for (int i = 0; i < f; i++) _frame[i * f] = w.DPhi[i] / speed;
        int col = 1;
        for (int c = 0; c < f && col < f; c++)
        {
            u.Clear();
            u[c] = 1.0;
            for (int b = 0; b < col; b++)
            {
                for (int i = 0; i < f; i++) v[i] = _frame[i * f + b];
                double d = w.Dot(u, v);
                for (int i = 0; i < f; i++) u[i] -= d * v[i];
            }
            double norm = Math.Sqrt(Math.Max(w.Dot(u, u), 0.0));
            if (!(norm > 1e-6)) continue;
            for (int i = 0; i < f; i++) _frame[i * f + col] = u[i] / norm;
            col++;
        }
        for (int i = 0; i < f; i++) _frameRate[i * f] = (w.Acceleration[i] - 0.5 * _e2 * w.DPhi[i]) / speed;
        for (int i = 0; i < f; i++) u[i] = _frameRate[i * f];
        for (int a = 1; a < f; a++)
        {
            for (int i = 0; i < f; i++) v[i] = _frame[i * f + a];
            double g = w.Dot(v, u);
            for (int i = 0; i < f; i++) _frameRate[i * f + a] = -g * _frame[i * f];
        }
    }

    /// <summary>m_a^2/H^2 = G_IK e_a^I M^K_J e_a^J of frame direction a.</summary>
    private double FrameMass(int a)
    {
        int f = _n;
        double m = 0;
        for (int i = 0; i < f; i++)
            for (int k = 0; k < f; k++)
            {
                double g = _w.Metric[i * f + k] * _frame[i * f + a];
                if (g == 0) continue;
                for (int j = 0; j < f; j++) m += g * _mass[k * f + j] * _frame[j * f + a];
            }
        return m;
    }

    /// <inheritdoc />
    public void Start(BunchDaviesData data, int slot, in BackgroundPoint p0, double x0, Span<double> block)
    {
        int n = _n;
        Prepare(p0.N);
        KinematicFrame();
        var d = data.Point.Data;
        int o0 = data.SlotOffset(slot);
        double sq = Math.Sqrt(2.0 * _e1);
        // Realisation a: Q = e_a q_a, D_N Q = e_a q_a' + q_a D_N e_a; along e_sigma q = sqrt(2 e1) zeta.
        Complex z = d[o0], dz = d[o0 + 1];
        double scale = x0 / (sq * z.Magnitude);
        int half = 2 * n * n;
        for (int a = 0; a < n; a++)
        {
            Complex q = a == 0 ? sq * z : d[o0 + 6 * a];
            Complex dq = a == 0 ? sq * (dz + 0.5 * _e2 * z) : d[o0 + 6 * a + 1];
            q *= scale;
            dq *= scale;
            for (int i = 0; i < n; i++)
            {
                double e = _frame[i * n + a], r = _frameRate[i * n + a];
                int o = 2 * (a * n + i);
                block[o] = e * q.Real;
                block[o + 1] = e * q.Imaginary;
                block[half + o] = e * dq.Real + r * q.Real;
                block[half + o + 1] = e * dq.Imaginary + r * q.Imaginary;
            }
        }
        _scale = scale;
    }

    /// <summary>
    /// Evaluates the field-space quantities at N and forms the mass matrix M^I_J/H^2 and the turn matrix
    /// Gamma^I_JK phi'^J (both n x n), phi'_I and (D_N phi')_I.
    /// </summary>
    private void Prepare(double n)
    {
        int f = _n;
        _bg.Evaluate(n, _w, _curved);
        var w = _w;
        var p = w.DPhi;
        var acc = w.Acceleration;
        double e1 = w.Epsilon1, c = 3.0 - e1;
        _e1 = e1;
        _e2 = w.Epsilon2;
        for (int i = 0; i < f; i++)
        {
            double pl = 0, al = 0;
            for (int j = 0; j < f; j++) { pl += w.Metric[i * f + j] * p[j]; al += w.Metric[i * f + j] * acc[j]; }
            _pLow[i] = pl;
            _aLow[i] = al;
        }
        double invV = 1.0 / w.V;
        for (int i = 0; i < f; i++)
            for (int j = 0; j < f; j++)
            {
                double hess = 0;
                for (int k = 0; k < f; k++) hess += w.Inverse[i * f + k] * w.Hessian[k * f + j];
                double m = c * hess * invV - (c * p[i] * _pLow[j] + acc[i] * _pLow[j] + p[i] * _aLow[j]);
                if (_curved)
                {
                    double r = 0;
                    for (int k = 0; k < f; k++)
                        for (int l = 0; l < f; l++) r += w.Riemann[((i * f + k) * f + l) * f + j] * p[k] * p[l];
                    m -= r;
                    double t = 0;
                    for (int k = 0; k < f; k++) t += w.Christoffel[(i * f + k) * f + j] * p[k];
                    _turn[i * f + j] = t;
                }
                _mass[i * f + j] = m;
            }
    }

    /// <inheritdoc />
    public void Rhs(in BackgroundPoint p, double x2, ReadOnlySpan<double> y, Span<double> dy)
    {
        Prepare(p.N);
        int f = _n, half = 2 * f * f;
        double c = 3.0 - _e1;
        for (int a = 0; a < f; a++)
        {
            int ro = 2 * a * f;
            for (int i = 0; i < f; i++)
            {
                double qr = y[ro + 2 * i], qi = y[ro + 2 * i + 1];
                double pr = y[half + ro + 2 * i], pi = y[half + ro + 2 * i + 1];
                double dqr = pr, dqi = pi;
                double dpr = -c * pr - x2 * qr, dpi = -c * pi - x2 * qi;
                for (int j = 0; j < f; j++)
                {
                    double m = _mass[i * f + j];
                    double qjr = y[ro + 2 * j], qji = y[ro + 2 * j + 1];
                    dpr -= m * qjr;
                    dpi -= m * qji;
                    if (_curved)
                    {
                        double t = _turn[i * f + j];
                        dqr -= t * qjr;
                        dqi -= t * qji;
                        dpr -= t * y[half + ro + 2 * j];
                        dpi -= t * y[half + ro + 2 * j + 1];
                    }
                }
                dy[ro + 2 * i] = dqr;
                dy[ro + 2 * i + 1] = dqi;
                dy[half + ro + 2 * i] = dpr;
                dy[half + ro + 2 * i + 1] = dpi;
            }
        }
    }

    /// <summary>
    /// No jumps are applied: where V has a kink its covariant Hessian carries a delta function, which this system does
    /// not model; <see cref="FieldModeIntegrator"/> refuses backgrounds with non-smooth points.
    /// </summary>
    public void Kink(in BackgroundPoint before, in BackgroundPoint after, double x2, Span<double> block) { }

    /// <summary>Sum over realisations of |R_alpha|^2 (carried units) at the last prepared point; R'-sum and S-sum out.</summary>
    private double Curvature(ReadOnlySpan<double> block, out double dr2, out double s2)
    {
        int f = _n, half = 2 * f * f;
        double r2 = 0;
        dr2 = 0;
        s2 = 0;
        double inv = 1.0 / (2.0 * _e1);
        for (int a = 0; a < f; a++)
        {
            int ro = 2 * a * f;
            double rr = 0, ri = 0, ar = 0, ai = 0, pr = 0, pi = 0, qq = 0;
            for (int i = 0; i < f; i++)
            {
                double qr = block[ro + 2 * i], qi = block[ro + 2 * i + 1];
                rr += _pLow[i] * qr; ri += _pLow[i] * qi;
                ar += _aLow[i] * qr; ai += _aLow[i] * qi;
                pr += _pLow[i] * block[half + ro + 2 * i]; pi += _pLow[i] * block[half + ro + 2 * i + 1];
            }
            for (int i = 0; i < f; i++)
                for (int j = 0; j < f; j++)
                    qq += _w.Metric[i * f + j] * (block[ro + 2 * i] * block[ro + 2 * j] + block[ro + 2 * i + 1] * block[ro + 2 * j + 1]);
            rr *= inv; ri *= inv;
            // R' = ((D_N phi')_I Q^I + phi'_I D_N Q^I)/(2 e1) - e2 R (d/dN of a scalar; D_N G = 0).
            double dr = (ar + pr) * inv - _e2 * rr, di = (ai + pi) * inv - _e2 * ri;
            r2 += rr * rr + ri * ri;
            dr2 += dr * dr + di * di;
            // |Q_normal|^2 = |Q|^2 - (phi'.Q)^2/|phi'|^2 = |Q|^2 - 2 e1 |R|^2; S^2 = that / (2 e1).
            s2 += Math.Max(0.0, qq * inv - (rr * rr + ri * ri));
        }
        return r2;
    }

    /// <summary>
    /// Frozen when R has stopped changing, |R'| &lt;= tol |R| (summed over realisations), and the isocurvature has decayed,
    /// |S| &lt;= tol |R|, at the point of the driver's last right-hand side (the stop test evaluates it at the same N).
    /// Nothing is extrapolated (<see cref="ApplyFreeze"/>), so the remaining relative change |R'|/|R| (an e-fold of it)
    /// is reported in full: the driver books a tenth of the correction, so ten times it is returned.
    /// </summary>
    public bool TryFreeze(ReadOnlySpan<double> y, ReadOnlySpan<double> dy, double tol, ref double correction)
    {
        double r2 = Curvature(y, out double dr2, out double s2);
        if (!(r2 > 0)) return false;
        double rel = Math.Sqrt(dr2 / r2), iso = Math.Sqrt(s2 / r2);
        if (!(rel <= tol && iso <= tol)) return false;
        correction = Math.Max(correction, 10.0 * (rel + iso));
        return true;
    }

    /// <inheritdoc />
    public void ApplyFreeze(Span<double> y, ReadOnlySpan<double> dy) { }

    /// <inheritdoc />
    public ModePower Power(ReadOnlySpan<double> block, bool frozen, in BackgroundPoint p, double x2, double lnK, double lnRef)
        => new(Spectra(block, p.N, lnK, lnRef).Pr, double.NaN, double.NaN);

    /// <summary>P_R, P_S and C_RS of the block at N (physics.md 7).</summary>
    public FieldPowers Spectra(ReadOnlySpan<double> block, double n, double lnK, double lnRef)
    {
        Prepare(n);
        int f = _n;
        double norm = Math.Exp(3.0 * lnK + 2.0 * lnRef) / (_scale * _scale * 2.0 * Math.PI * Math.PI);
        double pr = Curvature(block, out _, out double ps) * norm;
        ps *= norm;
        double crs = double.NaN;
        if (f == 2)
        {
            // e_s lowered: sqrt(det G) eps_IJ e_sigma^J, eps_12 = 1.
            var g = _w.Metric;
            double det = g[0] * g[3] - g[1] * g[2];
            double speed = Math.Sqrt(2.0 * _e1);
            _sLow[0] = Math.Sqrt(det) * _w.DPhi[1] / speed;
            _sLow[1] = -Math.Sqrt(det) * _w.DPhi[0] / speed;
            double c = 0, sAbs = 0, inv = 1.0 / (2.0 * _e1), invS = 1.0 / speed;
            for (int a = 0; a < 2; a++)
            {
                int ro = 4 * a;
                double rr = (_pLow[0] * block[ro] + _pLow[1] * block[ro + 2]) * inv;
                double ri = (_pLow[0] * block[ro + 1] + _pLow[1] * block[ro + 3]) * inv;
                double sr = (_sLow[0] * block[ro] + _sLow[1] * block[ro + 2]) * invS;
                double si = (_sLow[0] * block[ro + 1] + _sLow[1] * block[ro + 3]) * invS;
                c += rr * sr + ri * si;
                sAbs += sr * sr + si * si;
            }
            crs = c * norm;
            ps = sAbs * norm;
        }
        return new FieldPowers(pr, ps, crs);
    }

    /// <summary>R and R' of the first realisation (physical units).</summary>
    public (Complex Value, Complex Derivative) Amplitude(ReadOnlySpan<double> block, double lnRef)
    {
        int f = _n, half = 2 * f * f;
        double inv = 1.0 / (2.0 * _e1);
        double rr = 0, ri = 0, dr = 0, di = 0;
        for (int i = 0; i < f; i++)
        {
            rr += _pLow[i] * block[2 * i]; ri += _pLow[i] * block[2 * i + 1];
            dr += _aLow[i] * block[2 * i] + _pLow[i] * block[half + 2 * i];
            di += _aLow[i] * block[2 * i + 1] + _pLow[i] * block[half + 2 * i + 1];
        }
        double u = Math.Exp(lnRef) / _scale;
        var r = new Complex(rr * inv, ri * inv);
        return (r * u, (new Complex(dr * inv, di * inv) - _e2 * r) * u);
    }
}

/// <summary>The curvature and isocurvature powers of one n-field mode (physics.md 7).</summary>
/// <param name="Pr">P_R = k^3/(2 pi^2) sum_alpha |R_alpha|^2.</param>
/// <param name="Ps">P_S, alike (n &gt; 2: the whole part of Q normal to phi').</param>
/// <param name="Crs">C_RS = k^3/(2 pi^2) sum_alpha Re(R_alpha conj S_alpha) (NaN for n &gt; 2).</param>
internal readonly record struct FieldPowers(double Pr, double Ps, double Crs);
