using ModeSolver.Numerics;
using ModeSolver.Tests.Background;

namespace ModeSolver.Tests.Bispectrum;

/// <summary>
/// A change of slope smoothed over a field width <c>width</c>, with a curvature <c>mu</c>:
/// V = V0 + A_minus (phi - phi0) + (A_plus - A_minus) (width/2) [u + ln cosh u] + (mu/2) (phi - phi0)^2, u = (phi - phi0)/width,
/// so V_phi = A_minus + (A_plus - A_minus)(1 + tanh u)/2 + mu (phi - phi0). With A_minus far below A_plus the field brakes
/// into a transient ultra-slow-roll phase (e2 near -6) and then rejoins slow roll. Test theory only.
/// </summary>
internal sealed class SmoothKink(double v0, double aPlus, double aMinus, double phi0, double width, double mu) : CanonicalTheory
{
    public override string Description => "smoothed change of slope";

    public override Jet3 Potential(double phi)
    {
        double x = phi - phi0, u = x / width, t = Math.Tanh(u), s2 = 1 - t * t, da = aPlus - aMinus;
        double lnCosh = Math.Abs(u) + Math.Log(1 + Math.Exp(-2 * Math.Abs(u))) - Math.Log(2);
        return new(v0 + aMinus * x + da * 0.5 * width * (u + lnCosh) + 0.5 * mu * x * x,
            aMinus + da * 0.5 * (1 + t) + mu * x,
            da * 0.5 * s2 / width + mu,
            -da * s2 * t / (width * width));
    }
}
