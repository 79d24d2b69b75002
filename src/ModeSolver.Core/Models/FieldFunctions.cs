namespace ModeSolver.Models;

/// <summary>
/// An inflaton theory in the Einstein frame: S = int sqrt(-g) [R/2 - K(phi)(d phi)^2/2 - V(phi)], reduced Planck units.
/// phi is the field as the user wrote it (for a Jordan-frame input, the Jordan-frame field); K carries the frame change.
/// </summary>
public interface IInflatonTheory
{
    /// <summary>One-line human description, e.g. the formula or catalogue name.</summary>
    string Description { get; }

    /// <summary>V(phi) and dV/dphi, d2V/dphi2, d3V/dphi3 (Einstein frame, unscaled).</summary>
    Jet3 Potential(double phi);

    /// <summary>K(phi) and its derivatives; (1, 0, 0, 0) for a canonical field.</summary>
    Jet3 Kinetic(double phi);

    /// <summary>V and K at <paramref name="phi"/> in one call; a theory may fuse the two evaluations (the Jordan frame on generated code does).</summary>
    JetPair Jets(double phi) => new(Potential(phi), Kinetic(phi));

    /// <summary>True when K is identically 1.</summary>
    bool IsCanonical { get; }

    /// <summary>Field values where V or K is not smooth; the background stops and restarts exactly there. Sorted ascending.</summary>
    IReadOnlyList<double> NonSmoothPoints { get; }

    /// <summary>The range of phi on which the theory is valid (e.g. inside the pole of K, or where Omega^2 &gt; 0); infinite when unrestricted.</summary>
    (double Min, double Max) ValidRange { get; }
}

