using ModeSolver.Background;
using ModeSolver.Bispectrum;
using ModeSolver.Tests.Background;
using ModeSolver.Tests.Perturbations;
using Xunit.Abstractions;

namespace ModeSolver.Tests.Bispectrum;

/// <summary>
/// The linear potential with a change of slope (Starobinsky 1992, JETP Lett. 55, 489; physics.md 4(b)) against its
/// bispectrum in the limit V0 dominant (e1 -> 0), <see cref="KinkReference"/>, derived in docs/bispectrum.md ("The kink
/// reference") because we could not reproduce a published closed form with confidence. The reference is checked
/// independently first (its spectrum against the published closed form, its squeezed limit against Maldacena's consistency
/// relation with the closed form's n_s), then the numerics against it.
/// </summary>
public class BispectrumKinkReferenceTests(ITestOutputHelper log)
{
    private const double APlus = 2e-3, AMinus = 2e-4, D = (AMinus - APlus) / APlus;

    private static readonly Lazy<(BackgroundSolution Bg, double K0)> Kink = new(() =>
    {
        var bg = SpectrumTests.Solve(new LinearKink(1, APlus, AMinus, 0.0), 0.022, phiEnd: -0.0035);
        double nk = Assert.Single(bg.NonSmoothTimes);
        return (bg, Math.Exp(nk) * bg.At(nk).H);
    });

    /// <summary>The numerical f_NL ending 8 e-folds after the kink (as the reference), starting at K/aH = 200 so that the
    /// kink (K/aH = 3 y there for equilateral triangles) is inside the numerical part of the integral.</summary>
    private static BispectrumPoint Numerical(double y1, double y2, double y3)
    {
        var (bg, k0) = Kink.Value;
        double yMax = Math.Max(y1, Math.Max(y2, y3));
        var settings = new BispectrumSettings { StartDepth = 200, EndDepth = yMax * Math.Exp(-8) };
        return new BispectrumSolver(bg, settings).Solve(new Triangle(y1 * k0, y2 * k0, y3 * k0));
    }

    [Fact]
    public void KinkReference_ModesReproduceTheClosedFormSpectrum()
    {
        // Starobinsky 1992 (physics.md 4(b)): the closed form is exact in the de Sitter limit, as are the reference's modes;
        // 12 e-folds after the kink the modes are frozen to (k/aH)^2 < 2e-9. Found: agreement to 1.6e-6 at k = k0/20 and
        // better elsewhere (the source of that 1.6e-6 is not understood; it is far below the 1e-4 of the f_NL comparison,
        // and a wrong matching at the kink gives order-one differences). Tolerance 1e-5.
        var r = new KinkReference(D);
        foreach (double y in new[] { 0.05, 0.1, 0.3, 0.7, 1, 1.7, 3, 7, 20 })
        {
            double mine = r.PowerRatio(y, 12), closed = r.ClosedFormPowerRatio(y);
            Assert.True(Math.Abs(mine / closed - 1) < 1e-5, $"y = {y}: P_s from the reference modes {mine:G10}, closed form {closed:G10}");
        }
    }

    [Fact]
    public void KinkReference_SqueezedLimitObeysTheConsistencyRelationWithTheClosedFormNs()
    {
        // An independent check of the derivation: Maldacena's consistency relation (Maldacena 2003, JHEP 05, 013;
        // Creminelli & Zaldarriaga 2004, JCAP 10, 006) f_NL -> (5/12)(1 - n_s(k1)) as k3/k1 -> 0, with n_s from the
        // closed form of P_s (physics.md 4(b)), which the reference does not use. The long mode is outside the horizon at
        // the kink, and the corrections are O((k3/k1)^2) and O((k3/k0)^2) (the long mode's own evolution through the
        // kink): shrinking k3/k1 from 0.01 to 0.003 must cut the discrepancy about 11-fold (at least 5-fold asserted; a
        // wrong sign or factor of a term would leave an O(1) discrepancy that does not shrink).
        var r = new KinkReference(D);
        foreach (double y in new[] { 0.5, 1, 2, 5 })
        {
            double consistency = 5.0 / 12.0 * -r.ClosedFormTilt(y);
            double coarse = r.FNL(y, y, 0.01 * y, 8) - consistency, fine = r.FNL(y, y, 0.003 * y, 8) - consistency;
            log.WriteLine($"y {y}: (5/12)(1 - n_s) = {consistency:G8}, f_NL - that at k3/k1 = 0.01: {coarse:G3}, at 0.003: {fine:G3}");
            Assert.True(Math.Abs(consistency) > 0.3, "the check is not trivial: n_s - 1 is of order one here");
            Assert.True(Math.Abs(fine) < 2e-3 * Math.Max(1, Math.Abs(consistency)), $"y = {y}: squeezed f_NL - (5/12)(1 - n_s) = {fine:G3}");
            Assert.True(Math.Abs(coarse) > 5 * Math.Abs(fine), $"y = {y}: discrepancy {coarse:G3} at 0.01 and {fine:G3} at 0.003 does not converge");
        }
    }

    [Fact]
    public void LinearKink_EquilateralAndSqueezedFNLMatchTheKinkReference()
    {
        // The reference leaves out O(e1) terms (the e1^2 and e1^3 vertices, the change of H, e2 = O(e1) before the kink);
        // e1 = 2e-6 before the kink here. Found: differences up to 1.0e-5 of 1 + |f_NL| for equilateral triangles (at
        // k = k0/2, where P_s dips and f_NL = -7.25) and 4.1e-5 for the squeezed one at k0/2; with both slopes 10x smaller (e1 100x smaller) they fell 50-100x, so they are these
        // e1 terms, not numerical error. Tolerance 1e-4 (1 + |f_NL|) plus the reported numerical error.
        var r = new KinkReference(D);
        (double, double, double)[] triangles =
        [
            (0.05, 0.05, 0.05), (0.2, 0.2, 0.2), (0.5, 0.5, 0.5), (1, 1, 1), (3, 3, 3), (20, 20, 20),
            (0.5, 0.5, 0.0015), (2, 2, 0.006),
        ];
        foreach (var (y1, y2, y3) in triangles)
        {
            double reference = r.FNL(y1, y2, y3, 8);
            var n = Numerical(y1, y2, y3);
            log.WriteLine($"k/k0 = ({y1}, {y2}, {y3}): reference {reference:G8}, numerical {n.FNL:G8} +- {n.Error:G2}, difference {n.FNL - reference:G3}");
            Assert.True(Math.Abs(n.FNL - reference) < 1e-4 * (1 + Math.Abs(reference)) + n.Error,
                $"k/k0 = ({y1}, {y2}, {y3}): numerical f_NL {n.FNL:G8} +- {n.Error:G2}, reference {reference:G8}");
        }
    }
}
