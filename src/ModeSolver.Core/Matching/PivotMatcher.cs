using System.Globalization;
using ModeSolver.Background;
using ModeSolver.Diagnostics;
using ModeSolver.Physics;
using ModeSolver.Estimates;
using ModeSolver.Results;

namespace ModeSolver.Matching;

/// <summary>
/// Places the pivot k_* on the background and normalises the potential (physics.md section 5):
/// N_* = ln(H_*/k_*) - N_reh + ln a_reh with H_* in 1/Mpc, N_reh = ln(rho_end/rho_reh)/(3(1+w)),
/// a_reh = (g_s0/g_s,reh)^(1/3) T_0/T_reh, rho_reh = (pi^2/30) g_reh T_reh^4, rho_end = 3 H_end^2.
/// P_s is exactly proportional to the V scale at fixed N_*, so with N_* given the normalisation is one rescaling; with
/// N_* from reheating (which depends on H_* and rho_end, hence on the scale) N_* is the bracketed root of one equation.
/// </summary>
public static class PivotMatcher
{
    private static readonly double LnMplInMpc = Math.Log(Constants.ReducedPlanckMassGeV * Constants.GeVInInverseMpc);

    /// <summary>Matches and normalises; throws <see cref="PhysicsException"/> when it cannot be done.</summary>
    public static PivotSolution Match(BackgroundSolution background, PivotSettings settings, IPivotAmplitude amplitude)
    {
        var m = MatchAny(background, settings, amplitude);
        var final = background.WithVScale(m.VScale);
        return PivotSolution.From(m, final, SlowRoll.AtN(final, m.NPivot));
    }

    /// <summary>
    /// Matches and normalises any scalable background (single field, or the adiabatic view of n fields): the numbers of
    /// the match; the caller takes the view at <see cref="PivotMatch.VScale"/>. Throws <see cref="PhysicsException"/>
    /// when it cannot be done.
    /// </summary>
    public static PivotMatch MatchAny(IScalableBackground background, PivotSettings settings, IPivotAmplitude amplitude)
    {
        ArgumentNullException.ThrowIfNull(background);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(amplitude);
        if (!(settings.KPivot > 0) || !double.IsFinite(settings.KPivot))
            throw new PhysicsException($"The pivot k_* = {settings.KPivot} 1/Mpc is not a positive number; give a positive pivot scale.");
        if (settings.ScalarAmplitude is double asTarget && !(asTarget > 0))
            throw new PhysicsException($"The target scalar amplitude A_s = {asTarget} is not positive; give a positive A_s.");
        var reh = settings.Reheating;
        bool fromReheating = settings.EFolds is null;
        if (fromReheating) ValidateReheatingForm(reh);

        double nTotal = background.NTotal;
        double nEnd = background.NEnd;
        string phi0 = background.StartDescription;
        double s = background.VScale;
        if (settings.EFolds is double given && (!(given > 0) || given > nTotal))
            throw new PhysicsException(given > 0
                ? $"Only {nTotal:G6} e-folds of inflation before the end, N_* = {given:G6} needs more ({phi0}); start the field further up the potential or lower N_*."
                : $"N_* = {given:G6} is not positive; give the e-folds between the pivot's horizon exit and the end of inflation (> 0).");

        double lnKStar = Math.Log(settings.KPivot);
        int iterations = 0;
        double sAt = s, psPivot = double.NaN;

        // The V scale that normalises the pivot placed N_* = x before the end: P_s is exactly proportional to the V scale
        // at fixed N (the shape of the background does not depend on it), so this is one amplitude evaluation and one
        // rescaling. Sets sAt and psPivot. Each N_* is solved once: the root finder may return a point it evaluated
        // before the last one (Brent's b after a swap), and the final Normalise then reuses that step's V scale.
        var solved = new List<(double X, double Scale)>();
        void Normalise(double x)
        {
            double nPiv = nEnd - x;
            if (settings.ScalarAmplitude is not double target) { sAt = s; return; }
            foreach (var (xSolved, scale) in solved)
                if (xSolved == x) { sAt = scale; psPivot = target; return; }
            if (++iterations > settings.MaxIterations)
                throw new PhysicsException($"The pivot matching did not converge in {settings.MaxIterations} amplitude evaluations (last N_* = {x:G8}, V scale = {sAt:G6}); give N_* directly or check the amplitude provider.");
            var bgs = background.WithVScale(s);
            var pt = bgs.At(nPiv);
            double kbg = Math.Exp(nPiv) * pt.H;
            var (kMinServed, _) = bgs.KRange(settings.PivotStartDepth, 1.0);
            if (kbg < kMinServed)
                throw new PhysicsException(string.Create(CultureInfo.InvariantCulture,
                    $"Only {nPiv - background.NStart:G4} e-folds of inflation before the pivot leaves the horizon (N_* = {x:G6} of N_total = {nTotal:G6}, {phi0}): the pivot mode must start at least {settings.PivotStartDepth:G3} times inside the horizon, about {Math.Log(settings.PivotStartDepth):G2} e-folds earlier; start the field further up the potential (phi0) or lower N_*."));
            double ps;
            try
            {
                ps = amplitude.ScalarPower(bgs, kbg);
            }
            catch (PhysicsException e)
            {
                throw new PhysicsException($"The pivot mode (N_* = {x:G6}, {nPiv - background.NStart:G8} e-folds after the start, {background.FieldsDescription(nPiv)}) cannot be computed: {e.Message}; the pivot must leave the horizon well inside the inflating part of the background (change phi0 or N_*).", e);
            }
            if (!(ps > 0) || !double.IsFinite(ps))
                throw new PhysicsException($"The amplitude provider '{amplitude.Name}' returned P_s = {ps} at the pivot (N_* = {x:G8}, {background.FieldsDescription(nPiv)}); the pivot cannot be normalised there.");
            sAt = s * (target / ps);
            if (!(sAt > 0) || !double.IsFinite(sAt))
                throw new PhysicsException($"Normalising to A_s = {target:G4} needs the potential scaled by {target / ps:G3}, beyond the double-precision range (P_s = {ps:G3} at the pivot before scaling); give the potential a scale nearer A_s.");
            psPivot = target;
            solved.Add((x, sAt));
        }

        double nStar;
        if (!fromReheating)
        {
            nStar = settings.EFolds!.Value;
            Normalise(nStar);
            s = sAt;
        }
        else
        {
            // N_* from the reheating history depends on H_* and rho_end, hence on the V scale that normalises the pivot:
            // the root of g(x) = N_*(reheating; x, V scale(x)) - x, bracketed and then solved by Brent's method (Numerics.Roots).
            double G(double x)
            {
                Normalise(x);
                var bgs = background.WithVScale(sAt);
                double hEnd = bgs.At(nEnd).H;
                double rho = 3 * hEnd * hEnd;
                // A T_reh above T_end is reported after the solve with both temperatures; until then solve as if instantaneous.
                var (nReh, tReh) = reh.TRehGeV is double tGiven && tGiven > TemperatureGeV(rho, settings.GReh)
                    ? Reheat(ReheatingHistory.Instantaneous, rho, settings)
                    : Reheat(reh, rho, settings);
                double lnAReh = Math.Log(Math.Pow(settings.Gs0 / settings.GsReh, 1.0 / 3.0) * settings.T0GeV / tReh);
                double lnHMpc = Math.Log(bgs.At(nEnd - x).H) + LnMplInMpc;
                double next = lnHMpc - lnKStar - nReh + lnAReh;
                if (tReh < ReheatingHistory.MinimumTemperatureGeV) throw TooCold(reh, tReh); // the final check would refuse it
                if (!(next > 0))
                    throw NoHorizonExit(reh, next, tReh, rho, settings, Math.Exp(next + lnKStar));
                return next - x;
            }
            string Fewer(double asked) => string.Create(CultureInfo.InvariantCulture,
                $"Only {nTotal:G6} e-folds of inflation before the end ({phi0}), the reheating history needs N_* = {asked:G4} and the pivot mode about {Math.Log(settings.PivotStartDepth):G2} more to start inside the horizon; start the field further up the potential.");
            double lowest = Math.Min(1e-3, 0.5 * nTotal);
            // First guess: the usual N_*, or as early as leaves the pivot mode room to start inside the horizon.
            double a = Math.Min(settings.InitialEFolds, Math.Max(0.5 * nTotal, nTotal - 2 * Math.Log(settings.PivotStartDepth))), fa = G(a);
            double root = a;
            if (Math.Abs(fa) > 0.1 * settings.Tolerance)
            {
                // The map's slope is small (|dN_*/dx| << 1), so the root lies close to a + g(a); widen until the sign changes.
                double b = a, fb = fa, widen = 1.5;
                for (int attempt = 0; fb * fa > 0; attempt++)
                {
                    if (widen > 100 || attempt > 20) throw new PhysicsException(Fewer(a + fa));
                    double trial = Math.Clamp(a + widen * fa, lowest, nTotal);
                    if (trial == b)
                    {
                        if (fa > 0) throw new PhysicsException(Fewer(a + fa));
                        throw new PhysicsException($"The reheating history asks for N_* = {a + fa:G6} <= 0: the pivot would leave the horizon after the end of inflation; lower the pivot k or shorten reheating.");
                    }
                    try
                    {
                        fb = G(trial);
                        b = trial;
                        widen *= 2;
                    }
                    catch (PhysicsException) when (fa > 0)
                    {
                        // Too early for the pivot mode to start inside the horizon: back off towards the estimate a + g(a).
                        if (widen <= 1.001) throw new PhysicsException(Fewer(a + fa));
                        widen = 1 + 0.25 * (widen - 1);
                    }
                }
                root = Numerics.Roots.Brent(G, a, b, fa, fb, settings.Tolerance);
            }
            nStar = root;
            Normalise(nStar);
            s = sAt;
        }
        var final = background.WithVScale(s);
        double hEndFinal = final.At(nEnd).H;
        double rhoEnd = 3 * hEndFinal * hEndFinal;
        double nReh = double.NaN, tReh = double.NaN;
        if (fromReheating)
        {
            (nReh, tReh) = Reheat(reh, rhoEnd, settings);
            ValidateTemperature(reh, tReh, rhoEnd, settings, nEnd, final);
        }
        if (nStar > nTotal || nStar <= 0)
            throw new PhysicsException($"Only {nTotal:G6} e-folds of inflation before the end, N_* needs {nStar:G6} ({background.StartDescription}); start the field further up the potential.");

        double nPivot = nEnd - nStar;
        var p = final.At(nPivot);
        double kbgStar = Math.Exp(nPivot) * p.H;
        // The pivot must leave the horizon for the last time at nPivot and have room to start inside it.
        var (kMinServe, _) = final.KRange(settings.PivotStartDepth, 1.0);
        if (!final.TryNAtHorizonExit(kbgStar, out double nExit) || Math.Abs(nExit - nPivot) > 1e-6 || kbgStar < kMinServe)
            throw new PhysicsException($"The pivot (N_* = {nStar:G6}, {nPivot - background.NStart:G8} e-folds after the start, {background.FieldsDescription(nPivot)}) lies outside the range the background serves (it must leave the horizon after being at least {settings.PivotStartDepth:G3} times inside it); start the field further up the potential (now {background.StartDescription}).");

        double lnKUnit = Math.Log(kbgStar) - lnKStar;
        var (lnKMin, lnKMax) = final.LnKRange(settings.RangeStartDepth, settings.RangeEndDepth);
        double vStar = final.V(nPivot);
        return new PivotMatch(
            KPivot: settings.KPivot, NStar: nStar, NPivot: nPivot, VScale: s, LnKUnit: lnKUnit,
            HStar: p.H, HStarGeV: p.H * Constants.ReducedPlanckMassGeV, PhiStar: p.Phi,
            VStarQuarterGeV: Math.Pow(vStar, 0.25) * Constants.ReducedPlanckMassGeV,
            NTotal: nTotal, NReh: fromReheating ? nReh : double.NaN, TRehGeV: fromReheating ? tReh : double.NaN,
            W: fromReheating ? reh.W : double.NaN, RhoEnd: rhoEnd,
            KMinMpc: Math.Exp(lnKMin - lnKUnit), KMaxMpc: Math.Exp(lnKMax - lnKUnit),
            Iterations: iterations, AmplitudeName: settings.ScalarAmplitude is null ? "none" : amplitude.Name,
            PsPivot: settings.ScalarAmplitude is null ? double.NaN : psPivot);
    }

    /// <summary>Temperature (GeV) of radiation with energy density rho (M_pl^4) and g relativistic degrees of freedom.</summary>
    public static double TemperatureGeV(double rho, double g)
        => Math.Pow(30.0 * rho / (Math.PI * Math.PI * g), 0.25) * Constants.ReducedPlanckMassGeV;

    /// <summary>Energy density (M_pl^4) of radiation at temperature T (GeV).</summary>
    public static double RadiationDensity(double tGeV, double g)
    {
        double t = tGeV / Constants.ReducedPlanckMassGeV;
        return Math.PI * Math.PI / 30.0 * g * t * t * t * t;
    }

    private static void ValidateReheatingForm(ReheatingHistory reh)
    {
        if (!(reh.W > -1.0 / 3.0 && reh.W <= 1.0))
            throw new PhysicsException($"The reheating equation of state w = {reh.W:G6} is outside -1/3 < w <= 1; choose w in that range.");
        if (reh.TRehGeV is not null && reh.NReh is not null)
            throw new PhysicsException("The reheating history gives both T_reh and N_reh; give only one of them.");
        if (reh.TRehGeV is double t && !(t >= ReheatingHistory.MinimumTemperatureGeV && double.IsFinite(t)))
            throw new PhysicsException($"The reheating temperature T_reh = {t:G6} GeV is below {ReheatingHistory.MinimumTemperatureGeV:G3} GeV (nucleosynthesis needs a few MeV); raise T_reh.");
        if (reh.NReh is double nr && !(nr >= 0 && double.IsFinite(nr)))
            throw new PhysicsException($"The number of reheating e-folds N_reh = {nr:G6} is negative or not finite; give N_reh >= 0.");
    }

    private static (double NReh, double TReh) Reheat(ReheatingHistory reh, double rhoEnd, PivotSettings s)
    {
        if (reh.TRehGeV is double t)
        {
            double rhoReh = RadiationDensity(t, s.GReh);
            return (Math.Log(rhoEnd / rhoReh) / (3 * (1 + reh.W)), t);
        }
        if (reh.NReh is double nr)
        {
            double rhoReh = rhoEnd * Math.Exp(-3 * (1 + reh.W) * nr);
            return (nr, TemperatureGeV(rhoReh, s.GReh));
        }
        return (0.0, TemperatureGeV(rhoEnd, s.GReh));
    }

    private static void ValidateTemperature(ReheatingHistory reh, double tReh, double rhoEnd, PivotSettings s, double nEnd, IScalableBackground bg)
    {
        double tEnd = TemperatureGeV(rhoEnd, s.GReh);
        if (tReh > tEnd * (1 + 1e-12))
            throw new PhysicsException($"The reheating temperature T_reh = {tReh:G6} GeV is above the temperature at the end of inflation ({tEnd:G6} GeV, N = {nEnd:G8}, {bg.FieldsDescription(nEnd)}); lower T_reh.");
        if (tReh < ReheatingHistory.MinimumTemperatureGeV)
            throw TooCold(reh, tReh);
    }

    private static PhysicsException TooCold(ReheatingHistory reh, double tReh) => reh.NReh is double nr
        ? new PhysicsException($"The reheating history gives T_reh = {tReh:G6} GeV, below {ReheatingHistory.MinimumTemperatureGeV:G3} GeV (nucleosynthesis needs a few MeV); shorten reheating (N_reh = {nr:G6}).")
        : new PhysicsException($"Inflation ends at T = {tReh:G6} GeV{(reh.IsInstantaneous ? " (instantaneous reheating)" : "")}, below {ReheatingHistory.MinimumTemperatureGeV:G3} GeV (nucleosynthesis needs a few MeV); raise the energy scale of inflation (A_s or the potential's scale) or give N_* directly.");

    /// <summary>The reheating history puts the pivot's horizon exit after the end of inflation (N_* &lt;= 0).</summary>
    private static PhysicsException NoHorizonExit(ReheatingHistory reh, double nStar, double tReh, double rhoEnd, PivotSettings s, double kEndMpc)
    {
        if (tReh < ReheatingHistory.MinimumTemperatureGeV) return TooCold(reh, tReh);
        double tEnd = TemperatureGeV(rhoEnd, s.GReh);
        string temperatures = reh.IsInstantaneous ? $"instantaneous reheating at T = {tEnd:G3} GeV" : $"T_end = {tEnd:G3} GeV, T_reh = {tReh:G3} GeV";
        return new PhysicsException($"The pivot k_* = {s.KPivot:G3} 1/Mpc never leaves the horizon during inflation: the reheating history gives N_* = {nStar:G4} ({temperatures}; the largest scale leaving the horizon is about {kEndMpc:G3} 1/Mpc); lower k_pivot or give N_* directly.");
    }
}
