namespace ModeSolver.Models;

/// <summary>
/// An Einstein-frame theory: potential V(phi) and optional non-canonical kinetic function K(phi)
/// (physics.md section 1). Canonical when <c>kinetic</c> is null.
/// </summary>
public sealed class EinsteinFrameTheory : IValidatedTheory
{
    private readonly IFieldFunction _potential;
    private readonly IFieldFunction? _kinetic;
    private readonly double[] _nonSmooth;

    /// <summary>Creates the theory.</summary>
    /// <param name="potential">V(phi), reduced Planck units.</param>
    /// <param name="kinetic">K(phi), or null for K = 1.</param>
    /// <param name="description">One-line description.</param>
    /// <param name="validRange">Declared valid range; infinite when null.</param>
    public EinsteinFrameTheory(IFieldFunction potential, IFieldFunction? kinetic, string description, (double, double)? validRange = null)
    {
        ArgumentNullException.ThrowIfNull(potential);
        _potential = potential;
        _kinetic = kinetic;
        Description = description ?? "";
        ValidRange = validRange ?? (double.NegativeInfinity, double.PositiveInfinity);
        if (!(ValidRange.Min < ValidRange.Max)) throw new ArgumentException("the valid range must have Min < Max", nameof(validRange));
        _nonSmooth = MergeSorted(potential.NonSmoothPoints, kinetic?.NonSmoothPoints);
    }

    /// <inheritdoc/>
    public string Description { get; }

    /// <summary>The potential function as given.</summary>
    public IFieldFunction PotentialFunction => _potential;

    /// <summary>The kinetic function as given (null when canonical).</summary>
    public IFieldFunction? KineticFunction => _kinetic;

    /// <inheritdoc/>
    public Jet3 Potential(double phi) => _potential.Evaluate(phi);

    /// <inheritdoc/>
    public Jet3 Kinetic(double phi) => _kinetic is null ? new Jet3(1, 0, 0, 0) : _kinetic.Evaluate(phi);

    /// <inheritdoc/>
    public JetPair Jets(double phi) => new(_potential.Evaluate(phi), _kinetic is null ? new Jet3(1, 0, 0, 0) : _kinetic.Evaluate(phi));

    /// <inheritdoc/>
    public bool IsCanonical => _kinetic is null;

    /// <inheritdoc/>
    public IReadOnlyList<double> NonSmoothPoints => _nonSmooth;

    /// <inheritdoc/>
    public (double Min, double Max) ValidRange { get; }

    /// <summary>The same theory with another declared valid range.</summary>
    public EinsteinFrameTheory WithValidRange((double, double) range) => new(_potential, _kinetic, Description, range);

    /// <inheritdoc/>
    public string? InvalidReason(double phi) => TheoryValidity.KineticAndPotentialReason(this, phi);

    /// <inheritdoc/>
    public void ValidateRange(double phiFrom, double phiTo) => TheoryValidity.ValidateRange(this, phiFrom, phiTo, "theory");

    /// <inheritdoc/>
    public (double Min, double Max) FindValidInterval(double phiInside, double searchLimit = 1e3) =>
        TheoryValidity.FindValidInterval(this, phiInside, searchLimit);

    internal static double[] MergeSorted(params IReadOnlyList<double>?[] lists)
    {
        var all = new SortedSet<double>();
        foreach (var l in lists)
            if (l is not null)
                foreach (double x in l) all.Add(x);
        return [.. all];
    }
}
