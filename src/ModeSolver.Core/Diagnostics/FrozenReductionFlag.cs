using System.Globalization;
using ModeSolver.Results;

namespace ModeSolver.Diagnostics;

/// <summary>The flag of a `[compare] freeze` one-field model that misses the n-field n_s or r beyond the errors.</summary>
public static class FrozenReductionFlag
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>The flag of a one-field reduction that misses the n-field n_s or r beyond the errors; null when it does not.</summary>
    public static Flag? For(FrozenComparison comparison, PivotResults pivot)
    {
        ArgumentNullException.ThrowIfNull(comparison);
        ArgumentNullException.ThrowIfNull(pivot);
        if (!comparison.Differs(pivot)) return null;
        var c = comparison;
        string where = string.Create(Inv, $"k = {pivot.KPivot:0.000e+00} /Mpc");
        return new Flag(FlagKinds.FrozenReductionDiffers, "n_s", string.Create(Inv,
            $"the one-field model with {c.Describe()} held fixed (at the pivot's exit) gives n_s = {c.Ns:0.000000} +- {c.NsError:0.0e+00}, r = {c.R:0.00000e+00} +- {c.RError:0.0e+00}, against the {c.Frozen.Length + 1}-field n_s = {pivot.Ns:0.000000} +- {pivot.Errors.Ns:0.0e+00}, r = {pivot.R:0.00000e+00} +- {pivot.Errors.R:0.0e+00}: freezing {string.Join(", ", c.Frozen)} changes the predictions beyond the errors"),
            where, pivot.KPivot, pivot.KPivot, pivot.Ns, c.Ns, pivot.Ns - c.Ns);
    }
}
