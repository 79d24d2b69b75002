namespace ModeSolver.Integrators;

/// <summary>
/// Constants of the 3-stage Radau IIA method of order 5 as implemented by Hairer and Wanner, Solving Ordinary
/// Differential Equations II (2nd ed., Springer 1996), sec. IV.8 and their code RADAU5: nodes
/// c = ((4 - sqrt6)/10, (4 + sqrt6)/10, 1); the transformation T with T^-1 A^-1 T = diag(gamma, [[alpha, -beta],
/// [beta, alpha]]) (A the Radau IIA matrix, Table IV.5.6); the error-estimate weights DD (eq. IV.8.19-8.20).
/// T, T^-1 and the block form are checked in the tests.
/// </summary>
internal static class Radau5Coefficients
{
    public const double Sqrt6 = 2.449489742783178098197284074705891391965947480656670128432692567250960377457315026539859433104640235;
    public const double C1 = (4.0 - Sqrt6) / 10.0;
    public const double C2 = (4.0 + Sqrt6) / 10.0;
    public const double C1M1 = C1 - 1.0;
    public const double C2M1 = C2 - 1.0;
    public const double C1MC2 = C1 - C2;
    public const double DD1 = -(13.0 + 7.0 * Sqrt6) / 3.0;
    public const double DD2 = (-13.0 + 7.0 * Sqrt6) / 3.0;
    public const double DD3 = -1.0 / 3.0;

    /// <summary>Real eigenvalue gamma of A^-1.</summary>
    public static readonly double Gamma;
    /// <summary>Complex pair alpha +- i beta of A^-1.</summary>
    public static readonly double Alpha, Beta;

    public const double T11 = 9.1232394870892942792e-02;
    public const double T12 = -0.14125529502095420843;
    public const double T13 = -3.0029194105147424492e-02;
    public const double T21 = 0.24171793270710701896;
    public const double T22 = 0.20412935229379993199;
    public const double T23 = 0.38294211275726193779;
    public const double T31 = 0.96604818261509293619;
    public const double T32 = 1.0;
    public const double T33 = 0.0;
    public const double TI11 = 4.3255798900631553510;
    public const double TI12 = 0.33919925181580986954;
    public const double TI13 = 0.54177053993587487119;
    public const double TI21 = -4.1787185915519047273;
    public const double TI22 = -0.32768282076106238708;
    public const double TI23 = 0.47662355450055045196;
    public const double TI31 = -0.50287263494578687595;
    public const double TI32 = 2.5719269498556054292;
    public const double TI33 = -0.59603920482822492497;

    static Radau5Coefficients()
    {
        // Eigenvalues of A^-1 in closed form (Hairer and Wanner II, sec. IV.8).
        double c81 = Math.Cbrt(81.0), c9 = Math.Cbrt(9.0);
        double u1 = (6.0 + c81 - c9) / 30.0;
        double alph = (12.0 - c81 + c9) / 60.0;
        double beta = (c81 + c9) * Math.Sqrt(3.0) / 60.0;
        double cno = alph * alph + beta * beta;
        Gamma = 1.0 / u1;
        Alpha = alph / cno;
        Beta = beta / cno;
    }

    /// <summary>The Radau IIA coefficient matrix A (Hairer and Wanner II, Table IV.5.6), row-major; for tests.</summary>
    public static double[] ButcherA() => new[]
    {
        (88 - 7 * Sqrt6) / 360, (296 - 169 * Sqrt6) / 1800, (-2 + 3 * Sqrt6) / 225,
        (296 + 169 * Sqrt6) / 1800, (88 + 7 * Sqrt6) / 360, (-2 - 3 * Sqrt6) / 225,
        (16 - Sqrt6) / 36, (16 + Sqrt6) / 36, 1.0 / 9,
    };
}
