using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Estimates;
using ModeSolver.Results;

namespace ModeSolver.Matching;

/// <summary>The matched and normalised pivot. Energies in reduced Planck units unless the name says GeV.</summary>
/// <param name="KPivot">k_* in 1/Mpc.</param>
/// <param name="NStar">E-folds between the pivot's horizon exit and the end of inflation.</param>
/// <param name="NPivot">N coordinate of the pivot's horizon exit in the background's e-folds (see <see cref="BackgroundSolution.Origin"/>).</param>
/// <param name="VScale">Factor multiplying the theory's potential.</param>
/// <param name="LnKUnit">k[background units] = k[1/Mpc] * exp(LnKUnit) (a = e^N in the background, a_0 = 1 today).</param>
/// <param name="HStar">H at the pivot, M_pl.</param>
/// <param name="HStarGeV">H at the pivot, GeV.</param>
/// <param name="PhiStar">Field at the pivot (user's field).</param>
/// <param name="VStarQuarterGeV">V_*^(1/4) in GeV.</param>
/// <param name="NTotal">E-folds of inflation in the background.</param>
/// <param name="NReh">E-folds of reheating (NaN when N_* was given).</param>
/// <param name="TRehGeV">Reheating temperature used, GeV (NaN when N_* was given).</param>
/// <param name="W">Reheating equation of state (NaN when N_* was given).</param>
/// <param name="RhoEnd">Energy density at the end of inflation, 3 H_end^2, M_pl^4.</param>
/// <param name="KMinMpc">Smallest k (1/Mpc) the background serves at the chosen depths.</param>
/// <param name="KMaxMpc">Largest k (1/Mpc) the background serves at the chosen depths.</param>
/// <param name="Iterations">Amplitude evaluations used (one with N_* given; each is one exact or slow-roll P_s and one rescaling).</param>
/// <param name="AmplitudeName">Name of the amplitude provider ("none" without normalisation).</param>
/// <param name="PsPivot">P_s at the pivot from the provider (the target when normalised).</param>
/// <param name="Background">The background with the matched V scale.</param>
/// <param name="PivotSlowRoll">Slow-roll estimates at the pivot.</param>
public sealed record PivotSolution(
    double KPivot, double NStar, double NPivot, double VScale, double LnKUnit,
    double HStar, double HStarGeV, double PhiStar, double VStarQuarterGeV,
    double NTotal, double NReh, double TRehGeV, double W, double RhoEnd,
    double KMinMpc, double KMaxMpc, int Iterations, string AmplitudeName, double PsPivot,
    BackgroundSolution Background, SlowRollSet PivotSlowRoll)
{
    /// <summary>The solution of a match on <paramref name="background"/> (the view at the matched scale).</summary>
    public static PivotSolution From(PivotMatch m, BackgroundSolution background, SlowRollSet slowRoll)
    {
        ArgumentNullException.ThrowIfNull(m);
        return new PivotSolution(m.KPivot, m.NStar, m.NPivot, m.VScale, m.LnKUnit, m.HStar, m.HStarGeV, m.PhiStar, m.VStarQuarterGeV,
            m.NTotal, m.NReh, m.TRehGeV, m.W, m.RhoEnd, m.KMinMpc, m.KMaxMpc, m.Iterations, m.AmplitudeName, m.PsPivot, background, slowRoll);
    }

    /// <summary>Converts k from 1/Mpc to background units.</summary>
    public double ToBackgroundUnits(double kMpc) => kMpc * Math.Exp(LnKUnit);

    /// <summary>Converts k from background units to 1/Mpc.</summary>
    public double ToInverseMpc(double kBackground) => kBackground * Math.Exp(-LnKUnit);

    /// <summary>The numbers of the match without the background.</summary>
    public PivotMatch Numbers => new(KPivot, NStar, NPivot, VScale, LnKUnit, HStar, HStarGeV, PhiStar, VStarQuarterGeV,
        NTotal, NReh, TRehGeV, W, RhoEnd, KMinMpc, KMaxMpc, Iterations, AmplitudeName, PsPivot);
}

/// <summary>
/// The numbers of a pivot match without the background (<see cref="PivotMatcher.MatchAny"/>); the parameters are those
/// of <see cref="PivotSolution"/> of the same names. <see cref="PhiStar"/> is the background point's field value (the
/// first field for n fields).
/// </summary>
public sealed record PivotMatch(
    double KPivot, double NStar, double NPivot, double VScale, double LnKUnit,
    double HStar, double HStarGeV, double PhiStar, double VStarQuarterGeV,
    double NTotal, double NReh, double TRehGeV, double W, double RhoEnd,
    double KMinMpc, double KMaxMpc, int Iterations, string AmplitudeName, double PsPivot)
{
    /// <summary>Converts k from 1/Mpc to background units.</summary>
    public double ToBackgroundUnits(double kMpc) => kMpc * Math.Exp(LnKUnit);

    /// <summary>Converts k from background units to 1/Mpc.</summary>
    public double ToInverseMpc(double kBackground) => kBackground * Math.Exp(-LnKUnit);
}
