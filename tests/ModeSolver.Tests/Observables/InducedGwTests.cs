using ModeSolver.Observables;

namespace ModeSolver.Tests.Observables;

public class InducedGwTests
{
    /// <summary>
    /// Omega_GW of P_s = A delta(ln(k/k_p)) in radiation domination, kappa = k/k_p, written out as in Kohri &amp; Terada
    /// 2018 (Phys. Rev. D 97, 123532, the monochromatic spectrum); re-derived here independently from the kernel of
    /// physics.md section 9 by setting u = v = 1/kappa.
    /// </summary>
    private static double KohriTeradaDelta(double a, double kappa)
    {
        if (kappa >= 2) return 0;
        double k2 = kappa * kappa;
        double b = 3 * k2 - 2;
        double log = Math.Log(Math.Abs(1 - 4 / (3 * k2)));
        double res = 3 * kappa < 2 * Math.Sqrt(3) ? Math.PI * Math.PI * b * b : 0;
        return 3 * a * a / 64 * Math.Pow((4 - k2) / 4, 2) * k2 * b * b * (res + Math.Pow(4 + b * log, 2));
    }

    [Theory]
    [InlineData(0.1)]
    [InlineData(0.5)]
    [InlineData(0.9)]
    [InlineData(1.1)]
    [InlineData(1.2)]
    [InlineData(1.6)]
    [InlineData(1.95)]
    public void DiracDeltaPeakMatchesTheClosedForm(double kappa)
    {
        // Kohri & Terada 2018, monochromatic spectrum (closed form above): the library's kernel on the diagonal.
        double a = 1e-2;
        double expected = KohriTeradaDelta(a, kappa);
        double got = InducedGravitationalWaves.DiracDelta(a, kappa);
        Assert.True(Math.Abs(got / expected - 1) < 1e-12, $"kappa {kappa}: {got} vs {expected}");
        Assert.Equal(0.0, InducedGravitationalWaves.DiracDelta(a, 2.01));
    }

    [Theory]
    [InlineData(0.5)]
    [InlineData(0.9)]
    [InlineData(1.5)]
    public void NarrowLogNormalReachesTheDiracDeltaLimit(double kappa)
    {
        // Kohri & Terada 2018: a log-normal of width Delta tends to the monochromatic result as Delta -> 0. Away from the
        // resonance kappa = 2/sqrt3 and the cut-off kappa = 2 the difference falls with Delta; measured here about
        // 1e-2 at Delta = 0.02 and 4 times smaller at Delta = 0.01 (second order in Delta).
        double a = 1e-2, kp = 1e12;
        double limit = KohriTeradaDelta(a, kappa);
        double Dev(double width)
        {
            var s = TestSpectra.LogNormal(a, kp, width);
            var r = InducedGravitationalWaves.OmegaRadiation(s.PsAt, kappa * kp, s.KMin, s.KMax, kp, 1e-6);
            Assert.True(r.Converged, $"Delta {width}: not converged");
            Assert.True(r.Error < 1e-4 * r.Value, $"Delta {width}: error {r.Error} of {r.Value}");
            return Math.Abs(r.Value / limit - 1);
        }
        double d2 = Dev(0.02), d1 = Dev(0.01);
        Assert.True(d1 < 0.02, $"kappa {kappa}: relative deviation {d1} at Delta = 0.01");
        Assert.True(d1 < 0.5 * d2, $"kappa {kappa}: deviation {d1} at Delta = 0.01 is not well below {d2} at 0.02");
    }

    [Fact]
    public void OmegaScalesAsTheSquareOfTheAmplitude()
    {
        // Omega_GW is quadratic in P_s (physics.md section 9, second order in zeta).
        double kp = 1e10;
        var s1 = TestSpectra.LogNormal(1e-3, kp, 0.5);
        var s2 = TestSpectra.LogNormal(3e-3, kp, 0.5);
        foreach (double kappa in new[] { 0.05, 0.7, 1.3 })
        {
            var r1 = InducedGravitationalWaves.OmegaRadiation(s1.PsAt, kappa * kp, s1.KMin, s1.KMax, kp, 1e-6);
            var r2 = InducedGravitationalWaves.OmegaRadiation(s2.PsAt, kappa * kp, s2.KMin, s2.KMax, kp, 1e-6);
            Assert.True(Math.Abs(r2.Value / r1.Value / 9 - 1) < 1e-9, $"kappa {kappa}: ratio {r2.Value / r1.Value}");
        }
    }

    [Fact]
    public void ScaleInvariantSpectrumGivesThePlateau()
    {
        // Constant P_s = A: Omega_GW = 0.8222 A^2, the plateau of the radiation-era kernel integral (Kohri & Terada 2018,
        // Phys. Rev. D 97, 123532, from memory; physics.md section 9 has the same value from an independent quadrature).
        // Quoted to four decimals, so the computed constant must lie within 5e-5 of it. The spectrum spans 1e-6 k to
        // 1e6 k, so the truncation is negligible. Converged is the quadrature's own report: it is false when the interval
        // budget runs out before the tolerance (see QuadratureTests.ExhaustedBudgetIsReportedAsNotConverged), e.g. here
        // at a relative tolerance of 1e-13.
        double a = 2e-3, k = 1.0;
        var s = TestSpectra.Flat(a, 1e-6 * k, 1e6 * k);
        var r = InducedGravitationalWaves.OmegaRadiation(s.PsAt, k, s.KMin, s.KMax, double.NaN, 1e-6);
        double c = r.Value / (a * a);
        Assert.True(r.Converged, $"not converged: {c} +- {r.Error / (a * a)}");
        Assert.True(Math.Abs(c - 0.8222) < 5e-5, $"plateau constant {c}, error {r.Error / (a * a)}");
        Assert.True(r.Error / (a * a) < 1e-5, $"error estimate {r.Error / (a * a)}");
    }

    [Theory]
    [InlineData(0.3, 0.9)]
    [InlineData(0.8, 1.2)]
    [InlineData(1.5, 2.1)]
    [InlineData(0.05, 1.02)]
    [InlineData(4.0, 4.5)]
    [InlineData(0.6, 1.1)]
    public void KernelInTheRotatedVariablesEqualsTheWrittenOutKernel(double u, double v)
    {
        // The (t, s) form the quadrature uses against the kernel exactly as written in physics.md section 9 (from
        // Kohri & Terada 2018 and Espinosa, Racco & Riotto 2018), typed out again here.
        double w = u * u + v * v - 3;
        double bracket = (4 * v * v - Math.Pow(1 + v * v - u * u, 2)) / (4 * u * v);
        double j = Math.Pow(3 * w / (4 * Math.Pow(u, 3) * Math.Pow(v, 3)), 2)
                   * (Math.Pow(-4 * u * v + w * Math.Log(Math.Abs((3 - Math.Pow(u + v, 2)) / (3 - Math.Pow(u - v, 2)))), 2)
                      + (u + v > Math.Sqrt(3) ? Math.PI * Math.PI * w * w : 0));
        double expected = bracket * bracket * j / 12;
        double got = InducedGravitationalWaves.KernelTS(u + v - 1, u - v);
        Assert.True(Math.Abs(got / expected - 1) < 1e-10, $"({u}, {v}): {got} vs {expected}");
    }

    [Fact]
    public void KernelStaysFiniteOnTheResonance()
    {
        // u + v = sqrt 3 is an integrable log singularity; a node that rounds onto it must not give infinity.
        double t = Math.Sqrt(3) - 1;
        for (int i = 0; i < 8; i++) t = Math.BitDecrement(t);
        for (int i = 0; i < 16; i++, t = Math.BitIncrement(t))
        {
            double kval = InducedGravitationalWaves.KernelTS(t, 0.3);
            Assert.True(double.IsFinite(kval) && kval > 0, $"t = {t:R}: kernel {kval}");
        }
    }

    [Fact]
    public void QuadratureErrorEstimateBoundsTheTrueError()
    {
        // The error estimate at a loose tolerance must cover the difference to a tight-tolerance result.
        double kp = 1e10;
        var s = TestSpectra.LogNormal(1e-2, kp, 0.3);
        foreach (double kappa in new[] { 0.1, 1.0, 1.15, 1.9 })
        {
            var loose = InducedGravitationalWaves.OmegaRadiation(s.PsAt, kappa * kp, s.KMin, s.KMax, kp, 1e-3);
            var tight = InducedGravitationalWaves.OmegaRadiation(s.PsAt, kappa * kp, s.KMin, s.KMax, kp, 1e-9);
            Assert.True(Math.Abs(loose.Value - tight.Value) <= loose.Error, $"kappa {kappa}: |{loose.Value} - {tight.Value}| > {loose.Error}");
        }
    }
}
