namespace ModeSolver.Background;

/// <summary>
/// A background whose shape (phi(N), e_n(N)) does not depend on the scale of V and is shared by all its rescaled
/// views (<see cref="BackgroundSolution.WithVScale"/>). Later stages may keep one table derived from that shape here,
/// built once and shared by every view and thread, without knowing the background's concrete type.
/// </summary>
public interface IShapeSharedBackground : IBackground
{
    /// <summary>
    /// The table of type <typeparamref name="T"/> derived from the shape of this background only (not from the V
    /// scale), built on first use by <paramref name="create"/> (given this view) and then shared by every rescaled
    /// view and thread. One slot: one table type per background (asking for a second type throws
    /// <see cref="InvalidOperationException"/>).
    /// </summary>
    T ShapeTable<T>(Func<IBackground, T> create) where T : class;
}

/// <summary>A background with a fast lookup of the final horizon exit (a table of ln aH), used by <see cref="HorizonExit.Find"/>.</summary>
public interface IHorizonExitLookup : IBackground
{
    /// <summary>
    /// The last N before the end of inflation at which k = aH (k in background units, in this view's V scale); throws
    /// <see cref="Physics.PhysicsException"/> when k is outside the range served.
    /// </summary>
    double NAtHorizonExit(double kBackground);
}
