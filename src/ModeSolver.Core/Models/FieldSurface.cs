using System.Globalization;

namespace ModeSolver.Models;

/// <summary>A scalar function g(phi) of the n field values, allocation-free; reads <paramref name="phi"/> only up to n.</summary>
public delegate double FieldScalar(ReadOnlySpan<double> phi);

/// <summary>Which crossings of g = 0 a <see cref="FieldSurface"/> stands for.</summary>
public enum SurfaceCrossing
{
    /// <summary>Either direction.</summary>
    Either,
    /// <summary>g rising through 0 (the valid side of a boundary is g &lt; 0).</summary>
    Rising,
    /// <summary>g falling through 0 (the valid side of a boundary is g &gt; 0).</summary>
    Falling,
}

/// <summary>
/// A surface g(phi) = 0 in field space: an end of inflation, a non-smooth surface of the theory, or a boundary of its valid
/// region. A coordinate surface phi^I = c (<see cref="Coordinate"/>) is the n-field form of a single field value and keeps
/// the single-field behaviour exactly (g = phi^I - c; the background snaps onto it and restarts one ulp to the side the
/// field moves to); a general surface (<see cref="FromFunction"/>) is located to the integrator's tolerance.
/// </summary>
public sealed class FieldSurface
{
    private readonly FieldScalar? _function;

    private FieldSurface(string name, SurfaceCrossing crossing, int index, double value, FieldScalar? function)
    {
        Name = name;
        Crossing = crossing;
        CoordinateIndex = index;
        CoordinateValue = value;
        _function = function;
    }

    /// <summary>The surface phi^<paramref name="index"/> = <paramref name="value"/>, g = phi^index - value.</summary>
    public static FieldSurface Coordinate(int index, double value, SurfaceCrossing crossing = SurfaceCrossing.Either, string? name = null)
    {
        if (index < 0) throw new ArgumentOutOfRangeException(nameof(index), index, "field index must be non-negative");
        if (!double.IsFinite(value)) throw new ArgumentOutOfRangeException(nameof(value), value, "a coordinate surface needs a finite value");
        return new FieldSurface(name ?? string.Create(CultureInfo.InvariantCulture, $"phi[{index}] = {value:G6}"), crossing, index, value, null);
    }

    /// <summary>The surface <paramref name="function"/>(phi) = 0.</summary>
    public static FieldSurface FromFunction(string name, FieldScalar function, SurfaceCrossing crossing = SurfaceCrossing.Either)
    {
        ArgumentNullException.ThrowIfNull(function);
        return new FieldSurface(name ?? "g(phi) = 0", crossing, -1, double.NaN, function);
    }

    /// <summary>One-line description for messages.</summary>
    public string Name { get; }

    /// <summary>Which crossings count.</summary>
    public SurfaceCrossing Crossing { get; }

    /// <summary>The field index of a coordinate surface; -1 for a general one.</summary>
    public int CoordinateIndex { get; }

    /// <summary>The value c of a coordinate surface phi^I = c; NaN for a general one.</summary>
    public double CoordinateValue { get; }

    /// <summary>True for a coordinate surface phi^I = c.</summary>
    public bool IsCoordinate => CoordinateIndex >= 0;

    /// <summary>g(phi). Allocation-free.</summary>
    public double Value(ReadOnlySpan<double> phi) => _function is null ? phi[CoordinateIndex] - CoordinateValue : _function(phi);

    /// <summary>
    /// True when phi lies on the surface to round-off: |phi^I - c| &lt;= 1e-13 max(1, |c|) for a coordinate surface,
    /// |g| &lt;= 1e-13 for a general one (a restart on the surface does not stop at once again).
    /// </summary>
    public bool Contains(ReadOnlySpan<double> phi)
        => _function is null
            ? Math.Abs(phi[CoordinateIndex] - CoordinateValue) <= 1e-13 * Math.Max(1.0, Math.Abs(CoordinateValue))
            : Math.Abs(_function(phi)) <= 1e-13;

    /// <summary>True when phi lies strictly on the valid side of a boundary (g &gt; 0 for falling, g &lt; 0 for rising crossings).</summary>
    public bool IsInside(ReadOnlySpan<double> phi)
    {
        double g = Value(phi);
        return Crossing switch
        {
            SurfaceCrossing.Falling => g > 0,
            SurfaceCrossing.Rising => g < 0,
            _ => g != 0,
        };
    }
}
