using ModeSolver.Physics;

namespace ModeSolver.Models;

/// <summary>
/// The field value a given number of e-folds before the end of inflation on the slow-roll attractor:
/// N(phi0) = integral from phi_end to phi0 of K V / |V_phi| dphi (physics.md section 4), with the end where
/// epsilon_V = V_phi^2 / (2 K V^2) reaches 1 or at the model's phi_end. This is the first guess of a start given in
/// e-folds; the pipeline then corrects it against the exact background.
/// </summary>
public static class SlowRollStart
{
    private const double SearchLimit = 1e3;

    /// <summary>
    /// phi0 such that the slow-roll attractor inflates <paramref name="efolds"/> e-folds from phi0 to the end.
    /// <paramref name="reference"/> is a field value on the inflating side (a catalogue model's usual start); when it
    /// is NaN, the largest |phi| &lt;= 100 inside the valid range with epsilon_V &lt; 1 and V &gt; 0 is used (for a
    /// potential with several inflating regions give phi0 instead).
    /// </summary>
    /// <exception cref="PhysicsException">no inflating region, or it gives fewer e-folds than asked (one line).</exception>
    public static double FieldBeforeEnd(IInflatonTheory theory, double efolds, double? phiEnd, double reference)
    {
        ArgumentNullException.ThrowIfNull(theory);
        if (!(efolds > 0) || !double.IsFinite(efolds)) throw new ArgumentOutOfRangeException(nameof(efolds));
        var (lo, hi) = theory.ValidRange;
        double a = Math.Max(lo, -SearchLimit), b = Math.Min(hi, SearchLimit);
        if (!double.IsFinite(reference)) reference = phiEnd is double pe ? Inflating(theory, pe, a, b) : FindReference(theory, a, b);

        // Roll direction at the reference (down the potential).
        var v = theory.Potential(reference);
        double dir = -Math.Sign(v.D1);
        if (dir == 0) throw new PhysicsException($"V_phi = 0 at phi = {reference:G6}: no roll direction to count e-folds along; give phi0 instead");

        // The end: phi_end, or the first point ahead where epsilon_V reaches 1.
        double end = phiEnd ?? FindEnd(theory, reference, dir, a, b);

        // Integrate dN/dphi = K V / |V_phi| from the end back up the potential (steps of at most 0.02 e-folds).
        double phi = end, n = 0;
        double limitUp = dir > 0 ? a : b;
        while (n < efolds)
        {
            double rate = Rate(theory, phi);
            if (!(rate > 0) || !double.IsFinite(rate))
                throw new PhysicsException($"the slow-roll attractor gives only {n:G6} e-folds before the end (it stops at phi = {phi:G6}, where V or V_phi vanishes); start from a field value (phi0) instead");
            double h = -dir * Math.Min(0.02 / rate, 0.05 * Math.Max(1.0, Math.Abs(phi)));
            if ((phi + h - limitUp) * (-dir) > 0) h = limitUp - phi;
            if (Math.Abs(h) < 1e-300)
                throw new PhysicsException($"the slow-roll attractor gives only {n:G6} e-folds before the end up to the edge of the valid field range (phi = {phi:G6}); give fewer e-folds or start from phi0");
            // Simpson's rule (RK4 for a right-hand side that depends on phi only).
            double dn = Math.Abs(h) * (rate + 4 * Rate(theory, phi + 0.5 * h) + Rate(theory, phi + h)) / 6;
            if (!double.IsFinite(dn))
                throw new PhysicsException($"the slow-roll e-folds are not finite near phi = {phi:G6}; start from a field value (phi0) instead");
            if (n + dn >= efolds)
            {
                // Linear interpolation inside the last small step (at most 0.02 e-folds; the exact solve corrects it).
                double t = (efolds - n) / dn;
                return phi + t * h;
            }
            n += dn;
            phi += h;
        }
        return phi;
    }

    /// <summary>dN/dphi on the attractor, K V / |V_phi|.</summary>
    private static double Rate(IInflatonTheory theory, double phi)
    {
        var (v, k) = theory.Jets(phi); // V and K from one evaluation of the theory
        return k.Value * v.Value / Math.Abs(v.D1);
    }

    private static double EpsilonV(IInflatonTheory theory, double phi) => EpsilonV(theory.Jets(phi));

    private static double EpsilonV(JetPair jets)
    {
        var (v, kj) = jets;
        double k = kj.Value;
        double e = v.D1 / v.Value;
        return v.Value > 0 && k > 0 ? e * e / (2 * k) : double.PositiveInfinity;
    }

    private static double FindEnd(IInflatonTheory theory, double from, double dir, double a, double b)
    {
        double step = 1e-3 * Math.Max(1.0, Math.Abs(from));
        var jx = theory.Jets(from);
        double x = from, ex = EpsilonV(jx);
        if (!(ex < 1)) throw new PhysicsException($"epsilon_V = {ex:G4} >= 1 at phi = {from:G6}: this is not an inflating region; give phi0 instead");
        int signX = Math.Sign(jx.Potential.D1);
        while (true)
        {
            double y = x + dir * step;
            if (y <= a || y >= b)
                throw new PhysicsException($"inflation does not end by slow roll before the edge of the field range (phi = {(dir > 0 ? b : a):G6}); give model.phi_end or phi0");
            var jy = theory.Jets(y); // epsilon_V and the sign of V_phi from one evaluation
            double ey = EpsilonV(jy);
            int signY = ey < 1 ? Math.Sign(jy.Potential.D1) : 0; // V_phi is finite where epsilon_V < 1
            if (ey < 1 && signY != signX)
            {
                // The step passed the minimum (V_phi changed sign) inside a narrow end region, e.g. width 1/sqrt(xi) of a
                // Palatini map at large xi: find the minimum, then approach it geometrically until epsilon_V reaches 1.
                double l0 = x, r0 = y, sx = signX;
                for (int i = 0; i < 200 && Math.Abs(r0 - l0) > 1e-15 * Math.Max(1e-300, Math.Abs(l0)); i++)
                {
                    double m = 0.5 * (l0 + r0);
                    if (Math.Sign(theory.Potential(m).D1) == sx) l0 = m; else r0 = m;
                }
                double minimum = 0.5 * (l0 + r0);
                for (int k = 1; k <= 60 && ey < 1; k++)
                {
                    y = minimum + (x - minimum) * Math.Pow(2, -k);
                    ey = EpsilonV(theory, y);
                    if (ey < 1) x = y;
                }
                if (ey < 1)
                    throw new PhysicsException($"inflation does not end by slow roll before the minimum at phi = {minimum:G6} (epsilon_V stays below 1); give model.phi_end or phi0");
            }
            if (!(ey < 1))
            {
                // Bisect the crossing of epsilon_V = 1 (a non-finite value counts as above 1).
                double l = x, r = y;
                for (int i = 0; i < 100 && Math.Abs(r - l) > 1e-14 * Math.Max(1.0, Math.Abs(l)); i++)
                {
                    double m = 0.5 * (l + r);
                    if (EpsilonV(theory, m) < 1) l = m; else r = m;
                }
                return l;
            }
            x = y;
            signX = signY;
            step = Math.Min(step * 1.2, 0.05 * Math.Max(1.0, Math.Abs(x)));
        }
    }

    private static double FindReference(IInflatonTheory theory, double a, double b)
    {
        double top = Math.Min(b, 100), bottom = Math.Max(a, -100);
        double best = double.NaN;
        const int samples = 4000;
        for (int i = 0; i <= samples; i++)
        {
            double x = bottom + (top - bottom) * i / samples;
            if (x <= a || x >= b) continue;
            if (EpsilonV(theory, x) < 1 && theory.Potential(x).D1 != 0 && (double.IsNaN(best) || Math.Abs(x) > Math.Abs(best))) best = x;
        }
        if (double.IsNaN(best))
            throw new PhysicsException("no field value with |phi| <= 100 slow-rolls (epsilon_V < 1 with V > 0 nowhere); give phi0 instead");
        return best;
    }

    /// <summary>A slow-rolling field value just behind phi_end (up the potential from it).</summary>
    private static double Inflating(IInflatonTheory theory, double phiEnd, double a, double b)
    {
        foreach (double side in new[] { 1.0, -1.0 })
        {
            double x = phiEnd + side * 1e-6 * Math.Max(1.0, Math.Abs(phiEnd));
            if (x <= a || x >= b) continue;
            var v = theory.Potential(x);
            // Rolling from x must head towards phi_end.
            if (v.Value > 0 && -Math.Sign(v.D1) == -side && EpsilonV(theory, x) < 1) return x;
        }
        throw new PhysicsException($"the field does not roll towards phi_end = {phiEnd:G6} from either side; give phi0 instead");
    }
}
