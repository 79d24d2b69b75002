using ModeSolver.Integrators;

namespace ModeSolver.Tests.Integrators;

/// <summary>Standard test problems with their published sources.</summary>
internal static class TestProblems
{
    /// <summary>Arenstorf orbit (Hairer, Norsett and Wanner I, sec. II.0, eq. (0.1)); the orbit is periodic with <see cref="ArenstorfPeriod"/>.</summary>
    public const double ArenstorfMu = 0.012277471;
    public const double ArenstorfPeriod = 17.0652165601579625588917206249;
    public static readonly double[] ArenstorfY0 = { 0.994, 0.0, 0.0, -2.00158510637908252240537862224 };

    public static void Arenstorf(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        const double mu = ArenstorfMu, mup = 1.0 - mu;
        double y1 = y[0], y2 = y[1];
        double d1 = Math.Pow((y1 + mu) * (y1 + mu) + y2 * y2, 1.5);
        double d2 = Math.Pow((y1 - mup) * (y1 - mup) + y2 * y2, 1.5);
        f[0] = y[2];
        f[1] = y[3];
        f[2] = y1 + 2 * y[3] - mup * (y1 + mu) / d1 - mu * (y1 - mup) / d2;
        f[3] = y2 - 2 * y[2] - mup * y2 / d1 - mu * y2 / d2;
    }

    public static OdeProblem ArenstorfProblem(double periods = 1) =>
        new(Arenstorf, 0.0, (double[])ArenstorfY0.Clone(), periods * ArenstorfPeriod);

    /// <summary>Van der Pol in the scaled stiff form (Hairer and Wanner II, sec. IV.1 / the Bari test set), eps = 1e-6.</summary>
    public const double VdpEps = 1e-6;

    public static void VanDerPol(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        f[0] = y[1];
        f[1] = ((1 - y[0] * y[0]) * y[1] - y[0]) / VdpEps;
    }

    public static void VanDerPolJacobian(double t, ReadOnlySpan<double> y, Span<double> j)
    {
        j[0] = 0; j[1] = 1;
        j[2] = (-2 * y[0] * y[1] - 1) / VdpEps;
        j[3] = (1 - y[0] * y[0]) / VdpEps;
    }

    public static OdeProblem VanDerPolProblem(bool withJacobian = true) =>
        new(VanDerPol, 0.0, new[] { 2.0, -0.66 }, 2.0, withJacobian ? VanDerPolJacobian : null);

    /// <summary>Robertson's chemical kinetics (Hairer and Wanner II, sec. IV.1, eq. (1.4)).</summary>
    public static void Robertson(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        double r1 = 0.04 * y[0], r2 = 3e7 * y[1] * y[1], r3 = 1e4 * y[1] * y[2];
        f[0] = -r1 + r3;
        f[1] = r1 - r3 - r2;
        f[2] = r2;
    }

    public static void RobertsonJacobian(double t, ReadOnlySpan<double> y, Span<double> j)
    {
        j[0] = -0.04; j[1] = 1e4 * y[2]; j[2] = 1e4 * y[1];
        j[3] = 0.04; j[4] = -1e4 * y[2] - 6e7 * y[1]; j[5] = -1e4 * y[1];
        j[6] = 0; j[7] = 6e7 * y[1]; j[8] = 0;
    }

    public static OdeProblem RobertsonProblem(double tEnd = 1e11, bool withJacobian = true) =>
        new(Robertson, 0.0, new[] { 1.0, 0.0, 0.0 }, tEnd, withJacobian ? RobertsonJacobian : null);

    /// <summary>y' = y cos t, exact y = exp(sin t).</summary>
    public static void ExpSin(double t, ReadOnlySpan<double> y, Span<double> f) => f[0] = y[0] * Math.Cos(t);

    /// <summary>Harmonic oscillator y1' = y2, y2' = -y1; with y(0) = (1, 0): y1 = cos t, y2 = -sin t.</summary>
    public static void Oscillator(double t, ReadOnlySpan<double> y, Span<double> f)
    {
        f[0] = y[1];
        f[1] = -y[0];
    }

    /// <summary>
    /// Stiff only in the middle: y' = -lambda(t) (y - cos t) - sin t, lambda = 1 + 1e5 * (tanh(4(t - 2.5)) - tanh(4(t - 7.5)))/2,
    /// exact solution y = cos t for y(0) = 1 (Prothero-Robinson type, Hairer and Wanner II, sec. IV.15 / IV.1).
    /// </summary>
    public static double BumpLambda(double t) => 1 + 1e5 * 0.5 * (Math.Tanh(4 * (t - 2.5)) - Math.Tanh(4 * (t - 7.5)));

    public static void Bump(double t, ReadOnlySpan<double> y, Span<double> f) =>
        f[0] = -BumpLambda(t) * (y[0] - Math.Cos(t)) - Math.Sin(t);

    public static OdeProblem BumpProblem() => new(Bump, 0.0, new[] { 1.0 }, 12.0);
}
