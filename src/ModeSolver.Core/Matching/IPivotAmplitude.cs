using ModeSolver.Background;

namespace ModeSolver.Matching;

/// <summary>
/// Supplies the scalar power P_s at one wavenumber for a given background. The matching stage uses it to
/// normalise the potential; the second-order slow-roll estimate stands in until the exact mode solver is used.
/// </summary>
public interface IPivotAmplitude
{
    /// <summary>Short name for reports ("slow-roll-2" or "exact").</summary>
    string Name { get; }

    /// <summary>P_s(k) where k is in background units (k = a H at horizon crossing, with a = exp(N), H in M_pl).</summary>
    double ScalarPower(IBackground background, double kBackgroundUnits);
}
