using MathNet.Numerics;
using ModeSolver.Observables;

namespace ModeSolver.Tests.Observables;

public class PbhTests
{
    /// <summary>
    /// Press-Schechter beta of a monochromatic spectrum P_s = A delta(ln(k/k_p)) with the Gaussian window
    /// W(x) = exp(-x^2/4) (physics.md section 9; Sasaki, Suyama, Tanaka &amp; Yokoyama 2018, CQG 35, 063001):
    /// sigma^2(R = 1/k_H) = (16/81) x^4 exp(-x^2/2) A with x = k_p/k_H, beta = erfc(delta_c / (sqrt 2 sigma)).
    /// Written out here from the formulas, independently of the library.
    /// </summary>
    private static double ClosedFormBeta(double a, double x, double deltaC)
    {
        double sigma2 = 16.0 / 81.0 * Math.Pow(x, 4) * Math.Exp(-x * x / 2) * a;
        return SpecialFunctions.Erfc(deltaC / Math.Sqrt(2 * sigma2));
    }

    [Theory]
    [InlineData(0.7)]
    [InlineData(1.0)]
    [InlineData(2.0)]
    [InlineData(2.8)]
    public void MonochromaticPeakMatchesTheClosedFormPressSchechterBeta(double x)
    {
        // A log-normal of width Delta tends to A delta(ln(k/k_p)); sigma^2 then differs from the closed form at second
        // order in Delta, and so does the exponent ln beta (beta itself carries that error times delta_c^2 / (2 sigma^2),
        // up to ~100 here). Measured: ln beta within 6e-4 (relative) of the closed form at Delta = 0.01, four times closer
        // than at 0.02.
        double a = 0.02, kp = 1e12, deltaC = 0.41;
        double kH = kp / x;
        double expected = Math.Log(ClosedFormBeta(a, x, deltaC));
        double Dev(double width)
        {
            var s = TestSpectra.LogNormal(a, kp, width);
            var q = PrimordialBlackHoles.SigmaSquared(s, kH, PbhWindow.Gaussian, kp);
            Assert.True(q.Converged, $"Delta {width}: sigma^2 quadrature did not converge");
            double lnBeta = Math.Log(PrimordialBlackHoles.Beta(Math.Sqrt(q.Value), deltaC));
            return Math.Abs(lnBeta / expected - 1);
        }
        double d2 = Dev(0.02), d1 = Dev(0.01);
        Assert.True(d1 < 1e-3, $"x = {x}: ln beta deviates by {d1} (relative) from the closed form {expected} at Delta = 0.01");
        Assert.True(d1 < 0.4 * d2, $"x = {x}: deviation {d1} at Delta = 0.01 is not well below {d2} at 0.02");
    }

    [Fact]
    public void TableBetaAtTheHorizonScaleOfTheTableMatchesTheClosedForm()
    {
        // The beta(M) table of a run on a narrow peak: every entry against the closed form at its own x = k_p / k_H.
        double a = 0.02, kp = 1e12, deltaC = 0.41;
        var s = TestSpectra.LogNormal(a, kp, 0.005, n: 481);
        var settings = ObservablesSettings.Default with { Pbh = true, DeltaC = deltaC, PbhPointsPerDecade = 10 };
        var res = PrimordialBlackHoles.Compute(s, settings, kp / 3, kp * 1.5, kp);
        int compared = 0;
        for (int i = 0; i < res.KHorizon.Length; i++)
        {
            double expected = ClosedFormBeta(a, kp / res.KHorizon[i], deltaC);
            if (!(expected > 1e-280)) continue;
            Assert.True(Math.Abs(Math.Log(res.Beta[i]) / Math.Log(expected) - 1) < 1e-3, $"k_H = {res.KHorizon[i]:G4}: beta {res.Beta[i]:G6} vs {expected:G6}");
            compared++;
        }
        Assert.True(compared >= 3, $"only {compared} table entries were comparable");
    }

    [Fact]
    public void AbundanceFallsAsTheThresholdRises()
    {
        // beta = erfc(delta_c / (sqrt 2 sigma)) falls with delta_c at every sigma (physics.md section 9), so must f_PBH.
        var s = TestSpectra.LogNormal(0.02, 1e12, 0.3);
        double last = double.PositiveInfinity;
        double[]? lastTable = null;
        foreach (double deltaC in new[] { 0.35, 0.41, 0.45, 0.5, 0.6 })
        {
            var settings = ObservablesSettings.Default with { Pbh = true, DeltaC = deltaC };
            var res = PrimordialBlackHoles.Compute(s, settings, 1e9, s.KMax, 1e12);
            Assert.True(res.FTotal > 0, $"delta_c {deltaC}: f_PBH = {res.FTotal}");
            Assert.True(res.FTotal < last, $"delta_c {deltaC}: f_PBH = {res.FTotal} is not below {last}");
            Assert.True(res.DlnFDlnDeltaC < 0, $"delta_c {deltaC}: d ln f / d ln delta_c = {res.DlnFDlnDeltaC}");
            if (lastTable is not null)
                for (int i = 0; i < lastTable.Length; i++)
                    Assert.True(res.FPbh[i] <= lastTable[i], $"delta_c {deltaC}, entry {i}: {res.FPbh[i]} above {lastTable[i]}");
            last = res.FTotal;
            lastTable = [.. res.FPbh];
        }
    }

    [Theory]
    [InlineData(2.9e5, 10.75, 0.2)]
    [InlineData(1e12, 106.75, 0.2)]
    [InlineData(3e7, 106.75, 0.5)]
    public void MassOfTheHorizonScaleFollowsItsFormula(double k, double g, double gamma)
    {
        // M = gamma M_H with M_H = (4 pi / 3) rho (c/H)^3 = c^3 / (2 G H) at re-entry, c k = a H, in SI units, with H from
        // the Friedmann equation of the radiation era, H = H_100 h sqrt(Omega_r,0 (g/g_0)(g_s0/g)^(4/3)) / a^2, and
        // Omega_r,0 h^2 from the radiation constant a_r T_0^4 with three massless neutrinos. Constants: CODATA 2018
        // (G, c, a_r), T_0 = 2.7255 K (Fixsen 2009), M_sun = 1.98841e30 kg (from memory). An independent route to the
        // library's GeV-unit formula.
        const double c = 299792458, bigG = 6.67430e-11, aRad = 7.565723e-16, mpc = 3.0856775814913673e22, sun = 1.98841e30;
        double h100 = 1e5 / mpc;
        double neutrinos = 1 + 3 * 7.0 / 8.0 * Math.Pow(4.0 / 11.0, 4.0 / 3.0);
        double omegaR = neutrinos * aRad * Math.Pow(2.7255, 4) / (3 * h100 * h100 * c * c / (8 * Math.PI * bigG));
        double g0 = 2 + 7.0 / 8.0 * 6 * Math.Pow(4.0 / 11.0, 4.0 / 3.0), gs0 = 2 + 7.0 / 8.0 * 6 * 4.0 / 11.0;
        double growth = g / g0 * Math.Pow(gs0 / g, 4.0 / 3.0);
        double kSi = k / mpc;
        double hubble = c * c * kSi * kSi / (h100 * Math.Sqrt(omegaR * growth));
        double expected = gamma * c * c * c / (2 * bigG * hubble) / sun;

        var settings = ObservablesSettings.Default with { GStar = g, Gamma = gamma };
        double m = PrimordialBlackHoles.Mass(k, settings);
        Assert.True(Math.Abs(m / expected - 1) < 1e-3, $"M({k:G3}) = {m:G6} M_sun vs {expected:G6}");
        // The exact scalings: k^-2, g^(-1/6), gamma.
        Assert.Equal(0.25, PrimordialBlackHoles.Mass(2 * k, settings) / m, 12);
        Assert.Equal(Math.Pow(2, -1.0 / 6), PrimordialBlackHoles.Mass(k, settings with { GStar = 2 * g }) / m, 12);
        Assert.Equal(2.0, PrimordialBlackHoles.Mass(k, settings with { Gamma = 2 * gamma }) / m, 12);
    }

    [Fact]
    public void DefaultThresholdIsTheRadiationValueOfTheAnalyticFormula()
    {
        // delta_c = [3 (1 + w) / (5 + 3 w)] sin^2(pi sqrt(w) / (1 + 3 w)) at w = 1/3 gives 0.414 (Harada, Yoo & Kohri 2013,
        // Phys. Rev. D 88, 084051, from memory); the default is that value to two digits.
        double w = 1.0 / 3.0;
        double formula = 3 * (1 + w) / (5 + 3 * w) * Math.Pow(Math.Sin(Math.PI * Math.Sqrt(w) / (1 + 3 * w)), 2);
        Assert.Equal(Math.Round(formula, 2), ObservablesSettings.Default.DeltaC, 12);
    }
}
