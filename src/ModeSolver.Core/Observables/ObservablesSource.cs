using System.Collections.Immutable;
using ModeSolver.Spectra;
using ModeSolver.Results;

namespace ModeSolver.Observables;

/// <summary>
/// What the observables stage reads: the exact scalar spectrum samples (k in 1/Mpc, ascending, with the exact slope
/// n_s(k) and the per-sample relative error estimate), the background's horizon-exit lookup, and the pivot results.
/// Between samples P_s is the spectra's own interpolation (<see cref="LogHermite"/>: cubic Hermite of ln P_s in ln k with
/// the exact slopes n_s - 1); outside [k_min, k_max] it is taken as zero.
/// </summary>
/// <param name="K">k in 1/Mpc, strictly increasing.</param>
/// <param name="Ps">P_s at each k.</param>
/// <param name="Ns">n_s(k) = 1 + d ln P_s / d ln k at each k.</param>
/// <param name="RelError">Estimated relative error of P_s at each k.</param>
/// <param name="NAtExit">N (e-folds since the start) at which k (1/Mpc) left the horizon for the last time; NaN where unknown.</param>
/// <param name="NEnd">N at the end of inflation (NaN when unknown).</param>
/// <param name="Pivot">Exact results at the pivot.</param>
public sealed record ObservablesSource(
    ImmutableArray<double> K,
    ImmutableArray<double> Ps,
    ImmutableArray<double> Ns,
    ImmutableArray<double> RelError,
    Func<double, double> NAtExit,
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

    /// <summary>Checks lengths, ordering and positivity (one sample is valid; interpolation needs two); throws <see cref="ArgumentException"/> (a bug in the caller) or, for a P_s that is not positive and finite, <see cref="Physics.PhysicsException"/>, with a one-line message.</summary>
    public void Validate()
    {
        int n = K.Length;
        if (n < 1) throw new ArgumentException("observables: the spectrum has no wavenumbers");
        if (Ps.Length != n || Ns.Length != n || RelError.Length != n)
            throw new ArgumentException("observables: spectrum arrays differ in length");
        for (int i = 0; i < n; i++)
        {
            if (!(K[i] > 0) || (i > 0 && !(K[i] > K[i - 1]))) throw new ArgumentException($"observables: k is not positive and increasing at index {i}");
            if (!(Ps[i] > 0) || !double.IsFinite(Ps[i])) throw new Physics.PhysicsException($"observables: P_s is not positive and finite at k = {K[i]:G6} /Mpc");
        }
    }

    /// <summary>P_s at k (1/Mpc), interpolated as the spectra are (<see cref="LogHermite"/>); zero outside the computed range.</summary>
    public double PsAt(double k)
    {
        if (!(k >= K[0] && k <= K[^1])) return 0.0;
        return Math.Exp(LogHermite.Value(K.AsSpan(), Ps.AsSpan(), Ns.AsSpan(), 1.0, true, k));
    }

    /// <summary>d ln P_s / d ln k at k (derivative of the same interpolant; clamped to the range).</summary>
    public double SlopeAt(double k) =>
        LogHermite.Derivative(K.AsSpan(), Ps.AsSpan(), Ns.AsSpan(), 1.0, true, Math.Clamp(k, K[0], K[^1]));

    /// <summary>The source built from a run's spectrum samples and pivot results.</summary>
    public static ObservablesSource From(SpectrumSamples spectrum, PivotResults pivot, Func<double, double> nAtExit, double nEnd)
    {
        ArgumentNullException.ThrowIfNull(spectrum);
        return new ObservablesSource(spectrum.K, spectrum.Ps, spectrum.Ns, spectrum.RelError, nAtExit, nEnd, pivot);
    }
}
