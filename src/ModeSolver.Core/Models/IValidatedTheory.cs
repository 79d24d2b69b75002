namespace ModeSolver.Models;

/// <summary>A theory that can tell where it is valid, and refuse ranges where it is not.</summary>
public interface IValidatedTheory : IInflatonTheory
{
    /// <summary>Null when the theory is usable at phi; otherwise a short reason such as "Omega^2 &lt;= 0".</summary>
    string? InvalidReason(double phi);

    /// <summary>Throws <see cref="TheoryException"/> when the theory is invalid anywhere on [from, to] (dense sampling, then bisection to the boundary).</summary>
    void ValidateRange(double phiFrom, double phiTo);

    /// <summary>The largest interval containing <paramref name="phiInside"/> on which the theory is valid, searched out to |phi| = <paramref name="searchLimit"/>; infinite ends where no boundary was found.</summary>
    (double Min, double Max) FindValidInterval(double phiInside, double searchLimit = 1e3);
}
