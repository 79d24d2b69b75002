namespace ModeSolver.Bispectrum;

/// <summary>
/// A closed triangle of wavenumbers k1 + k2 + k3 = 0 (magnitudes, background units or 1/Mpc as the caller keeps them).
/// Carries the shape in units of the perimeter K = k1 + k2 + k3 (q_i = k_i / K) and the dot products the cubic vertices need.
/// </summary>
public readonly record struct Triangle
{
    /// <summary>A triangle of the three magnitudes; throws <see cref="ArgumentOutOfRangeException"/> when they do not close.</summary>
    public Triangle(double k1, double k2, double k3)
    {
        if (!(k1 > 0 && k2 > 0 && k3 > 0) || double.IsInfinity(k1 + k2 + k3))
            throw new ArgumentOutOfRangeException(nameof(k1), $"triangle wavenumbers must be positive and finite (got {k1:G6}, {k2:G6}, {k3:G6})");
        double max = Math.Max(k1, Math.Max(k2, k3));
        if (max > (k1 + k2 + k3 - max) * (1 + 1e-12))
            throw new ArgumentOutOfRangeException(nameof(k1), $"wavenumbers {k1:G6}, {k2:G6}, {k3:G6} do not form a triangle (the largest exceeds the sum of the other two)");
        K1 = k1;
        K2 = k2;
        K3 = k3;
    }

    /// <summary>First wavenumber.</summary>
    public double K1 { get; }
    /// <summary>Second wavenumber.</summary>
    public double K2 { get; }
    /// <summary>Third wavenumber.</summary>
    public double K3 { get; }

    /// <summary>The perimeter k1 + k2 + k3: the early-time oscillation of the in-in integrand is exp(i K tau).</summary>
    public double Perimeter => K1 + K2 + K3;

    /// <summary>Largest side (the last mode to leave the horizon).</summary>
    public double Largest => Math.Max(K1, Math.Max(K2, K3));

    /// <summary>Side <paramref name="i"/> (0, 1, 2).</summary>
    public double Side(int i) => i == 0 ? K1 : i == 1 ? K2 : K3;

    /// <summary>An equilateral triangle of side k.</summary>
    public static Triangle Equilateral(double k) => new(k, k, k);

    /// <summary>The isosceles squeezed triangle (k, k, ratio k), ratio in (0, 1].</summary>
    public static Triangle Squeezed(double k, double ratio) => new(k, k, ratio * k);

    /// <summary>The triangle (k1, x2 k1, x3 k1) of the shape plane.</summary>
    public static Triangle Shape(double k1, double x2, double x3) => new(k1, x2 * k1, x3 * k1);
}
