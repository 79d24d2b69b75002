using System.Collections.Immutable;
using System.Globalization;

namespace ModeSolver.Results;

/// <summary>
/// The one-field model obtained from a several-field one by holding some fields fixed at their values at the pivot's
/// horizon exit, run with the same pivot, reheating and normalisation, beside the n-field result.
/// </summary>
/// <param name="Frozen">The fields held fixed, in field order.</param>
/// <param name="Values">Their values (the n-field trajectory's at the pivot's horizon exit), one per frozen field.</param>
/// <param name="Free">The field that rolls in the one-field model.</param>
/// <param name="Ns">n_s of the one-field model at the pivot.</param>
/// <param name="NsError">Its error estimate.</param>
/// <param name="R">r of the one-field model.</param>
/// <param name="RError">Its error estimate.</param>
/// <param name="As">A_s of the one-field model (equal to the target when normalised).</param>
/// <param name="NStar">N_* of the one-field model.</param>
public sealed record FrozenComparison(ImmutableArray<string> Frozen, ImmutableArray<double> Values, string Free,
    double Ns, double NsError, double R, double RError, double As, double NStar)
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>Why the one-field model could not be run (its numbers are then NaN); null when it ran.</summary>
    public string? Note { get; init; }

    /// <summary>The comparison that could not be run, with the reason.</summary>
    public static FrozenComparison NotRun(ImmutableArray<string> frozen, ImmutableArray<double> values, string free, string reason) =>
        new(frozen, values, free, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN) { Note = reason };

    /// <summary>
    /// True when n_s or r of the n-field run (<paramref name="pivot"/>) and of this one-field model differ by more than the
    /// sum of their error estimates (an unknown error counts as infinite, never as agreement: then false).
    /// </summary>
    public bool Differs(PivotResults pivot)
    {
        ArgumentNullException.ThrowIfNull(pivot);
        return Beyond(pivot.Ns - Ns, pivot.Errors.Ns + NsError) || Beyond(pivot.R - R, pivot.Errors.R + RError);
    }

    private static bool Beyond(double diff, double allowed) => double.IsFinite(allowed) && Math.Abs(diff) > allowed;

    /// <summary>"chi = 0.93" (or "chi = 0.93, psi = 1.2"): the frozen fields and their values.</summary>
    public string Describe()
    {
        var parts = new string[Frozen.Length];
        for (int i = 0; i < parts.Length; i++) parts[i] = string.Create(Inv, $"{Frozen[i]} = {Values[i]:G6}");
        return string.Join(", ", parts);
    }

}
