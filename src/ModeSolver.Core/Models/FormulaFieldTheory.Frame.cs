using System.Buffers;

namespace ModeSolver.Models;

/// <summary>
/// The exact derivatives of <see cref="FormulaFieldTheory"/>: the Einstein-frame V and G_IJ, either straight from the
/// formulas or through the Jordan-frame map, differentiated by hand. With W = Omega^2, u = 1/W, a_I = d_I ln W:
/// V = V_J u^2; G_IJ = K_IJ u + s a_I a_J (s = 3/2 metric, 0 Palatini; physics.md section 7), and
/// d_K a_I = W_IK/W - a_I a_K, d_M d_K a_I = W_IKM/W - (W_IK/W) a_M - (d_M a_I) a_K - a_I (d_M a_K),
/// d_K u = -u a_K, d_M d_K u = -u W_KM/W + 2 u a_K a_M.
/// </summary>
public sealed partial class FormulaFieldTheory
{
    // Work length of MetricJets for derivative order 0, 1 or 2 of G.
    private int MetricWork(int order)
    {
        int n = _n, n2 = n * n, n3 = n2 * n;
        int entry = n + n2; // one entry's gradient and Hessian
        return _omega2 is null ? entry : entry + 3 * n + 2 * n2 + (order >= 1 ? n2 : 0) + (order >= 2 ? 2 * n3 : 0) + 2 * n;
    }

    /// <summary>
    /// V and its gradient (n) and, when <paramref name="hessian"/> is not empty, its Hessian (n x n); returns V.
    /// </summary>
    private double PotentialJets(ReadOnlySpan<double> phi, Span<double> gradient, Span<double> hessian)
    {
        int n = _n;
        phi = phi[..n];
        if (_omega2 is null) return _potential.Evaluate(phi, gradient, hessian);
        bool second = !hessian.IsEmpty;
        int n2 = n * n, length = 3 * n + (second ? 3 * n2 : 0);
        double[]? rented = null;
        Span<double> work = length <= StackDoubles ? stackalloc double[length] : (rented = ArrayPool<double>.Shared.Rent(length)).AsSpan(0, length);
        try
        {
            var wGrad = work[..n];
            var vGrad = work.Slice(n, n);
            var du = work.Slice(2 * n, n);
            var wHess = second ? work.Slice(3 * n, n2) : Span<double>.Empty;
            var vHess = second ? work.Slice(3 * n + n2, n2) : Span<double>.Empty;
            var ddu = second ? work.Slice(3 * n + 2 * n2, n2) : Span<double>.Empty;
            double w = _omega2.Evaluate(phi, wGrad, wHess);
            double vj = _potential.Evaluate(phi, vGrad, vHess);
            double u = 1.0 / w;
            for (int k = 0; k < n; k++) du[k] = -u * u * wGrad[k];
            if (second)
                for (int k = 0; k < n; k++)
                    for (int m = 0; m < n; m++)
                        ddu[k * n + m] = -u * u * wHess[k * n + m] + 2 * u * u * u * wGrad[k] * wGrad[m];
            double u2 = u * u;
            for (int i = 0; i < n; i++) gradient[i] = vGrad[i] * u2 + 2 * vj * u * du[i];
            if (second)
                for (int i = 0; i < n; i++)
                    for (int j = 0; j < n; j++)
                        hessian[i * n + j] = vHess[i * n + j] * u2 + 2 * u * (vGrad[i] * du[j] + vGrad[j] * du[i])
                                             + 2 * vj * (du[i] * du[j] + u * ddu[i * n + j]);
            return vj * u2;
        }
        finally
        {
            if (rented is not null) ArrayPool<double>.Shared.Return(rented);
        }
    }

    /// <summary>
    /// G_IJ into <paramref name="g"/> (n x n); when <paramref name="dg"/> is not empty d_K G_IJ at [K n^2 + I n + J], and
    /// when <paramref name="ddg"/> is not empty d_M d_K G_IJ at [(M n + K) n^2 + I n + J]. <paramref name="work"/> has
    /// <see cref="MetricWork"/> doubles for that order.
    /// </summary>
    private void MetricJets(ReadOnlySpan<double> phi, Span<double> g, Span<double> dg, Span<double> ddg, Span<double> work)
    {
        int n = _n, n2 = n * n;
        phi = phi[..n];
        int order = dg.IsEmpty ? 0 : ddg.IsEmpty ? 1 : 2;
        var eGrad = work[..n];
        var eHess = work.Slice(n, n2);
        if (_omega2 is null)
        {
            for (int i = 0; i < n; i++)
                for (int j = i; j < n; j++)
                {
                    double v = _metric.Entry(i, j, phi, order, eGrad, eHess);
                    g[i * n + j] = v;
                    g[j * n + i] = v;
                    if (order >= 1)
                        for (int k = 0; k < n; k++)
                        {
                            dg[k * n2 + i * n + j] = eGrad[k];
                            dg[k * n2 + j * n + i] = eGrad[k];
                        }
                    if (order >= 2)
                        for (int m = 0; m < n; m++)
                            for (int k = 0; k < n; k++)
                            {
                                double h = eHess[m * n + k];
                                ddg[(m * n + k) * n2 + i * n + j] = h;
                                ddg[(m * n + k) * n2 + j * n + i] = h;
                            }
                }
            return;
        }

        // Jordan frame: Omega^2 to one order above G in the metric formulation (the induced term has d ln Omega^2).
        int n3 = n2 * n;
        int at = n + n2;
        var wGrad = work.Slice(at, n); at += n;
        var a = work.Slice(at, n); at += n;
        var du = work.Slice(at, n); at += n;
        var wHess = work.Slice(at, n2); at += n2;
        var ddu = work.Slice(at, n2); at += n2;
        var da = order >= 1 ? work.Slice(at, n2) : Span<double>.Empty; at += order >= 1 ? n2 : 0;
        var wThird = order >= 2 ? work.Slice(at, n3) : Span<double>.Empty; at += order >= 2 ? n3 : 0;
        var dda = order >= 2 ? work.Slice(at, n3) : Span<double>.Empty;
        bool induced = _inducedScale != 0;
        int wOrder = order + (induced ? 1 : 0);
        double w = wOrder switch
        {
            0 => _omega2.Value(phi),
            1 => _omega2.Evaluate(phi, wGrad, Span<double>.Empty),
            2 => _omega2.Evaluate(phi, wGrad, wHess),
            _ => _omega2.Evaluate(phi, wGrad, wHess, wThird),
        };
        double u = 1.0 / w;
        if (wOrder >= 1)
            for (int i = 0; i < n; i++)
            {
                a[i] = wGrad[i] * u;
                du[i] = -u * a[i];
            }
        if (wOrder >= 2)
            for (int i = 0; i < n; i++)
                for (int k = 0; k < n; k++)
                {
                    double b = wHess[i * n + k] * u;
                    if (order >= 1) da[i * n + k] = b - a[i] * a[k];
                    ddu[i * n + k] = -u * b + 2 * u * a[i] * a[k];
                }
        if (wOrder >= 3)
            for (int i = 0; i < n; i++)
                for (int k = 0; k < n; k++)
                    for (int m = 0; m < n; m++)
                        dda[(i * n + k) * n + m] = wThird[(i * n + k) * n + m] * u - wHess[i * n + k] * u * a[m]
                                                   - da[i * n + m] * a[k] - a[i] * da[k * n + m];
        double s = _inducedScale;
        for (int i = 0; i < n; i++)
            for (int j = i; j < n; j++)
            {
                double kv = _metric.Entry(i, j, phi, order, eGrad, eHess);
                double v = kv * u + (induced ? s * a[i] * a[j] : 0.0);
                g[i * n + j] = v;
                g[j * n + i] = v;
                if (order >= 1)
                    for (int k = 0; k < n; k++)
                    {
                        double d = eGrad[k] * u + kv * du[k];
                        if (induced) d += s * (da[i * n + k] * a[j] + a[i] * da[j * n + k]);
                        dg[k * n2 + i * n + j] = d;
                        dg[k * n2 + j * n + i] = d;
                    }
                if (order >= 2)
                    for (int m = 0; m < n; m++)
                        for (int k = 0; k < n; k++)
                        {
                            double d = eHess[k * n + m] * u + eGrad[k] * du[m] + eGrad[m] * du[k] + kv * ddu[k * n + m];
                            if (induced)
                                d += s * (dda[(i * n + k) * n + m] * a[j] + da[i * n + k] * da[j * n + m]
                                          + da[i * n + m] * da[j * n + k] + a[i] * dda[(j * n + k) * n + m]);
                            ddg[(m * n + k) * n2 + i * n + j] = d;
                            ddg[(m * n + k) * n2 + j * n + i] = d;
                        }
            }
    }
}
