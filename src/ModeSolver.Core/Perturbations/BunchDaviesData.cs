using System.Numerics;
using MathNet.Numerics;
using ModeSolver.Background;
using ModeSolver.Physics;

namespace ModeSolver.Perturbations;

/// <summary>
/// Bunch-Davies data of a mode at its start N0: the frozen local-index Hankel solution of each mode system
/// (<see cref="IModeSystem.Vacuum"/>), relative to the amplitude reference exp(-3 N0/2)/sqrt(H0), so that no
/// background length under- or overflows. Without k-derivatives: the data at N0. With them: the k-derivatives are
/// TOTAL derivatives along the start path x(N0(k)) = const, so that the computed n_s, alpha_s are the exact
/// derivatives of the computed P(k) (which is smooth in k because every mode starts at the same depth). A fixed-N0
/// derivative would differentiate the small initial-data mismatch ~ exp(2i k tau0) and amplify it by (2 k/aH)^j.
/// Moving N0 by dN0 = c dln k, c = 1/(1 - e1), adds c (d/dN data - f(data)) (the defect of the data as a solution) to
/// the next derivative block; the N-derivatives of the data are 5-point central differences in N on two stencils of
/// the background's Taylor jet (no right-hand-side calls). A reusable workspace; allocation-free after construction.
/// </summary>
internal sealed class BunchDaviesData
{
    /// <summary>Points of a stencil: N0 + (j - 4) dn, j = 0..8.</summary>
    public const int StencilPoints = 9;

    /// <summary>
    /// N steps of the data stencils times k/aH. 5-point differences leave a truncation (dn x)^4/30 and a round-off
    /// about 1e-16/(dn x)^j in the j-th derivative block: measured on power law with e1 = 5e-9, the narrow step leaves
    /// n_t within 2e-4 relative (5e-3: 7e-2), the wide one alpha_s within 1e-8 (1e-3: 7e-7).
    /// </summary>
    private const double NarrowDataStep = 0.001, WideDataStep = 0.005;

    /// <summary>Data width allocated first (two systems of 6 complex entries: zeta and tensor); grown on demand.</summary>
    private const int InitialWidth = 12;

    /// <summary>The data of every system at the points of one stencil.</summary>
    internal sealed class Stencil
    {
        public Stencil(int points)
        {
            Points = new BackgroundPoint[points];
            Data = new Complex[points * InitialWidth];
            X2 = new double[points];
            C = new double[points];
        }

        /// <summary>Makes room for <paramref name="width"/> complex entries per point.</summary>
        public void Reserve(int width)
        {
            if (Data.Length < Points.Length * width) Data = new Complex[Points.Length * width];
        }

        /// <summary>The background at each point.</summary>
        public readonly BackgroundPoint[] Points;

        /// <summary>Data of point j and slot s start at j * Width + SlotOffset(s).</summary>
        public Complex[] Data { get; private set; }

        /// <summary>(k/aH)^2 and c = 1/(1 - e1) at each point.</summary>
        public readonly double[] X2, C;

        /// <summary>N step.</summary>
        public double Dn;
    }

    private readonly int[] _slotOffset = new int[StateLayout.MaxBlocks];
    private int _width;
    private ModeContext _ctx = null!;
    private double _x0;

    /// <summary>The data at N0 alone (no k-derivatives).</summary>
    public Stencil Point { get; } = new(1);

    /// <summary>The wide stencil (second k-derivative block: round-off divided by dn^2).</summary>
    public Stencil Wide { get; } = new(StencilPoints);

    /// <summary>The narrow stencil (first k-derivative block, which is of slow-roll size and needs the small truncation).</summary>
    public Stencil Narrow { get; } = new(StencilPoints);

    /// <summary>ln of the amplitude reference exp(-3 N0/2)/sqrt(H0) of the last <see cref="Fill"/>.</summary>
    public double LnRef { get; private set; }

    /// <summary>k/aH at N0 of the last <see cref="Fill"/>.</summary>
    public double X0 => _x0;

    /// <summary>Computes the data of every system of <paramref name="ctx"/> at <paramref name="n0"/> (with the stencils when it carries k-derivatives).</summary>
    public void Fill(ModeContext ctx, double n0, InitialDataKind kind)
    {
        _ctx = ctx;
        var bg = ctx.Background;
        _width = 0;
        for (int s = 0; s < ctx.SystemCount; s++)
        {
            _slotOffset[s] = _width;
            _width += ctx.System(s).VacuumWidth;
        }
        Point.Reserve(_width);
        Wide.Reserve(_width);
        Narrow.Reserve(_width);
        var p0 = bg.At(n0);
        LnRef = -1.5 * n0 - 0.5 * Math.Log(p0.H);
        _x0 = Math.Exp(ctx.LnK - n0) / p0.H;
        if (!ctx.Derivatives)
        {
            Point.Dn = 0;
            LocalData(Point, 0, 0.0, p0, 0.0, kind);
            return;
        }
        double e3Slope = Epsilon3Slope(n0);
        FillStencil(Wide, p0, e3Slope, WideDataStep / Math.Max(1.0, _x0), kind, 0, StencilPoints - 1);
        // The narrow stencil serves only the first derivative block: one 5-point difference at N0 (points 2..6).
        FillStencil(Narrow, p0, e3Slope, NarrowDataStep / Math.Max(1.0, _x0), kind, 2, 6);
    }

    /// <summary>Offset of slot <paramref name="slot"/>'s data within a point.</summary>
    public int SlotOffset(int slot) => _slotOffset[slot];

    /// <summary>Writes the value and N-derivative of slot <paramref name="slot"/> at N0 into <paramref name="block"/>[0..3].</summary>
    public void Value(int slot, Span<double> block)
    {
        int d = _slotOffset[slot];
        Put(block, 0, Point.Data[d], Point.Data[d + 1]);
    }

    /// <summary>The local data at N0 + (j - 4) <paramref name="dn"/>, j = <paramref name="first"/>..<paramref name="last"/>, on the background's jet.</summary>
    private void FillStencil(Stencil st, BackgroundPoint p0, double e3Slope, double dn, InitialDataKind kind, int first, int last)
    {
        st.Dn = dn;
        for (int j = first; j <= last; j++)
        {
            var pj = JetPoint(p0, e3Slope, (j - 4) * dn, out double lnHRatio);
            LocalData(st, j, (j - 4) * dn, pj, lnHRatio, kind);
        }
    }

    /// <summary>
    /// Only the first total ln k derivative block (as in <see cref="DerivativeBlocks"/>) of slot <paramref name="slot"/>
    /// from stencil <paramref name="st"/>, into <paramref name="block"/>[4..7]; <paramref name="fr"/> is the system's friction at the points.
    /// </summary>
    public void FirstDerivativeBlock(Stencil st, int slot, ReadOnlySpan<double> fr, Span<double> block)
    {
        var data = st.Data;
        int d = _slotOffset[slot];
        double dn = st.Dn;
        int o = 4 * _width + d;
        Complex rho0 = D5(st, d, 4, dn) - data[o + 1];
        Complex rho1 = D5(st, d + 1, 4, dn) - (-fr[4] * data[o + 1] - st.X2[4] * data[o]);
        Put(block, 4, data[o + 2] + st.C[4] * rho0, data[o + 3] + st.C[4] * rho1);
    }

    /// <summary>Value, first and second total ln k derivative blocks of slot <paramref name="slot"/> into <paramref name="block"/>[0..11].</summary>
    public void DerivativeBlocks(Stencil st, int slot, ReadOnlySpan<double> fr, Span<double> block)
    {
        var data = st.Data;
        int d = _slotOffset[slot];
        double dn = st.Dn, c = st.C[4];
        int c0 = 4 * _width;
        Span<Complex> z1 = stackalloc Complex[10]; // Z1 (value, derivative) at j = 2..6 (offsets -2..2)
        for (int j = 2; j <= 6; j++)
        {
            int o = j * _width + d;
            Complex rho0 = D5(st, d, j, dn) - data[o + 1];
            Complex rho1 = D5(st, d + 1, j, dn) - (-fr[j] * data[o + 1] - st.X2[j] * data[o]);
            z1[2 * (j - 2)] = data[o + 2] + st.C[j] * rho0;
            z1[2 * (j - 2) + 1] = data[o + 3] + st.C[j] * rho1;
        }
        // d/dln k of Z1 at fixed N, then the defect sigma of Z1 as a solution of the first sensitivity equation.
        int b = c0 + d;
        Complex krho0 = D5(st, d + 2, 4, dn) - data[b + 3];
        Complex krho1 = D5(st, d + 3, 4, dn) - (-fr[4] * data[b + 3] - st.X2[4] * (data[b + 2] + 2.0 * data[b]));
        Complex z1v = z1[4], z1d = z1[5];
        Complex dz1v = (z1[0] - 8.0 * z1[2] + 8.0 * z1[6] - z1[8]) / (12.0 * dn);
        Complex dz1d = (z1[1] - 8.0 * z1[3] + 8.0 * z1[7] - z1[9]) / (12.0 * dn);
        Complex sig0 = dz1v - z1d;
        Complex sig1 = dz1d - (-fr[4] * z1d - st.X2[4] * (z1v + 2.0 * data[b]));
        Put(block, 0, data[b], data[b + 1]);
        Put(block, 4, z1v, z1d);
        Put(block, 8, data[b + 4] + c * krho0 + c * sig0, data[b + 5] + c * krho1 + c * sig1);
    }

    /// <summary>5-point central N-derivative of data component <paramref name="comp"/> at stencil point <paramref name="j"/>.</summary>
    private Complex D5(Stencil st, int comp, int j, double dn) =>
        (st.Data[(j - 2) * _width + comp] - 8.0 * st.Data[(j - 1) * _width + comp]
         + 8.0 * st.Data[(j + 1) * _width + comp] - st.Data[(j + 2) * _width + comp]) / (12.0 * dn);

    /// <summary>
    /// The background near N0 + <paramref name="dn"/> from its Taylor jet at N0 (e1' = e1 e2, e2' = e2 e3, (ln H)' = -e1
    /// exactly; e3' from <paramref name="e3Slope"/>), not from the dense output: the data's N-differences then see a
    /// smooth background. Pointwise values carry the background's round-off (about 1e-8 in e2 when e1 ~ 1e-9), which
    /// the stencil of the derivative data divides by dn^2 (the cause of wrong alpha_s at large non-canonical factors).
    /// </summary>
    private static BackgroundPoint JetPoint(BackgroundPoint p, double e3Slope, double dn, out double lnHRatio)
    {
        lnHRatio = 0;
        if (dn == 0) return p;
        double e1 = p.Epsilon1, e2 = p.Epsilon2, e3 = p.Epsilon3;
        double e2d = e2 * e3, e2dd = e2 * e3 * e3 + e2 * e3Slope;
        double d2 = dn * dn, d3 = d2 * dn;
        double e2n = e2 + e2d * dn + 0.5 * e2dd * d2;
        double e3n = e3 + e3Slope * dn;
        double lnE1 = e2 * dn + 0.5 * e2d * d2 + e2dd * d3 / 6.0;
        double e1n = e1 * Math.Exp(lnE1);
        lnHRatio = -e1 * (dn + 0.5 * e2 * d2 + (e2 * e2 + e2d) * d3 / 6.0);
        return p with { N = p.N + dn, H = p.H * Math.Exp(lnHRatio), Epsilon1 = e1n, Epsilon2 = e2n, Epsilon3 = e3n };
    }

    /// <summary>d e3/dN at <paramref name="n0"/>: a central difference over +-0.02 e-folds, one-sided near an end or a non-smooth point.</summary>
    private double Epsilon3Slope(double n0)
    {
        const double h = 0.02;
        var bg = _ctx.Background;
        double lo = Math.Max(bg.NStart, n0 - h), hi = Math.Min(Math.Min(bg.NEnd, bg.NStop), n0 + h);
        var ns = bg.NonSmoothTimes;
        for (int i = 0; i < ns.Count; i++)
        {
            if (ns[i] > n0 && ns[i] < hi) hi = n0;
            if (ns[i] <= n0 && ns[i] > lo) lo = n0;
        }
        if (!(hi > lo)) return 0.0;
        double d = (bg.At(hi).Epsilon3 - bg.At(lo).Epsilon3) / (hi - lo);
        return double.IsFinite(d) ? d : 0.0;
    }

    /// <summary>
    /// The frozen local-index solution of every system at N = N0 + <paramref name="dn"/> (background <paramref name="p"/>
    /// there, ln(H/H0) = <paramref name="lnHRatio"/>) and its k-derivatives at fixed N, relative to the amplitude
    /// reference, into point <paramref name="j"/> of <paramref name="st"/>. Everything is computed from the offset dn,
    /// never from N itself, so the stencil's differences carry no rounding of N.
    /// </summary>
    private void LocalData(Stencil st, int j, double dn, BackgroundPoint p, double lnHRatio, InitialDataKind kind)
    {
        double n = p.N;
        double e1 = p.Epsilon1;
        if (!(e1 < 1)) throw new PhysicsException($"mode k = {Math.Exp(_ctx.LnK):G6} would start at N = {n:G8} where epsilon_1 = {e1:G4} >= 1 (not inflating); choose a larger kMin or start the background earlier");
        double oneMinus = 1.0 - e1;
        double x = _x0 * Math.Exp(-dn - lnHRatio);
        st.Points[j] = p;
        st.X2[j] = x * x;
        st.C[j] = 1.0 / oneMinus;
        double bigX = x / oneMinus; // -k tau
        // ln(-tau) = -ln((1 - e1) a H) and ln z, both relative to the start: ln of sqrt(-tau)/z - ln ref = base - ln z_rest.
        double lnBase = -1.5 * dn - 0.5 * lnHRatio - 0.5 * Math.Log(oneMinus);
        var v = new VacuumPoint(p, oneMinus, bigX, lnBase, kind, _ctx.LnK);
        var row = st.Data.AsSpan(j * _width, _width);
        for (int s = 0; s < _ctx.SystemCount; s++)
        {
            var sys = _ctx.System(s);
            sys.Vacuum(v, row.Slice(_slotOffset[s], sys.VacuumWidth));
        }
    }

    /// <summary>(sqrt(pi)/2) exp(i (nu + 1/2) pi/2) sqrt(-tau) / z with ln(sqrt(-tau)/z) = <paramref name="lnAmplitude"/>: the factor of H_nu in f.</summary>
    internal static Complex Normalisation(double nu, double lnAmplitude) =>
        Complex.FromPolarCoordinates(0.5 * Math.Sqrt(Math.PI) * Math.Exp(lnAmplitude), (nu + 0.5) * Math.PI / 2);

    /// <summary>g[j] = (X d/dX)^j H^(1)_nu(X), j = 0..3, from the Bessel equation: D^2 H = (nu^2 - X^2) H.</summary>
    internal static void HankelDerivatives(double nu, double bigX, Span<Complex> g)
    {
        if (RealHankel.TryBesselJY(nu, bigX, out double bj, out double by, out double bjp, out double byp))
        {
            // H = J + iY and X H' = X (J' + iY') directly (Steed's method, no allocation).
            Complex h0 = new(bj, by);
            Complex xd = new(bigX * bjp, bigX * byp);
            double qq = nu * nu - bigX * bigX;
            g[0] = h0;
            g[1] = xd;
            g[2] = qq * h0;
            g[3] = -2.0 * bigX * bigX * h0 + qq * xd;
            return;
        }
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

    private static void Put(Span<double> block, int off, Complex f, Complex df)
    {
        block[off] = f.Real;
        block[off + 1] = f.Imaginary;
        block[off + 2] = df.Real;
        block[off + 3] = df.Imaginary;
    }
}
