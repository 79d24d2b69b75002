namespace ModeSolver.Models;

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
        double prev = from, prevPrev = double.NaN;
        double ik = InverseK(theory, from), ikPrev = double.NaN;
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
            double ikx = InverseK(theory, x);
            if (i >= 2 && PoleNear(theory, prevPrev, prev, x, ikPrev, ik, ikx) is double pole)
                throw new TheoryException($"K diverges at phi = {F(pole)}: the {what} is not valid there; start inside {Interval(theory.FindValidInterval(from))}") { Phi = pole };
            prevPrev = prev;
            ikPrev = ik;
            prev = x;
            ik = ikx;
        }
    }

    private static double InverseK(IInflatonTheory theory, double phi) => 1.0 / theory.Kinetic(phi).Value;

    /// <summary>
    /// A pole of K where 1/K touches zero without changing sign (e.g. (1 - phi^2/6 alpha)^-2): when the middle of three
    /// samples of 1/K is the smallest, a golden-section search finds the minimum; a minimum below 1e-12 of the
    /// neighbouring values is a pole. Returns its position, or null.
    /// </summary>
    internal static double? PoleNear(IInflatonTheory theory, double a, double m, double b, double fa, double fm, double fb)
    {
        if (!(fm < fa && fm <= fb)) return null;
        double lo = Math.Min(a, b), hi = Math.Max(a, b);
        const double g = 0.6180339887498949;
        double x1 = hi - g * (hi - lo), x2 = lo + g * (hi - lo);
        double f1 = InverseK(theory, x1), f2 = InverseK(theory, x2);
        for (int it = 0; it < 200 && hi - lo > 1e-15 * Math.Max(1.0, Math.Abs(lo)); it++)
        {
            if (f1 < f2) { hi = x2; x2 = x1; f2 = f1; x1 = hi - g * (hi - lo); f1 = InverseK(theory, x1); }
            else { lo = x1; x1 = x2; f1 = f2; x2 = lo + g * (hi - lo); f2 = InverseK(theory, x2); }
        }
        double xm = f1 < f2 ? x1 : x2, fmin = Math.Min(f1, f2);
        double scale = Math.Max(Math.Abs(fa), Math.Abs(fb));
        return fmin <= 1e-12 * scale || !double.IsFinite(1.0 / fmin) ? xm : null;
    }

    public static (double, double) FindValidInterval(IValidatedTheory theory, double phiInside, double searchLimit)
    {
        if (theory.InvalidReason(phiInside) is { } reason)
            throw new TheoryException($"{reason} at phi = {F(phiInside)}: the theory is not valid there") { Phi = phiInside };
        return (Walk(theory, phiInside, -1, searchLimit), Walk(theory, phiInside, +1, searchLimit));
    }

    private static double Walk(IValidatedTheory theory, double start, int dir, double limit)
    {
        double x = start, prev = double.NaN;
        double ik = InverseK(theory, x), ikPrev = double.NaN;
        while (Math.Abs(x) <= limit)
        {
            double step = 0.005 * Math.Max(1.0, Math.Abs(x));
            double next = x + dir * step;
            if (theory.InvalidReason(next) is not null) return Bisect(theory, x, next);
            double ikn = InverseK(theory, next);
            if (!double.IsNaN(prev) && PoleNear(theory, prev, x, next, ikPrev, ik, ikn) is double pole)
                return pole - dir * 1e-12 * Math.Max(1.0, Math.Abs(pole));
            prev = x;
            ikPrev = ik;
            x = next;
            ik = ikn;
        }
        return dir < 0 ? double.NegativeInfinity : double.PositiveInfinity;
    }

    /// <summary>Between a valid point and an invalid one, returns the last valid point (to about 1e-13 relative).</summary>
    private static double Bisect(IValidatedTheory theory, double valid, double invalid)
    {
        var test = new IsValid(theory);
        return Numerics.Roots.Bisect(ref test, valid, invalid, 1e-13, maxIterations: 200).Inside;
    }

    private readonly struct IsValid(IValidatedTheory theory) : Numerics.IBoundaryTest
    {
        public bool IsInside(double phi) => theory.InvalidReason(phi) is null;
    }

    public static string Interval((double Min, double Max) r) => $"({F(r.Min)}, {F(r.Max)})";

    public static string F(double x) => x switch
    {
        double.PositiveInfinity => "inf",
        double.NegativeInfinity => "-inf",
        _ => x.ToString("G6", System.Globalization.CultureInfo.InvariantCulture),
    };
}
