namespace ModeSolver.Integrators;

/// <summary>
/// Constants of the 3-stage Radau IIA method of order 5 (Hairer and Wanner, Solving Ordinary Differential
/// Equations II, 2nd ed., sec. IV.8): nodes c = ((4 - sqrt6)/10, (4 + sqrt6)/10, 1).
/// </summary>
internal static class Radau5Coefficients
{
    public const double Sqrt6 = 2.449489742783178098197284074705891391965947480656670128432692567250960377457315026539859433104640235;
    public const double C1 = (4.0 - Sqrt6) / 10.0;
    public const double C2 = (4.0 + Sqrt6) / 10.0;
}
