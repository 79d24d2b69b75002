namespace ModeSolver.Perturbations;

/// <summary>
/// The k-derivative (sensitivity) blocks of one mode in scale-subtracted form. A mode zeta(k, N) (or h) obeys
/// L zeta = zeta'' + f zeta' + x^2 zeta = 0, x = k/(aH). In de Sitter zeta = k^(-3/2) F(ln k - N), so the operator
/// D = d/dln k + d/dN + 3/2 annihilates it; in general D commutes with L up to slow-roll terms:
///   L W1 = S1 = -2 e1 x^2 zeta - f' zeta',                     W1 = D zeta = zeta_k + (3/2) zeta + zeta',
///   L Y2 = S2 = -4 e1 x^2 zeta - 2 e1 x^2 zeta_k - f' zeta_k' - 2 x^2 W1,   Y2 = d W1 / dln k (fixed N),
/// with zeta_k = W1 - (3/2) zeta - zeta' (from d x^2/dN = -2 (1 - e1) x^2 and [d/dln k, L] = 2 x^2).
/// W1 and Y2 are of slow-roll size where zeta_k and zeta_kk are of order zeta, so n - 1 = 2 Re(A conj zeta)/|zeta|^2
/// with A = W1 - zeta' involves no cancellation of the 3 in k^3 and keeps its relative accuracy however small it is
/// (n_t ~ -2 e1 of order 1e-9 on plateaus), and alpha no longer inherits the (k/aH)^2 growth of zeta_kk inside the
/// horizon at full size. Each block is carried divided by its own scale (sigma) so that the step control sees it at
/// order one. Layout of a block of 12 doubles: zeta, zeta' (re, im each), W1/s1, W1'/s1, Y2/s2, Y2'/s2.
/// Where f jumps (a kink in V: e2 jumps), zeta, zeta', W1, Y2 are continuous while W1' and Y2' jump
/// (<see cref="Kink"/>). Physics-free apart from these equations; allocation-free.
/// </summary>
internal static class ScaleSubtractedBlocks
{
    /// <summary>Turns (zeta, zeta_k, zeta_kk) with their N-derivatives at one N into the carried form, in place.</summary>
    public static void FromSensitivities(Span<double> b, double f, double x2, double s1, double s2)
    {
        for (int c = 0; c < 2; c++)
        {
            double z = b[c], zp = b[2 + c], z1 = b[4 + c], z1p = b[6 + c], z2 = b[8 + c], z2p = b[10 + c];
            double zpp = -f * zp - x2 * z;
            double z1pp = -f * z1p - x2 * (z1 + 2.0 * z);
            b[4 + c] = (z1 + 1.5 * z + zp) / s1;
            b[6 + c] = (z1p + 1.5 * zp + zpp) / s1;
            b[8 + c] = (z2 + 1.5 * z1 + z1p) / s2;
            b[10 + c] = (z2p + 1.5 * z1p + z1pp) / s2;
        }
    }

    /// <summary>The inverse of <see cref="FromSensitivities"/>, in place.</summary>
    public static void ToSensitivities(Span<double> b, double f, double x2, double s1, double s2)
    {
        for (int c = 0; c < 2; c++)
        {
            double z = b[c], zp = b[2 + c], w1 = s1 * b[4 + c], w1p = s1 * b[6 + c], y2 = s2 * b[8 + c], y2p = s2 * b[10 + c];
            double zpp = -f * zp - x2 * z;
            double z1 = w1 - 1.5 * z - zp, z1p = w1p - 1.5 * zp - zpp;
            double z1pp = -f * z1p - x2 * (z1 + 2.0 * z);
            b[4 + c] = z1;
            b[6 + c] = z1p;
            b[8 + c] = y2 - 1.5 * z1 - z1p;
            b[10 + c] = y2p - 1.5 * z1p - z1pp;
        }
    }

    /// <summary>Right-hand side of one block (friction f, its N-derivative fp).</summary>
    public static void Rhs(ReadOnlySpan<double> y, Span<double> dy, double f, double fp, double e1, double x2, double s1, double s2, bool derivatives)
    {
        for (int c = 0; c < 2; c++)
        {
            double z = y[c], zp = y[2 + c];
            double zpp = -f * zp - x2 * z;
            dy[c] = zp;
            dy[2 + c] = zpp;
            if (!derivatives) continue;
            double w1 = s1 * y[4 + c], w1p = s1 * y[6 + c];
            double w1pp = -f * w1p - x2 * w1 - 2.0 * e1 * x2 * z - fp * zp;
            double z1 = w1 - 1.5 * z - zp, z1p = w1p - 1.5 * zp - zpp;
            double src2 = -4.0 * e1 * x2 * z - 2.0 * e1 * x2 * z1 - fp * z1p - 2.0 * x2 * w1;
            dy[4 + c] = y[6 + c];
            dy[6 + c] = w1pp / s1;
            dy[8 + c] = y[10 + c];
            dy[10 + c] = -f * y[10 + c] - x2 * y[8 + c] + src2 / s2;
        }
    }

    /// <summary>Jump of W1' and Y2' where f jumps by <paramref name="df"/> (f before the jump: <paramref name="fBefore"/>).</summary>
    public static void Kink(Span<double> b, double df, double fBefore, double x2, double s1, double s2)
    {
        for (int c = 0; c < 2; c++)
        {
            double z = b[c], zp = b[2 + c];
            double zpp = -fBefore * zp - x2 * z;
            double z1p = s1 * b[6 + c] - 1.5 * zp - zpp; // zeta_k' is continuous
            b[6 + c] -= df * zp / s1;
            b[10 + c] -= df * z1p / s2;
        }
    }

    /// <summary>
    /// ln |zeta|^2 and the first and second ln k derivatives of ln(k^3 |zeta|^2). When <paramref name="frozen"/> the
    /// values are the extrapolated constants (their N-derivatives are zero); otherwise the instantaneous values at N.
    /// </summary>
    public static double LogDerivatives(ReadOnlySpan<double> b, bool frozen, bool derivatives, double f, double x2, double s1, double s2, out double slope, out double running)
    {
        double zr = b[0], zi = b[1];
        double s = zr * zr + zi * zi;
        slope = running = double.NaN;
        if (derivatives)
        {
            double ar, ai, br, bi;
            if (frozen)
            {
                ar = s1 * b[4]; ai = s1 * b[5];
                br = s2 * b[8] + 1.5 * ar; bi = s2 * b[9] + 1.5 * ai;
            }
            else
            {
                double zppr = -f * b[2] - x2 * zr, zppi = -f * b[3] - x2 * zi;
                ar = s1 * b[4] - b[2]; ai = s1 * b[5] - b[3];
                br = s2 * b[8] + 1.5 * s1 * b[4] - s1 * b[6] + zppr;
                bi = s2 * b[9] + 1.5 * s1 * b[5] - s1 * b[7] + zppi;
            }
            slope = 2.0 * (ar * zr + ai * zi) / s;
            running = 2.0 * (ar * ar + ai * ai + br * zr + bi * zi) / s - slope * slope;
        }
        return Math.Log(s);
    }

    /// <summary>Scale of a derivative block from its start magnitude relative to zeta's (1 when it vanishes).</summary>
    public static double Scale(ReadOnlySpan<double> b, int offset, double depthPower)
    {
        double z = Math.Sqrt(b[0] * b[0] + b[1] * b[1]);
        double w = Math.Sqrt(b[offset] * b[offset] + b[offset + 1] * b[offset + 1] + b[offset + 2] * b[offset + 2] + b[offset + 3] * b[offset + 3]);
        double s = w / (z * depthPower);
        return s > 1e-280 && double.IsFinite(s) ? s : 1.0;
    }
}
