using ModeSolver.Background;
using ModeSolver.Perturbations;

namespace ModeSolver.Spectra;

/// <summary>The spectra of an n-field run across k: the single-field set and the isocurvature per k.</summary>
/// <param name="Spectrum">P_R (as P_s), P_t, r, n_s, n_t, alpha_s and the error estimate per k.</param>
/// <param name="Modes">The mode results (P_S, C_RS, T_RS, work) in the order of <see cref="PrimordialSpectrum.K"/>.</param>
/// <param name="NsError">The error bound of n_s per k (<see cref="FieldSlopes"/>).</param>
public sealed record FieldSpectrum(PrimordialSpectrum Spectrum, FieldModeResult[] Modes, double[] NsError);

/// <summary>
/// n-field spectra on a log-spaced k grid (no refinement): one n x n mode (with tensors) per k in parallel, bit-identical
/// for any thread count. n_s and n_t are finite differences of ln P in ln k on the grid (5-point inside, 3-point
/// one-sided at the two ends on each side), alpha_s the 3-point second difference, each with the error bound of
/// <see cref="FieldSlopes"/>. Error checks: a few spread samples re-run 10x tighter from 4x deeper starts where the background allows
/// (<see cref="FieldModeIntegrator.CheckDepth"/>; so that the initial-data error is measured too); each sample's error is the larger
/// of its own estimate and twice the deviation at the nearest check.
/// </summary>
public static class FieldSpectrumSolver
{
    /// <summary>Spread samples re-run at a tighter tolerance.</summary>
    public const int ErrorChecks = 3;

    /// <summary>Computes the spectra of <paramref name="background"/> on <paramref name="count"/> log-spaced k in [kMin, kMax] (background units).</summary>
    public static FieldSpectrum Compute(AdiabaticBackground background, double kMin, double kMax, int count, double tolerance, int threads)
    {
        ArgumentNullException.ThrowIfNull(background);
        if (!(kMin > 0 && kMax >= kMin) || count < 5)
            throw new ArgumentOutOfRangeException(nameof(count), "need 0 < kMin <= kMax and at least 5 wavenumbers for the finite differences");
        var ks = new double[count];
        double lnMin = Math.Log(kMin), lnMax = Math.Log(kMax), h = (lnMax - lnMin) / (count - 1);
        for (int i = 0; i < count; i++) ks[i] = Math.Exp(lnMin + h * i);
        ks[0] = kMin;
        ks[^1] = kMax;
        var settings = new ModeSettings { Tolerance = tolerance, Derivatives = false };
        var modes = SolveAll(background, ks, settings, threads);
        var checkIdx = new int[ErrorChecks];
        var checkK = new double[ErrorChecks];
        for (int c = 0; c < ErrorChecks; c++)
        {
            checkIdx[c] = (int)Math.Round((double)c * (count - 1) / (ErrorChecks - 1));
            checkK[c] = ks[checkIdx[c]];
        }
        var tight = new FieldModeResult[ErrorChecks];
        for (int c = 0; c < ErrorChecks; c++)
            tight[c] = SolveAll(background, [checkK[c]], settings with
            {
                Tolerance = tolerance * 0.1, StartDepth = FieldModeIntegrator.CheckDepth(background, checkK[c], modes[checkIdx[c]].StartDepth), MaxSteps = 200_000,
            }, threads)[0];
        var dev = new double[ErrorChecks];
        for (int c = 0; c < ErrorChecks; c++)
        {
            var a = modes[checkIdx[c]];
            dev[c] = Math.Max(Math.Abs(a.Pr / tight[c].Pr - 1.0), Math.Abs(a.Pt / tight[c].Pt - 1.0));
        }
        var err = new double[count];
        var lnR = new double[count];
        var lnT = new double[count];
        for (int i = 0; i < count; i++)
        {
            int c = 0;
            for (int j = 1; j < ErrorChecks; j++)
                if (Math.Abs(checkIdx[j] - i) < Math.Abs(checkIdx[c] - i)) c = j;
            err[i] = Math.Max(modes[i].ErrorEstimate, 2.0 * dev[c]);
            lnR[i] = Math.Log(modes[i].Pr);
            lnT[i] = Math.Log(modes[i].Pt);
        }
        var ns = new double[count]; var nt = new double[count]; var al = new double[count]; var nsErr = new double[count];
        for (int i = 0; i < count; i++)
        {
            (ns[i], nsErr[i]) = Slope(lnR, err, i, h);
            nt[i] = Slope(lnT, err, i, h).Value;
            int c = Math.Clamp(i, 1, count - 2);
            al[i] = (lnR[c - 1] - 2.0 * lnR[c] + lnR[c + 1]) / (h * h);
            ns[i] += 1.0;
        }
        var ps = new double[count]; var pt = new double[count]; var r = new double[count];
        var rhs = new int[count]; var frozen = new bool[count]; var bounded = new bool[count];
        double maxErr = 0, sum = 0;
        int maxRhs = 0;
        for (int i = 0; i < count; i++)
        {
            ps[i] = modes[i].Pr; pt[i] = modes[i].Pt; r[i] = pt[i] / ps[i];
            rhs[i] = modes[i].RhsEvaluations; frozen[i] = modes[i].Frozen; bounded[i] = true;
            maxErr = Math.Max(maxErr, err[i]);
            sum += rhs[i];
            maxRhs = Math.Max(maxRhs, rhs[i]);
        }
        var alphaT = new double[count];
        Array.Fill(alphaT, double.NaN);
        var spectrum = new PrimordialSpectrum
        {
            K = ks, Ps = ps, Pt = pt, R = r, Ns = ns, Nt = nt, AlphaS = al, AlphaT = alphaT, ErrorEstimate = err,
            RhsEvaluations = rhs, FrozenBeforeEnd = frozen, ErrorBounded = bounded, CheckK = checkK, CheckDeviation = dev,
            MaxRelativeError = maxErr, MeanRhsEvaluationsPerMode = sum / count, MaxRhsEvaluationsPerMode = maxRhs, Tolerance = tolerance,
        };
        return new FieldSpectrum(spectrum, modes, nsErr);
    }

    /// <summary>d f / d ln k at grid point i: 5-point central inside, else the 3-point form (central or one-sided), with its bound.</summary>
    private static (double Value, double Error) Slope(double[] f, double[] eps, int i, double h)
    {
        int m = f.Length;
        if (i >= 2 && i <= m - 3) return FieldSlopes.First(f.AsSpan(i - 2, 5), eps.AsSpan(i - 2, 5), h);
        if (i >= 1 && i <= m - 2)
        {
            double d3 = (f[i + 1] - f[i - 1]) / (2 * h);
            double d2 = (f[i + 1] - f[i]) / h;
            return (d3, Math.Abs(d3 - d2) + (eps[i + 1] + eps[i - 1]) / (2 * h));
        }
        int s = i == 0 ? 1 : -1;
        double one = s * (-3 * f[i] + 4 * f[i + s] - f[i + 2 * s]) / (2 * h);
        double two = s * (f[i + s] - f[i]) / h;
        return (one, Math.Abs(one - two) + (3 * eps[i] + 4 * eps[i + s] + eps[i + 2 * s]) / (2 * h));
    }

    private static FieldModeResult[] SolveAll(AdiabaticBackground background, double[] ks, ModeSettings ms, int dop)
    {
        var scan = FrictionScan.FromStart(background);
        return ParallelModes.Solve(ks, dop, () => new FieldModeIntegrator(background), (integrator, k) => integrator.Solve(background, k, ms, transfer: true, scan));
    }
}
