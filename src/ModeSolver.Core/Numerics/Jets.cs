namespace ModeSolver.Numerics;

/// <summary>
/// A function of the field and its first three derivatives at one point: f, f', f'', f'''.
/// Produced by exact (automatic) differentiation, never by finite differences.
/// </summary>
public readonly record struct Jet3(double Value, double D1, double D2, double D3)
{
    /// <summary>The constant function c.</summary>
    public static Jet3 Constant(double c) => new(c, 0, 0, 0);
}

/// <summary>A smooth-by-pieces function of the field with exact derivatives.</summary>
public interface IFieldFunction
{
    /// <summary>f and its derivatives at <paramref name="phi"/>. Allocation-free.</summary>
    Jet3 Evaluate(double phi);

    /// <summary>Field values where f or one of its first three derivatives is not continuous (kinks, steps), sorted ascending.</summary>
    IReadOnlyList<double> NonSmoothPoints { get; }
}

/// <summary>Two jets from one fused evaluation: the Einstein-frame V and K of a theory at one field value.</summary>
public readonly record struct JetPair(Jet3 Potential, Jet3 Kinetic);
