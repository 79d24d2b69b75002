namespace ModeSolver.Background;

/// <summary>
/// The homogeneous background at one instant. N = ln a + const: its origin is the start of the integration, or the end of
/// inflation for long backgrounds (<see cref="BackgroundSolution.Origin"/>); M_pl = 1.
/// </summary>
/// <param name="N">E-folds in the background's coordinate (since the start unless the background is long).</param>
/// <param name="Phi">Field value (as the user wrote it).</param>
/// <param name="DPhi">d phi / dN.</param>
/// <param name="H">Hubble rate in reduced Planck units, with the potential multiplied by the current V scale.</param>
/// <param name="Epsilon1">First Hubble-flow parameter, -d ln H / dN = K phi'^2 / 2.</param>
/// <param name="Epsilon2">d ln epsilon_1 / dN.</param>
/// <param name="Epsilon3">d ln |epsilon_2| / dN.</param>
public readonly record struct BackgroundPoint(double N, double Phi, double DPhi, double H, double Epsilon1, double Epsilon2, double Epsilon3);

/// <summary>
/// A dense, interpolable background solution. The perturbation stage reads it only through this interface,
/// so tests may supply exact analytic backgrounds (power-law inflation).
/// </summary>
public interface IBackground
{
    /// <summary>First N of the solution (0, or -N_total for a long background).</summary>
    double NStart { get; }

    /// <summary>Last N of the solution (after the end of inflation when the run continued through reheating).</summary>
    double NStop { get; }

    /// <summary>The N taken as the end of inflation (by default the last epsilon_1 = 1 crossing).</summary>
    double NEnd { get; }

    /// <summary>Every N where epsilon_1 crosses 1, either way, ascending.</summary>
    IReadOnlyList<double> EndCrossings { get; }

    /// <summary>N values where the field passes a non-smooth point of the theory; mode integrations stop and restart there.</summary>
    IReadOnlyList<double> NonSmoothTimes { get; }

    /// <summary>The factor multiplying the theory's potential; H scales as its square root.</summary>
    double VScale { get; }

    /// <summary>The background at N (dense output). Allocation-free.</summary>
    BackgroundPoint At(double n);
}
