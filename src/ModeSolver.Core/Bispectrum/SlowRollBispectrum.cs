using ModeSolver.Background;

namespace ModeSolver.Bispectrum;

/// <summary>
/// Leading-order slow-roll f_NL in the convention of <see cref="BispectrumSolver"/> (physics.md 8), from Maldacena 2003,
/// JHEP 05, 013, section 4 (the three-point function to first order in the Hubble-flow parameters): equilateral
/// (55/36) e1 + (5/12) e2 at horizon exit of k; squeezed (5/12)(2 e1 + e2), which is (5/12)(1 - n_s) to that order
/// (the consistency relation, exact as k3/k1 -> 0 with the exact n_s of the short modes).
/// Next-order terms are of relative size O(e_n) (a few per cent at N_* ~ 55-60).
/// </summary>
public static class SlowRollBispectrum
{
    /// <summary>Equilateral f_NL = (55/36) e1 + (5/12) e2.</summary>
    public static double Equilateral(double epsilon1, double epsilon2) => 55.0 / 36.0 * epsilon1 + 5.0 / 12.0 * epsilon2;

    /// <summary>Squeezed f_NL = (5/12)(2 e1 + e2).</summary>
    public static double Squeezed(double epsilon1, double epsilon2) => 5.0 / 12.0 * (2.0 * epsilon1 + epsilon2);

    /// <summary>Maldacena's consistency relation f_NL = (5/12)(1 - n_s).</summary>
    public static double Consistency(double ns) => 5.0 / 12.0 * (1.0 - ns);

    /// <summary>The Hubble-flow parameters at horizon exit of <paramref name="k"/> (background units).</summary>
    public static BackgroundPoint AtExit(IBackground background, double k) => background.At(HorizonExit.Find(background, k));
}
