namespace ModeSolver.Observables;

/// <summary>Result of a quadrature: the value and an estimate of its absolute error.</summary>
/// <param name="Value">The integral.</param>
/// <param name="Error">Estimated absolute error (sum of the per-interval Gauss-Kronrod estimates).</param>
/// <param name="Evaluations">Integrand evaluations used.</param>
/// <param name="Converged">False when the interval budget ran out before the tolerance was met.</param>
public readonly record struct QuadratureResult(double Value, double Error, int Evaluations, bool Converged);

/// <summary>
/// Globally adaptive 15-point Gauss-Kronrod quadrature on a finite interval with given breakpoints: the interval with
/// the largest error estimate is bisected until the summed estimate is below max(absTol, relTol |I|). The error of
/// each interval is |K15 - G7|, the plain Kronrod-minus-Gauss difference (an overestimate for smooth integrands).
/// Nodes and weights: Piessens, de Doncker-Kapenga, Ueberhuber &amp; Kahaner, QUADPACK (Springer 1983), rule QK15.
/// Physics-free.
/// </summary>
public static class AdaptiveQuadrature
{
    // Kronrod abscissae on [-1, 1], positive half, descending; the odd-indexed ones (1, 3, 5, 7) are the 7-point Gauss nodes.
    private static readonly double[] Xk =
    [
        0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
        0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
        0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
        0.207784955007898467600689403773245, 0.0,
    ];
    private static readonly double[] Wk =
    [
        0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
        0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
        0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
        0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
    ];
    // Gauss weights for Xk[1], Xk[3], Xk[5], Xk[7].
    private static readonly double[] Wg =
    [
        0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
        0.381830050505118944950369775488975, 0.417959183673469387755102040816327,
    ];

    /// <summary>The 15-point Kronrod and embedded 7-point Gauss sums on [a, b].</summary>
    internal static (double Kronrod, double Gauss) Rule(Func<double, double> f, double a, double b)
    {
        double c = 0.5 * (a + b), h = 0.5 * (b - a);
        double fc = f(c);
        double k = Wk[7] * fc, g = Wg[3] * fc;
        for (int j = 0; j < 7; j++)
        {
            double dx = h * Xk[j];
            double s = f(c - dx) + f(c + dx);
            k += Wk[j] * s;
            if ((j & 1) == 1) g += Wg[j >> 1] * s;
        }
        return (k * h, g * h);
    }

    /// <summary>
    /// Integrates <paramref name="f"/> over [<paramref name="a"/>, <paramref name="b"/>], starting from the
    /// intervals cut at <paramref name="breakpoints"/> (those outside (a, b) are ignored).
    /// </summary>
    public static QuadratureResult Integrate(Func<double, double> f, double a, double b, ReadOnlySpan<double> breakpoints,
        double relTol, double absTol = 0, int maxIntervals = 2000)
    {
        ArgumentNullException.ThrowIfNull(f);
        if (!(b > a)) return new QuadratureResult(0, 0, 0, true);
        var cuts = new List<double> { a };
        foreach (double x in breakpoints)
            if (x > a && x < b) cuts.Add(x);
        cuts.Add(b);
        cuts.Sort();
        var queue = new PriorityQueue<(double A, double B, double I, double E), double>();
        double total = 0, error = 0;
        int evaluations = 0;
        for (int i = 0; i + 1 < cuts.Count; i++)
        {
            if (!(cuts[i + 1] > cuts[i])) continue;
            var (k, g) = Rule(f, cuts[i], cuts[i + 1]);
            evaluations += 15;
            double e = Math.Abs(k - g);
            total += k; error += e;
            queue.Enqueue((cuts[i], cuts[i + 1], k, e), -e);
        }
        while (queue.Count > 0 && error > Math.Max(absTol, relTol * Math.Abs(total)))
        {
            if (queue.Count >= maxIntervals) return new QuadratureResult(total, error, evaluations, false);
            var w = queue.Dequeue();
            double m = 0.5 * (w.A + w.B);
            if (!(m > w.A && m < w.B)) { queue.Enqueue(w, 0); break; } // interval at round-off width: give up refining it
            var (k1, g1) = Rule(f, w.A, m);
            var (k2, g2) = Rule(f, m, w.B);
            evaluations += 30;
            double e1 = Math.Abs(k1 - g1), e2 = Math.Abs(k2 - g2);
            total += k1 + k2 - w.I;
            error += e1 + e2 - w.E;
            queue.Enqueue((w.A, m, k1, e1), -e1);
            queue.Enqueue((m, w.B, k2, e2), -e2);
        }
        // Re-sum to shed the rounding of the running updates.
        total = 0; error = 0;
        foreach (var (el, _) in queue.UnorderedItems) { total += el.I; error += el.E; }
        return new QuadratureResult(total, error, evaluations, error <= Math.Max(absTol, relTol * Math.Abs(total)));
    }
}
