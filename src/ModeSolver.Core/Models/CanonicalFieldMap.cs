namespace ModeSolver.Models;

/// <summary>
/// The canonical field of a theory on a field interval: chi(phi) = int_{phiRef}^{phi} sqrt(K) dphi (physics.md section 1),
/// by adaptive Gauss-Kronrod (7/15 points) quadrature to a relative tolerance of 1e-12, split at the theory's
/// non-smooth points; its inverse phi(chi) by Newton steps (d phi / d chi = 1/sqrt(K)) safeguarded by bisection;
/// and V(chi). chi is increasing in phi.
/// </summary>
public sealed class CanonicalFieldMap
{
    private const int Segments = 64;
    private readonly IInflatonTheory _theory;
    private readonly double[] _nodes;   // phi at segment boundaries
    private readonly double[] _chiAt;   // chi at those phi

    /// <summary>Builds the map on [phiMin, phiMax], with chi(phiReference) = 0.</summary>
    /// <exception cref="TheoryException">when K &lt;= 0 or is not finite somewhere on the interval.</exception>
    public CanonicalFieldMap(IInflatonTheory theory, double phiMin, double phiMax, double? phiReference = null, double relativeTolerance = 1e-12)
    {
        ArgumentNullException.ThrowIfNull(theory);
        if (!(phiMin < phiMax) || !double.IsFinite(phiMin) || !double.IsFinite(phiMax))
            throw new ArgumentException($"the field interval [{phiMin}, {phiMax}] is empty or not finite");
        _theory = theory;
        PhiMin = phiMin;
        PhiMax = phiMax;
        RelativeTolerance = relativeTolerance;
        double reference = phiReference ?? phiMin;
        if (reference < phiMin || reference > phiMax) throw new ArgumentException("the reference field value must lie inside the interval", nameof(phiReference));
        PhiReference = reference;

        // Segment boundaries: uniform nodes plus the non-smooth points inside, so no Gauss panel straddles a kink.
        var set = new SortedSet<double>();
        for (int i = 0; i <= Segments; i++) set.Add(i == Segments ? phiMax : phiMin + (phiMax - phiMin) * i / Segments);
        foreach (double x in theory.NonSmoothPoints) if (x > phiMin && x < phiMax) set.Add(x);
        _nodes = [.. set];
        _chiAt = new double[_nodes.Length];
        for (int i = 1; i < _nodes.Length; i++) _chiAt[i] = _chiAt[i - 1] + Integrate(_nodes[i - 1], _nodes[i]);
        double shift = ChiRaw(reference);
        for (int i = 0; i < _chiAt.Length; i++) _chiAt[i] -= shift;
    }

    /// <summary>Lower end of the field interval.</summary>
    public double PhiMin { get; }

    /// <summary>Upper end of the field interval.</summary>
    public double PhiMax { get; }

    /// <summary>Where chi = 0.</summary>
    public double PhiReference { get; }

    /// <summary>Relative tolerance of the quadrature.</summary>
    public double RelativeTolerance { get; }

    /// <summary>chi at <see cref="PhiMin"/>.</summary>
    public double ChiMin => _chiAt[0];

    /// <summary>chi at <see cref="PhiMax"/>.</summary>
    public double ChiMax => _chiAt[^1];

    /// <summary>sqrt(K(phi)) = d chi / d phi.</summary>
    public double DChiDPhi(double phi) => SqrtK(phi);

    /// <summary>chi(phi) for phi in [PhiMin, PhiMax].</summary>
    public double Chi(double phi)
    {
        CheckPhi(phi);
        return ChiFromNodes(phi);
    }

    /// <summary>phi(chi) for chi in [ChiMin, ChiMax].</summary>
    public double Phi(double chi)
    {
        if (!(chi >= ChiMin - 1e-12 * Math.Max(1, Math.Abs(ChiMin)) && chi <= ChiMax + 1e-12 * Math.Max(1, Math.Abs(ChiMax))))
            throw new ArgumentOutOfRangeException(nameof(chi), $"chi = {chi} is outside [{ChiMin}, {ChiMax}]");
        int i = Array.BinarySearch(_chiAt, chi);
        if (i >= 0) return _nodes[i];
        i = ~i; // first node with chi above
        if (i <= 0) return _nodes[0];
        if (i >= _nodes.Length) return _nodes[^1];
        double lo = _nodes[i - 1], hi = _nodes[i];
        double flo = _chiAt[i - 1] - chi, fhi = _chiAt[i] - chi;
        double x = lo + (hi - lo) * (-flo) / (fhi - flo);
        var f = new ChiOnSegment(this, i - 1, chi);
        return Numerics.Roots.SafeNewton(ref f, lo, hi, flo, fhi, 1e-15, start: x);
    }

    /// <summary>chi(phi) - chi on one segment, with d chi/d phi = sqrt(K).</summary>
    private readonly struct ChiOnSegment(CanonicalFieldMap map, int segment, double chi) : Numerics.IRootFunctionWithDerivative
    {
        public (double Value, double Derivative) Evaluate(double x) => (map.ChiFromSegment(segment, x) - chi, map.SqrtK(x));
    }

    /// <summary>V as a function of chi (Einstein frame).</summary>
    public double PotentialOfChi(double chi) => _theory.Potential(Phi(chi)).Value;

    private void CheckPhi(double phi)
    {
        if (!(phi >= PhiMin && phi <= PhiMax)) throw new ArgumentOutOfRangeException(nameof(phi), $"phi = {phi} is outside [{PhiMin}, {PhiMax}]");
    }

    private double ChiRaw(double phi)
    {
        int i = Segment(phi);
        return _chiAt[i] + Integrate(_nodes[i], phi);
    }

    private double ChiFromNodes(double phi) => ChiFromSegment(Segment(phi), phi);

    private double ChiFromSegment(int i, double phi) => _chiAt[i] + Integrate(_nodes[i], phi);

    private int Segment(double phi)
    {
        int i = Array.BinarySearch(_nodes, phi);
        if (i >= 0) return Math.Min(i, _nodes.Length - 2);
        return Math.Clamp(~i - 1, 0, _nodes.Length - 2);
    }

    private double SqrtK(double phi)
    {
        double k = _theory.Kinetic(phi).Value;
        if (!(k > 0) || !double.IsFinite(k))
            throw new TheoryException($"K = {k:G6} at phi = {phi:G6}: the canonical field is not defined there") { Phi = phi };
        return Math.Sqrt(k);
    }

    // Gauss-Kronrod 7/15 nodes and weights (standard tabulated values, as in QUADPACK's qk15).
    private static ReadOnlySpan<double> Xgk =>
    [
        0.991455371120812639206854697526329, 0.949107912342758524526189684047851, 0.864864423359769072789712788640926,
        0.741531185599394439863864773280788, 0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
        0.207784955007898467600689403773245, 0.000000000000000000000000000000000,
    ];

    private static ReadOnlySpan<double> Wgk =>
    [
        0.022935322010529224963732008058970, 0.063092092629978553290700663189204, 0.104790010322250183839876322541518,
        0.140653259715525918745189590510238, 0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
        0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
    ];

    private static ReadOnlySpan<double> Wg =>
    [
        0.129484966168869693270611432679082, 0.279705391489276667901467771423780, 0.381830050505118944950369775488975,
        0.417959183673469387755102040816327,
    ];

    private double Integrate(double a, double b)
    {
        if (a == b) return 0;
        double whole = Kronrod(a, b, out double err);
        return Adapt(a, b, whole, err, 0);
    }

    private double Adapt(double a, double b, double estimate, double error, int depth)
    {
        double tol = RelativeTolerance * Math.Max(Math.Abs(estimate), 1e-300);
        if (error <= tol || depth >= 40 || Math.Abs(b - a) <= 1e-14 * Math.Max(1.0, Math.Abs(a))) return estimate;
        double m = 0.5 * (a + b);
        double left = Kronrod(a, m, out double el);
        double right = Kronrod(m, b, out double er);
        return Adapt(a, m, left, el, depth + 1) + Adapt(m, b, right, er, depth + 1);
    }

    private double Kronrod(double a, double b, out double error)
    {
        double c = 0.5 * (a + b), h = 0.5 * (b - a);
        double fc = SqrtK(c);
        double resK = fc * Wgk[7];
        double resG = fc * Wg[3];
        for (int j = 0; j < 7; j++)
        {
            double dx = h * Xgk[j];
            double f1 = SqrtK(c - dx), f2 = SqrtK(c + dx);
            resK += Wgk[j] * (f1 + f2);
            if (j % 2 == 1) resG += Wg[j / 2] * (f1 + f2);
        }
        error = Math.Abs((resK - resG) * h);
        return resK * h;
    }
}
