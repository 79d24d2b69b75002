namespace ModeSolver.Models;

/// <summary>A theory that cannot be used where it was asked for (Omega^2 &lt;= 0, K &lt;= 0, V not finite...). One-line message.</summary>
public sealed class TheoryException : Exception
{
    /// <summary>Creates the exception with a one-line message.</summary>
    public TheoryException(string message) : base(message) { }

    /// <summary>Field value where the problem was found, when there is one.</summary>
    public double? Phi { get; init; }
}

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

/// <summary>Shared scanning logic for <see cref="IValidatedTheory"/> implementations.</summary>
internal static class TheoryValidity
{
    /// <summary>Samples used by <see cref="ValidateRange"/>.</summary>
    public const int ScanSamples = 4000;

    public static string? KineticAndPotentialReason(IInflatonTheory theory, double phi)
    {
        var k = theory.Kinetic(phi);
        if (double.IsNaN(k.Value) || k.Value <= 0) return "K <= 0";
        if (!double.IsFinite(k.Value)) return "K is not finite";
        var v = theory.Potential(phi);
        if (!double.IsFinite(v.Value)) return "V is not finite";
        if (!double.IsFinite(v.D1) || !double.IsFinite(k.D1)) return "V' or K' is not finite";
        return null;
    }

    public static void ValidateRange(IValidatedTheory theory, double from, double to, string what)
    {
        if (!double.IsFinite(from) || !double.IsFinite(to))
            throw new TheoryException($"the field range [{F(from)}, {F(to)}] is not finite");
        var (lo, hi) = theory.ValidRange;
        string? reason = theory.InvalidReason(from);
        if (reason is null && (from < lo || from > hi)) reason = "outside the declared valid range";
        if (reason is not null)
            throw new TheoryException($"{reason} at phi = {F(from)}: the {what} is not valid there; choose a range that starts where it is valid") { Phi = from };
        double prev = from;
        for (int i = 1; i <= ScanSamples; i++)
        {
            double x = i == ScanSamples ? to : from + (to - from) * i / ScanSamples;
            string? r = theory.InvalidReason(x);
            if (r is null && (x < lo || x > hi)) r = "outside the declared valid range";
            if (r is not null)
            {
                double edge = Bisect(theory, prev, x);
                throw new TheoryException($"{r} at phi = {F(edge)}: the {what} is not valid there; start inside {Interval(theory.FindValidInterval(from))}") { Phi = edge };
            }
            prev = x;
        }
    }

    public static (double, double) FindValidInterval(IValidatedTheory theory, double phiInside, double searchLimit)
    {
        if (theory.InvalidReason(phiInside) is { } reason)
            throw new TheoryException($"{reason} at phi = {F(phiInside)}: the theory is not valid there") { Phi = phiInside };
        return (Walk(theory, phiInside, -1, searchLimit), Walk(theory, phiInside, +1, searchLimit));
    }

    private static double Walk(IValidatedTheory theory, double start, int dir, double limit)
    {
        double x = start;
        while (Math.Abs(x) <= limit)
        {
            double step = 0.005 * Math.Max(1.0, Math.Abs(x));
            double next = x + dir * step;
            if (theory.InvalidReason(next) is not null) return Bisect(theory, x, next);
            x = next;
        }
        return dir < 0 ? double.NegativeInfinity : double.PositiveInfinity;
    }

    /// <summary>Between a valid point and an invalid one, returns the last valid point (to about 1e-13 relative).</summary>
    private static double Bisect(IValidatedTheory theory, double valid, double invalid)
    {
        for (int i = 0; i < 200; i++)
        {
            double mid = 0.5 * (valid + invalid);
            if (mid == valid || mid == invalid) break;
            if (Math.Abs(invalid - valid) <= 1e-13 * Math.Max(1.0, Math.Abs(mid))) break;
            if (theory.InvalidReason(mid) is null) valid = mid; else invalid = mid;
        }
        return valid;
    }

    public static string Interval((double Min, double Max) r) => $"({F(r.Min)}, {F(r.Max)})";

    public static string F(double x) => x switch
    {
        double.PositiveInfinity => "inf",
        double.NegativeInfinity => "-inf",
        _ => x.ToString("G6", System.Globalization.CultureInfo.InvariantCulture),
    };
}
