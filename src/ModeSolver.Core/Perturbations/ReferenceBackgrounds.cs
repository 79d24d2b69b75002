using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// Exact power-law inflation (Lucchin &amp; Matarrese 1985, Phys. Rev. D 32, 1316): V = V0 exp(-lambda phi) on its
/// attractor, phi' = lambda, epsilon_1 = lambda^2/2, epsilon_2 = epsilon_3 = 0, H(N) = H0 exp(-epsilon_1 N).
/// Inflation never ends; <see cref="NEnd"/> is the chosen last N. A reference background for the mode solver.
/// </summary>
public sealed class PowerLawBackground : IBackground
{
    private readonly double _lambda;
    private readonly double _h0;
    private readonly double _phi0;

    /// <summary>Creates the solution with slope <paramref name="lambda"/> (0 &lt; lambda &lt; sqrt 2), H(0) = <paramref name="h0"/>, valid on [0, <paramref name="nEnd"/>].</summary>
    public PowerLawBackground(double lambda, double h0, double nEnd, double phi0 = 0.0)
    {
        if (!(lambda > 0 && lambda * lambda < 2)) throw new ArgumentOutOfRangeException(nameof(lambda), lambda, "power-law inflation needs 0 < lambda < sqrt(2)");
        if (!(h0 > 0)) throw new ArgumentOutOfRangeException(nameof(h0), h0, "H0 must be positive");
        if (!(nEnd > 0)) throw new ArgumentOutOfRangeException(nameof(nEnd), nEnd, "nEnd must be positive");
        _lambda = lambda;
        _h0 = h0;
        _phi0 = phi0;
        NEnd = nEnd;
        Epsilon1 = 0.5 * lambda * lambda;
    }

    /// <summary>The constant epsilon_1 = lambda^2/2.</summary>
    public double Epsilon1 { get; }

    /// <summary>H at N = 0.</summary>
    public double H0 => _h0;

    /// <summary>Index of the exact mode functions, nu = 3/2 + e1/(1 - e1).</summary>
    public double Nu => 1.5 + Epsilon1 / (1.0 - Epsilon1);

    /// <summary>V0 of V = V0 exp(-lambda phi) that gives H(0) = H0 at phi0: H^2 = V/(3 - e1).</summary>
    public double V0 => _h0 * _h0 * (3.0 - Epsilon1) * Math.Exp(_lambda * _phi0);

    /// <inheritdoc />
    public double NStart => 0.0;
    /// <inheritdoc />
    public double NStop => NEnd;
    /// <inheritdoc />
    public double NEnd { get; }
    /// <inheritdoc />
    public IReadOnlyList<double> EndCrossings => Array.Empty<double>();
    /// <inheritdoc />
    public IReadOnlyList<double> NonSmoothTimes => Array.Empty<double>();
    /// <inheritdoc />
    public double VScale => 1.0;

    /// <inheritdoc />
    public BackgroundPoint At(double n) =>
        new(n, _phi0 + _lambda * n, _lambda, _h0 * Math.Exp(-Epsilon1 * n), Epsilon1, 0.0, 0.0);

    /// <summary>N where k = aH.</summary>
    public double CrossingN(double k) => Math.Log(k / _h0) / (1.0 - Epsilon1);
}

/// <summary>
/// Exact de Sitter space: H constant, epsilon_n = 0. Only tensor modes exist on it (z = 0); the scalar solver rejects it.
/// Tensor reference: P_t = 2 H^2 / pi^2 (common practice; physics.md 4f).
/// </summary>
public sealed class DeSitterBackground : IBackground
{
    /// <summary>De Sitter with Hubble rate <paramref name="h"/> on [0, <paramref name="nEnd"/>].</summary>
    public DeSitterBackground(double h, double nEnd)
    {
        if (!(h > 0)) throw new ArgumentOutOfRangeException(nameof(h), h, "H must be positive");
        if (!(nEnd > 0)) throw new ArgumentOutOfRangeException(nameof(nEnd), nEnd, "nEnd must be positive");
        H = h;
        NEnd = nEnd;
    }

    /// <summary>The constant Hubble rate.</summary>
    public double H { get; }
    /// <inheritdoc />
    public double NStart => 0.0;
    /// <inheritdoc />
    public double NStop => NEnd;
    /// <inheritdoc />
    public double NEnd { get; }
    /// <inheritdoc />
    public IReadOnlyList<double> EndCrossings => Array.Empty<double>();
    /// <inheritdoc />
    public IReadOnlyList<double> NonSmoothTimes => Array.Empty<double>();
    /// <inheritdoc />
    public double VScale => 1.0;
    /// <inheritdoc />
    public BackgroundPoint At(double n) => new(n, 0.0, 0.0, H, 0.0, 0.0, 0.0);
}
