using ModeSolver.Background;
using ModeSolver.Perturbations;

namespace ModeSolver.Spectra;

/// <summary>The isocurvature of an n-field mode at one k (end of inflation or freeze-out) with its T_RS.</summary>
/// <param name="Ps">P_S.</param>
/// <param name="Crs">C_RS (NaN for n &gt; 2).</param>
/// <param name="CosDelta">C_RS / sqrt(P_R P_S).</param>
/// <param name="BetaIso">P_S / (P_R + P_S).</param>
/// <param name="Trs">T_RS from P_R(end) = P_R(exit) (1 + T_RS^2).</param>
/// <param name="PrExit">P_R at exit (see <see cref="FieldModeIntegrator.ExitEFolds"/>).</param>
/// <param name="PsError">Estimated absolute error of P_S (twice the change against the tighter check plus the mode estimate).</param>
public sealed record FieldIsocurvature(double Ps, double Crs, double CosDelta, double BetaIso, double Trs, double PrExit, double PsError)
{
    /// <summary>
    /// The record of mode <paramref name="m"/> solved at <paramref name="tolerance"/>; cos Delta is NaN where P_S is not
    /// resolved: its error at least P_S, or P_S below what the integration error leaves in the normal direction
    /// (<see cref="Resolved"/>, the rule of the per-k arrays) - a decayed isocurvature whose correlation with R means nothing.
    /// </summary>
    internal static FieldIsocurvature Of(in FieldModeResult m, double psError, double tolerance) =>
        new(m.Ps, m.Crs, psError < m.Ps && Resolved(m.Ps, m.Pr, tolerance) ? m.CosDelta : double.NaN, m.BetaIso, m.Trs, m.PrExit, psError);

    /// <summary>
    /// True when P_S of a mode solved at <paramref name="tolerance"/> is resolved: above (10 tol)^2 P_R, the power an
    /// absolute error of 10 tol in the carried Q (relative to its size) leaves in the normal direction.
    /// </summary>
    public static bool Resolved(double ps, double pr, double tolerance) => ps > 100.0 * tolerance * tolerance * pr;
}

/// <summary>Exact n-field observables at the pivot: the single-field set (<see cref="PivotValues"/>) and the isocurvature.</summary>
public static class FieldPivotValues
{
    /// <summary>
    /// The pivot values at k (background units of <paramref name="background"/>): P_R (as P_s), P_t, r from the
    /// centre mode; n_s - 1, alpha_s, n_t by <see cref="FieldSlopes"/> on five modes 0.2 apart in ln k. The modes run at
    /// min(tolerance, 1e-6)/100 (the differences divide the mode errors by h and h^2) and again 100x tighter (at least
    /// 1e-11) from 4x deeper starts (so the check sees the initial-data error too); each error is twice the change between the two plus the bound of <see cref="FieldSlopes"/> (indices) or
    /// the mode's own estimate (P). Ten n x n modes.
    /// </summary>
    public static (PivotValues Values, FieldIsocurvature Isocurvature) Compute(AdiabaticBackground background, double k, double tolerance = 1e-6)
    {
        ArgumentNullException.ThrowIfNull(background);
        double tol = Math.Min(tolerance, 1e-6) * 0.01;
        var integrator = new FieldModeIntegrator(background);
        var main = Stencil(integrator, background, k, tol, null, out int work);
        var tight = Stencil(integrator, background, k, Math.Max(tol * 0.01, 1e-11), main.Modes, out _);
        var m = main.Modes[2];
        var t = tight.Modes[2];
        double ns = 1.0 + main.Ns, nt = main.Nt, alpha = main.Alpha;
        double r = m.Pt / m.Pr, rt = t.Pt / t.Pr;
        var errors = new PivotErrors(
            As: m.Pr * (m.ErrorEstimate + 2.0 * Math.Abs(m.Pr / t.Pr - 1.0)),
            Ns: 2.0 * Math.Abs(main.Ns - tight.Ns) + main.NsError,
            AlphaS: 2.0 * Math.Abs(main.Alpha - tight.Alpha) + main.AlphaError,
            R: Math.Abs(r) * (2.0 * m.ErrorEstimate + 2.0 * Math.Abs(r / rt - 1.0)),
            Nt: 2.0 * Math.Abs(main.Nt - tight.Nt) + main.NtError);
        var values = new PivotValues(k, m.Pr, m.Pt, ns, nt, r, alpha, m.ErrorEstimate, work) { Errors = errors, StartDepth = m.StartDepth };
        double psErr = m.Ps * m.ErrorEstimate + 2.0 * Math.Abs(m.Ps - t.Ps);
        return (values, FieldIsocurvature.Of(m, psErr, tol));
    }

    private readonly record struct StencilResult(FieldModeResult[] Modes, double Ns, double NsError, double Alpha, double AlphaError, double Nt, double NtError);

    /// <summary>The five modes; with <paramref name="checked"/>, each starts <see cref="FieldModeIntegrator.CheckDepthFactor"/> deeper than the mode it checks.</summary>
    private static StencilResult Stencil(FieldModeIntegrator integrator, AdiabaticBackground bg, double k, double tol, FieldModeResult[]? @checked, out int work)
    {
        var settings = new ModeSettings { Tolerance = tol, Derivatives = false };
        var modes = new FieldModeResult[5];
        Span<double> lnR = stackalloc double[5], lnT = stackalloc double[5], eR = stackalloc double[5];
        work = 0;
        double h = FieldSlopes.Step;
        for (int j = 0; j < 5; j++)
        {
            var sj = @checked is null ? settings : settings with { StartDepth = FieldModeIntegrator.CheckDepth(bg, @checked[j].K, @checked[j].StartDepth), MaxSteps = 200_000 };
            modes[j] = integrator.Solve(bg, k * Math.Exp((j - 2) * h), sj, transfer: j == 2);
            if (j == 2) work = modes[j].RhsEvaluations;
            lnR[j] = Math.Log(modes[j].Pr);
            lnT[j] = Math.Log(modes[j].Pt);
            eR[j] = modes[j].ErrorEstimate;
        }
        var (ns, nsErr) = FieldSlopes.First(lnR, eR, h);
        var (al, alErr) = FieldSlopes.Second(lnR, eR, h);
        var (nt, ntErr) = FieldSlopes.First(lnT, eR, h);
        return new StencilResult(modes, ns, nsErr, al, alErr, nt, ntErr);
    }
}
