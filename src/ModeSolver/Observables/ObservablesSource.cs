using System.Collections.Immutable;
using ModeSolver.Output;

namespace ModeSolver.Observables;

/// <summary>
/// What the observables stage reads: the exact scalar spectrum samples (k in 1/Mpc, ascending, with the exact slope
/// n_s(k) and the per-sample relative error estimate), the horizon-exit e-folds of each sample, and the pivot results.
/// Between samples P_s is the cubic Hermite interpolant of ln P_s in ln k with the exact slopes n_s - 1; outside
/// [k_min, k_max] it is taken as zero.
/// </summary>
/// <param name="K">k in 1/Mpc, strictly increasing.</param>
/// <param name="Ps">P_s at each k.</param>
/// <param name="Ns">n_s(k) = 1 + d ln P_s / d ln k at each k.</param>
/// <param name="RelError">Estimated relative error of P_s at each k.</param>
/// <param name="ExitN">N (e-folds since the start) at which each k left the horizon; NaN where unknown.</param>
/// <param name="NEnd">N at the end of inflation (NaN when unknown).</param>
/// <param name="Pivot">Exact results at the pivot.</param>
public sealed record ObservablesSource(
    ImmutableArray<double> K,
    ImmutableArray<double> Ps,
    ImmutableArray<double> Ns,
    ImmutableArray<double> RelError,
    ImmutableArray<double> ExitN,
    double NEnd,
    PivotResults Pivot)
{
    /// <summary>Number of samples.</summary>
    public int Count => K.Length;

    /// <summary>Smallest k, 1/Mpc.</summary>
    public double KMin => K[0];

    /// <summary>Largest k, 1/Mpc.</summary>
    public double KMax => K[^1];

    /// <summary>Largest relative error estimate of the samples.</summary>
    public double MaxRelError
    {
        get
        {
            double m = 0;
            foreach (double e in RelError) if (double.IsFinite(e)) m = Math.Max(m, e);
            return m;
        }
    }

    /// <summary>Checks lengths, ordering and positivity; throws <see cref="ArgumentException"/> with a one-line message.</summary>
    public void Validate()
    {
        int n = K.Length;
        if (n < 2) throw new ArgumentException("observables: the spectrum needs at least two wavenumbers");
        if (Ps.Length != n || Ns.Length != n || RelError.Length != n || ExitN.Length != n)
            throw new ArgumentException("observables: spectrum arrays differ in length");
        for (int i = 0; i < n; i++)
        {
            if (!(K[i] > 0) || (i > 0 && !(K[i] > K[i - 1]))) throw new ArgumentException($"observables: k is not positive and increasing at index {i}");
            if (!(Ps[i] > 0) || !double.IsFinite(Ps[i])) throw new ArgumentException($"observables: P_s is not positive and finite at k = {K[i]:G6} /Mpc");
        }
    }

    /// <summary>P_s at k (1/Mpc): Hermite in ln k of ln P_s with the exact slopes; zero outside the computed range.</summary>
    public double PsAt(double k)
    {
        if (!(k >= K[0] && k <= K[^1])) return 0.0;
        int i = Locate(k);
        double h = Math.Log(K[i + 1] / K[i]);
        double t = Math.Log(k / K[i]) / h;
        double f0 = Math.Log(Ps[i]), f1 = Math.Log(Ps[i + 1]);
        double d0 = (Ns[i] - 1) * h, d1 = (Ns[i + 1] - 1) * h;
        double t2 = t * t, t3 = t2 * t;
        return Math.Exp((2 * t3 - 3 * t2 + 1) * f0 + (t3 - 2 * t2 + t) * d0 + (-2 * t3 + 3 * t2) * f1 + (t3 - t2) * d1);
    }

    /// <summary>d ln P_s / d ln k at k inside the range (derivative of the same interpolant).</summary>
    public double SlopeAt(double k)
    {
        int i = Locate(Math.Clamp(k, K[0], K[^1]));
        double h = Math.Log(K[i + 1] / K[i]);
        double t = Math.Clamp(Math.Log(k / K[i]) / h, 0, 1);
        double f0 = Math.Log(Ps[i]), f1 = Math.Log(Ps[i + 1]);
        double d0 = (Ns[i] - 1) * h, d1 = (Ns[i + 1] - 1) * h;
        double t2 = t * t;
        return ((6 * t2 - 6 * t) * f0 + (3 * t2 - 4 * t + 1) * d0 + (-6 * t2 + 6 * t) * f1 + (3 * t2 - 2 * t) * d1) / h;
    }

    /// <summary>Linear interpolation in ln k of a per-sample array (clamped to the range).</summary>
    public double Linear(ImmutableArray<double> values, double k)
    {
        k = Math.Clamp(k, K[0], K[^1]);
        int i = Locate(k);
        double t = Math.Log(k / K[i]) / Math.Log(K[i + 1] / K[i]);
        return (1 - t) * values[i] + t * values[i + 1];
    }

    private int Locate(double k)
    {
        var span = K.AsSpan();
        int lo = span.BinarySearch(k);
        if (lo < 0) lo = ~lo - 1;
        return Math.Clamp(lo, 0, span.Length - 2);
    }

    /// <summary>The source built from a run's spectrum samples and pivot results.</summary>
    public static ObservablesSource From(SpectrumSamples spectrum, PivotResults pivot, ImmutableArray<double> exitN, double nEnd)
    {
        ArgumentNullException.ThrowIfNull(spectrum);
        return new ObservablesSource(spectrum.K, spectrum.Ps, spectrum.Ns, spectrum.RelError, exitN, nEnd, pivot);
    }
}
