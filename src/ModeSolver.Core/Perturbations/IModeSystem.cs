using System.Numerics;
using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// One set of linear perturbation equations that <see cref="ModeDriver"/> integrates for a Fourier mode k: its state
/// block (values, N-derivatives and, with k-derivatives on, the sensitivity blocks), Bunch-Davies data, right-hand side,
/// jumps at non-smooth points, the freeze-out test of its block and its observables. The driver owns the start, the
/// segments, the stop and the error accounting and knows nothing of the equations. A system instance is a per-mode
/// workspace (it keeps the scales chosen at the start); every member is allocation-free.
/// All background quantities come in as <see cref="BackgroundPoint"/>; x2 = (k/aH)^2.
/// </summary>
internal interface IModeSystem
{
    /// <summary>Block name in the <see cref="StateLayout"/> (e.g. "zeta", "tensor").</summary>
    string Name { get; }

    /// <summary>Doubles in the block, with or without the k-derivative blocks.</summary>
    int StateSize(bool derivatives);

    /// <summary>
    /// True when a super-horizon solution of this system can still grow (zeta in ultra-slow roll): the driver then
    /// tightens the absolute tolerances of its N-derivatives by the friction scan's growth and counts the
    /// cancellation of its amplitude after exit in the error estimate.
    /// </summary>
    bool GrowsOutsideHorizon { get; }

    /// <summary>|f|^2 of the block's amplitude (carried units): the cancellation measure of the error estimate.</summary>
    double AmplitudeSquared(ReadOnlySpan<double> block);

    /// <summary>Fills the block's absolute tolerances: <paramref name="value"/> for values, <paramref name="derivative"/> for N-derivatives.</summary>
    void Tolerances(Span<double> atol, double value, double derivative);

    /// <summary>Local Hankel index nu of the system at <paramref name="p"/> (the start policy's drift estimate).</summary>
    double LocalIndex(in BackgroundPoint p);

    /// <summary>Complex entries of <see cref="Vacuum"/> per stencil point.</summary>
    int VacuumWidth { get; }

    /// <summary>Bunch-Davies data at one point: value, N-derivative and their first and second ln k derivatives at fixed N.</summary>
    void Vacuum(in VacuumPoint v, Span<Complex> data);

    /// <summary>
    /// Fills the block at the start from the stencil's data of this system (slot <paramref name="slot"/>), converts it
    /// to the carried form and chooses its scales (the start at <paramref name="p0"/>, k/aH = <paramref name="x0"/>).
    /// </summary>
    void Start(BunchDaviesData data, int slot, in BackgroundPoint p0, double x0, Span<double> block);

    /// <summary>Right-hand side of the block.</summary>
    void Rhs(in BackgroundPoint p, double x2, ReadOnlySpan<double> y, Span<double> dy);

    /// <summary>Applies the jumps at a non-smooth point (background just before and just after it).</summary>
    void Kink(in BackgroundPoint before, in BackgroundPoint after, double x2, Span<double> block);

    /// <summary>Stop test of the block: true when every carried quantity has stopped changing to <paramref name="tol"/>; raises <paramref name="correction"/> to the relative correction.</summary>
    bool TryFreeze(ReadOnlySpan<double> y, ReadOnlySpan<double> dy, double tol, ref double correction);

    /// <summary>Adds the remaining change (the frozen limit) to the block, from the state and its right-hand side.</summary>
    void ApplyFreeze(Span<double> y, ReadOnlySpan<double> dy);

    /// <summary>
    /// The observables of the block at the stop (<paramref name="p"/>, x2): power k^3 |f|^2 times the system's
    /// normalisation, and its first and second ln k derivatives (NaN without k-derivatives). <paramref name="lnRef"/>
    /// is the log of the common amplitude reference of the carried state.
    /// </summary>
    ModePower Power(ReadOnlySpan<double> block, bool frozen, in BackgroundPoint p, double x2, double lnK, double lnRef);

    /// <summary>The physical amplitude and its N-derivative (unscaled) of the block.</summary>
    (Complex Value, Complex Derivative) Amplitude(ReadOnlySpan<double> block, double lnRef);
}

/// <summary>The common part of the Bunch-Davies data at one stencil point N0 + dn.</summary>
/// <param name="Background">The background there (from the start's Taylor jet).</param>
/// <param name="OneMinusE1">1 - epsilon_1.</param>
/// <param name="BigX">-k tau = (k/aH)/(1 - epsilon_1).</param>
/// <param name="LnBase">ln(sqrt(-tau) a) relative to the amplitude reference: ln(sqrt(-tau)/z) = LnBase - ln(z/a).</param>
/// <param name="Kind">Which initial data.</param>
/// <param name="LnK">ln k (for messages).</param>
internal readonly record struct VacuumPoint(BackgroundPoint Background, double OneMinusE1, double BigX, double LnBase, InitialDataKind Kind, double LnK);

/// <summary>Power of one system at the stop and its ln k derivatives.</summary>
/// <param name="P">The power spectrum value.</param>
/// <param name="Slope">d ln P / d ln k (NaN without k-derivatives).</param>
/// <param name="Running">d^2 ln P / d ln k^2 (NaN without k-derivatives).</param>
internal readonly record struct ModePower(double P, double Slope, double Running)
{
    /// <summary>Not integrated.</summary>
    public static ModePower None => new(double.NaN, double.NaN, double.NaN);
}
