namespace ModeSolver.Integrators;

/// <summary>
/// A truncated Taylor polynomial of order 2 in a parameter lambda: C0 + C1 d + C2 d^2 (C2 = f''/2). Arithmetic
/// on jets carries exact first and second parameter derivatives through a computation (forward automatic
/// differentiation; Griewank &amp; Walther, "Evaluating Derivatives", 2nd ed., SIAM 2008, chapter 13).
/// Allocation-free value type.
/// </summary>
public readonly record struct Jet2(double C0, double C1, double C2)
{
    /// <summary>The constant c.</summary>
    public static Jet2 Constant(double c) => new(c, 0, 0);

    /// <summary>c exp(d) truncated: the jet of a quantity proportional to exp(lambda).</summary>
    public static Jet2 Exponential(double c) => new(c, c, 0.5 * c);

    /// <summary>First derivative f'.</summary>
    public double D1 => C1;

    /// <summary>Second derivative f''.</summary>
    public double D2 => 2.0 * C2;

#pragma warning disable CS1591 // operators: the usual meaning
    public static Jet2 operator +(Jet2 a, Jet2 b) => new(a.C0 + b.C0, a.C1 + b.C1, a.C2 + b.C2);
    public static Jet2 operator -(Jet2 a, Jet2 b) => new(a.C0 - b.C0, a.C1 - b.C1, a.C2 - b.C2);
    public static Jet2 operator -(Jet2 a) => new(-a.C0, -a.C1, -a.C2);
    public static Jet2 operator +(Jet2 a, double b) => new(a.C0 + b, a.C1, a.C2);
    public static Jet2 operator *(double s, Jet2 a) => new(s * a.C0, s * a.C1, s * a.C2);
    public static Jet2 operator *(Jet2 a, Jet2 b) => new(a.C0 * b.C0, a.C0 * b.C1 + a.C1 * b.C0, a.C0 * b.C2 + a.C1 * b.C1 + a.C2 * b.C0);
    public static Jet2 operator /(Jet2 a, Jet2 b)
    {
        double q0 = a.C0 / b.C0;
        double q1 = (a.C1 - b.C1 * q0) / b.C0;
        return new(q0, q1, (a.C2 - b.C1 * q1 - b.C2 * q0) / b.C0);
    }
#pragma warning restore CS1591

    /// <summary>F(a) from F and its first two derivatives at a.C0 (chain rule to second order).</summary>
    public static Jet2 Compose(Jet2 a, double f0, double f1, double f2) => new(f0, f1 * a.C1, f1 * a.C2 + 0.5 * f2 * a.C1 * a.C1);

    /// <summary>sqrt(a), a.C0 &gt; 0.</summary>
    public static Jet2 Sqrt(Jet2 a)
    {
        double s = Math.Sqrt(a.C0), h = 0.5 / s;
        return Compose(a, s, h, -0.5 * h / a.C0);
    }

    /// <summary>a^p for a.C0 &gt; 0.</summary>
    public static Jet2 Pow(Jet2 a, double p)
    {
        double v = Math.Pow(a.C0, p), r = 1.0 / a.C0;
        return Compose(a, v, p * v * r, p * (p - 1) * v * r * r);
    }

    /// <summary>sin(a) and cos(a).</summary>
    public static (Jet2 Sin, Jet2 Cos) SinCos(Jet2 a)
    {
        var (s, c) = Math.SinCos(a.C0);
        return (Compose(a, s, c, -s), Compose(a, c, -s, -c));
    }
}
