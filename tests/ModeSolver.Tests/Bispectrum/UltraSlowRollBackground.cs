using ModeSolver.Background;

namespace ModeSolver.Tests.Bispectrum;

/// <summary>
/// An exact constant-roll ultra-slow-roll phase on de Sitter: H constant, e1 = e0 exp(-6 N), e2 = -6, e3 = 0 (the field
/// rolling on a flat potential with d phi/dN proportional to exp(-3 N); H changes by O(e1), which is left out, so e0 must be
/// tiny). Test stand-in only.
/// </summary>
internal sealed class UltraSlowRollBackground(double h, double e0, double nEnd) : IBackground
{
    public double NStart => 0.0;
    public double NStop => nEnd;
    public double NEnd => nEnd;
    public IReadOnlyList<double> EndCrossings => Array.Empty<double>();
    public IReadOnlyList<double> NonSmoothTimes => Array.Empty<double>();
    public double VScale => 1.0;

    public BackgroundPoint At(double n)
    {
        double e1 = e0 * Math.Exp(-6.0 * n);
        return new BackgroundPoint(n, 0.0, Math.Sqrt(2.0 * e1), h, e1, -6.0, 0.0);
    }
}
