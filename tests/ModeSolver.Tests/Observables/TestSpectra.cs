using System.Collections.Immutable;
using ModeSolver.Observables;
using ModeSolver.Output;
using ModeSolver.Results;

namespace ModeSolver.Tests.Observables;

/// <summary>Analytic spectra as observables sources: ln P_s and its exact slope sampled on a log grid in k.</summary>
internal static class TestSpectra
{
    public static PivotResults Pivot(double ns = 0.9649, double r = 0.0, double alphaS = 0.0, double aS = 2.1e-9, double kPivot = 0.05) =>
        new(Ns: ns, AlphaS: alphaS, R: r, Nt: -r / 8, As: aS, KPivot: kPivot, NStar: 55, PhiStar: 5, HStar: 1e-5,
            EnergyScaleGeV: 1e16, VScale: 1, NTotal: 70, NReh: 0, MaxRelError: 0, RhsEvaluationsPerMode: 0);

    /// <summary>A source from ln P(ln k) and d ln P / d ln k on n log-spaced samples in [kMin, kMax].</summary>
    public static ObservablesSource FromLog(Func<double, double> lnP, Func<double, double> slope, double kMin, double kMax, int n,
        double relError = 0, PivotResults? pivot = null)
    {
        var k = new double[n]; var p = new double[n]; var ns = new double[n]; var err = new double[n];
        for (int i = 0; i < n; i++)
        {
            double x = Math.Log(kMin) + (Math.Log(kMax) - Math.Log(kMin)) * i / (n - 1);
            k[i] = Math.Exp(x);
            p[i] = Math.Exp(lnP(x));
            ns[i] = 1 + slope(x);
            err[i] = relError;
        }
        return new ObservablesSource([.. k], [.. p], [.. ns], [.. err], kk => 10 + Math.Log(kk), 80.0, pivot ?? Pivot()); // exit N = 10 + ln k: a stand-in, not physics
    }

    /// <summary>P_s = A exp(-ln^2(k/kp) / (2 Delta^2)) / (sqrt(2 pi) Delta): A delta(ln(k/kp)) as Delta -> 0. Sampled over +-12 Delta.</summary>
    public static ObservablesSource LogNormal(double amplitude, double kPeak, double width, int n = 241, double relError = 0)
    {
        double norm = Math.Log(amplitude / (Math.Sqrt(2 * Math.PI) * width));
        double lp = Math.Log(kPeak);
        return FromLog(x => norm - (x - lp) * (x - lp) / (2 * width * width), x => -(x - lp) / (width * width),
            kPeak * Math.Exp(-12 * width), kPeak * Math.Exp(12 * width), n, relError);
    }

    /// <summary>Constant P_s = A on [kMin, kMax].</summary>
    public static ObservablesSource Flat(double amplitude, double kMin, double kMax) =>
        FromLog(_ => Math.Log(amplitude), _ => 0, kMin, kMax, 50);
}
