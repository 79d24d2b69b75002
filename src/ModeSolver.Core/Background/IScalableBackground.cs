namespace ModeSolver.Background;

/// <summary>
/// A background the pivot matching can place k_* on and normalise: its shape does not depend on the scale of V, and
/// <see cref="WithVScale"/> gives the rescaled views. Implemented by the single-field <see cref="BackgroundSolution"/>
/// and by the adiabatic view of an n-field background (<see cref="AdiabaticBackground"/>), so that one matcher serves both.
/// </summary>
public interface IScalableBackground : IShapeSharedBackground, IHorizonExitLookup
{
    /// <summary>E-folds of inflation, NEnd - NStart.</summary>
    double NTotal { get; }

    /// <summary>The scaled potential V at N.</summary>
    double V(double n);

    /// <summary>A view of the same background with the theory's potential multiplied by <paramref name="scale"/> (absolute).</summary>
    IScalableBackground WithVScale(double scale);

    /// <summary>The last N before the end of inflation at which k = aH (k in background units); false outside the served range.</summary>
    bool TryNAtHorizonExit(double kBackground, out double n);

    /// <summary>The k range (background units, this view's scale) served at these start and end depths.</summary>
    (double KMin, double KMax) KRange(double startDepth, double endDepth);

    /// <summary>The logarithms of <see cref="KRange"/>.</summary>
    (double LnKMin, double LnKMax) LnKRange(double startDepth, double endDepth);

    /// <summary>
    /// The start in the user's words, for messages: "phi0 = 17" for one field, every field's start value for several
    /// ("phi0 = [17, 2] for (phi, chi)").
    /// </summary>
    string StartDescription => string.Create(System.Globalization.CultureInfo.InvariantCulture, $"phi0 = {At(NStart).Phi:G6}");

    /// <summary>The field values at N, for messages: "phi = 14.7" for one field, "(phi, chi) = (14.7, 1.9)" for several.</summary>
    string FieldsDescription(double n) => string.Create(System.Globalization.CultureInfo.InvariantCulture, $"phi = {At(n).Phi:G6}");

}
