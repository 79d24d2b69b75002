using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Estimates;

namespace ModeSolver.Matching;

/// <summary>
/// P_s from the second-order Hubble-flow formula (physics.md 4c) evaluated where k = aH. Exactly proportional to the
/// V scale at fixed k and N. Stands in until the exact mode solver supplies the amplitude.
/// </summary>
public sealed class SlowRollAmplitude : IPivotAmplitude
{
    /// <inheritdoc/>
    public string Name => "slow-roll-2";

    /// <inheritdoc/>
    public double ScalarPower(IBackground background, double kBackgroundUnits)
    {
        double n = HorizonExit.Find(background, kBackgroundUnits);
        return SlowRoll.HubbleSecondOrder(background.At(n)).Ps;
    }
}
