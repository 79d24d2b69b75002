namespace ModeSolver.Models;

/// <summary>
/// One field as the n = 1 case of <see cref="IFieldTheory"/>: an adapter over an <see cref="IInflatonTheory"/> with
/// G_11 = K(phi), G^11 = 1/K, the one Christoffel symbol Gamma = K'/(2K) and no curvature (physics.md section 7).
/// The background solver recognises it and runs the single-field equations on the inner theory directly (the fast path),
/// so a single-field run through the n-field interface gives the same numbers bit for bit.
/// </summary>
public sealed class SingleFieldTheory : IFieldTheory
{
    private readonly FieldSurface[] _nonSmooth;
    private readonly FieldSurface[] _boundaries;
    private static readonly string[] DefaultName = { "phi" };
    private readonly string[] _names;

    /// <summary>Wraps <paramref name="theory"/>; <paramref name="fieldName"/> names the field in messages (default "phi").</summary>
    public SingleFieldTheory(IInflatonTheory theory, string? fieldName = null)
    {
        ArgumentNullException.ThrowIfNull(theory);
        Inner = theory;
        _names = fieldName is null ? DefaultName : new[] { fieldName };
        var points = theory.NonSmoothPoints;
        _nonSmooth = new FieldSurface[points.Count];
        for (int i = 0; i < points.Count; i++)
            _nonSmooth[i] = FieldSurface.Coordinate(0, points[i], SurfaceCrossing.Either, "kink");
        var (lo, hi) = theory.ValidRange;
        var bounds = new List<FieldSurface>(2);
        if (double.IsFinite(lo)) bounds.Add(FieldSurface.Coordinate(0, lo, SurfaceCrossing.Falling, "range-low"));
        if (double.IsFinite(hi)) bounds.Add(FieldSurface.Coordinate(0, hi, SurfaceCrossing.Rising, "range-high"));
        _boundaries = bounds.ToArray();
    }

    /// <summary>The single-field theory this adapts.</summary>
    public IInflatonTheory Inner { get; }

    /// <inheritdoc/>
    public string Description => Inner.Description;

    /// <inheritdoc/>
    public int FieldCount => 1;

    /// <inheritdoc/>
    public IReadOnlyList<string> FieldNames => _names;

    /// <inheritdoc/>
    public double Potential(ReadOnlySpan<double> phi) => Inner.Potential(phi[0]).Value;

    /// <inheritdoc/>
    public double PotentialGradient(ReadOnlySpan<double> phi, Span<double> gradient)
    {
        var v = Inner.Potential(phi[0]);
        gradient[0] = v.D1;
        return v.Value;
    }

    /// <inheritdoc/>
    public void PotentialHessian(ReadOnlySpan<double> phi, Span<double> hessian) => hessian[0] = Inner.Potential(phi[0]).D2;

    /// <inheritdoc/>
    public void Metric(ReadOnlySpan<double> phi, Span<double> metric) => metric[0] = Inner.Kinetic(phi[0]).Value;

    /// <inheritdoc/>
    public bool InverseMetric(ReadOnlySpan<double> phi, Span<double> inverse)
    {
        double k = Inner.Kinetic(phi[0]).Value;
        inverse[0] = 1.0 / k;
        return k > 0;
    }

    /// <inheritdoc/>
    public void Christoffel(ReadOnlySpan<double> phi, Span<double> christoffel)
    {
        var k = Inner.Kinetic(phi[0]);
        christoffel[0] = k.D1 / (2.0 * k.Value);
    }

    /// <inheritdoc/>
    public void Riemann(ReadOnlySpan<double> phi, Span<double> riemann) => riemann[0] = 0.0;

    /// <inheritdoc/>
    public bool IsCanonical => Inner.IsCanonical;

    /// <inheritdoc/>
    public IReadOnlyList<FieldSurface> NonSmoothSurfaces => _nonSmooth;

    /// <inheritdoc/>
    public IReadOnlyList<FieldSurface> Boundaries => _boundaries;
}
