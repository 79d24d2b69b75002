using ModeSolver.Background;
using ModeSolver.Perturbations;
using ModeSolver.Spectra;

namespace ModeSolver.Tests.Perturbations;

public class ExtremeDerivativeTests
{
    [Theory]
    [InlineData(1e-4)]
    [InlineData(1e-3)]
    public void TinyEpsilonPowerLaw_TensorIndexHasNoAbsoluteFloor(double lambda)
    {
        // Power law (Lucchin & Matarrese 1985; Lyth & Stewart 1992, physics.md 4a): n_s - 1 = n_t = -2 e1/(1 - e1)
        // exactly, here 1e-8 and 1e-6; before the scale-subtracted blocks n_t carried an absolute error of about 5e-8.
        var bg = new PowerLawBackground(lambda, 1e-5, 80);
        double e1 = bg.Epsilon1, exact = -2 * e1 / (1 - e1);
        double k = 1e-5 * Math.Exp(30 * (1 - e1));
        foreach (double tol in new[] { 1e-5, 1e-6, 1e-7 })
        {
            var pv = PivotValues.Compute(bg, k, tol);
            Assert.True(Math.Abs(pv.Nt - exact) < 2e-3 * Math.Abs(exact), $"n_t {pv.Nt:E6} vs {exact:E6} at tol {tol}");
            Assert.True(Math.Abs(pv.Ns - 1 - exact) < 3e-3 * Math.Abs(exact), $"n_s - 1 {pv.Ns - 1:E6} vs {exact:E6} at tol {tol}");
            Assert.True(Math.Abs(pv.Nt - exact) <= pv.Errors.Nt, $"n_t error {pv.Nt - exact:E2} above its estimate {pv.Errors.Nt:E2}");
            Assert.True(Math.Abs(pv.AlphaS) <= pv.Errors.AlphaS, $"alpha_s {pv.AlphaS:E2} above its estimate {pv.Errors.AlphaS:E2}");
        }
    }

    [Theory]
    [InlineData(-600.0)]
    [InlineData(650.0)]
    public void ModesWorkFarFromTheEfoldOrigin(double offset)
    {
        // The same power-law background (physics.md 4a) with its e-fold origin moved by -600 and +650 e-folds, where
        // the mode amplitude ~ exp(-3N/2) over- or underflowed before the amplitudes were carried relative to the start
        // (k in background units itself must stay a finite double, which limits the origin to about 700 e-folds away).
        var bg = new PowerLawBackground(0.1, 1e-5, 60);
        var shifted = new ShiftedBackground(bg, offset);
        double k = 1e-5 * Math.Exp(20);
        var s = new ModeSettings { Tolerance = 1e-6 };
        var a = new ModeIntegrator().Solve(bg, k, s);
        var b = new ModeIntegrator().Solve(shifted, k * Math.Exp(offset), s);
        Assert.Equal(1.0, b.Ps / a.Ps, 1e-9);
        Assert.Equal(1.0, b.Pt / a.Pt, 1e-9);
        Assert.Equal(a.NsMinusOne, b.NsMinusOne, 1e-9);
        Assert.Equal(a.Nt, b.Nt, 1e-9);
    }

    private sealed class ShiftedBackground(IBackground inner, double offset) : IBackground
    {
        public double NStart => inner.NStart + offset;
        public double NStop => inner.NStop + offset;
        public double NEnd => inner.NEnd + offset;
        public IReadOnlyList<double> EndCrossings => Array.Empty<double>();
        public IReadOnlyList<double> NonSmoothTimes => Array.Empty<double>();
        public double VScale => inner.VScale;
        public BackgroundPoint At(double n) => inner.At(n - offset) with { N = n };
    }
}
