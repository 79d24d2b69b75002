using ModeSolver.Background;

namespace ModeSolver.Perturbations;

/// <summary>
/// What the parts of one mode integration share: the background, ln k, whether k-derivatives are carried, and the mode
/// systems with their blocks in the state layout (system i owns block i). Set by <see cref="ModeDriver"/> at the start
/// of each mode; reused between modes without allocation.
/// </summary>
internal sealed class ModeContext
{
    private readonly IModeSystem[] _systems = new IModeSystem[StateLayout.MaxBlocks];

    /// <summary>The background of the current mode.</summary>
    public IBackground Background { get; private set; } = null!;

    /// <summary>ln k (background units) of the current mode.</summary>
    public double LnK { get; private set; }

    /// <summary>True when the systems carry their first and second ln k derivatives.</summary>
    public bool Derivatives { get; private set; }

    /// <summary>The state layout: block i belongs to <see cref="System"/>(i).</summary>
    public StateLayout Layout { get; } = new();

    /// <summary>Number of mode systems.</summary>
    public int SystemCount => Layout.Count;

    /// <summary>Mode system <paramref name="i"/>.</summary>
    public IModeSystem System(int i) => _systems[i];

    /// <summary>Index of the first system whose super-horizon solution can grow (-1 when none).</summary>
    public int GrowingSystem { get; private set; } = -1;

    /// <summary>Sets up a mode: the background, ln k, and the systems laid out in the order given.</summary>
    public void Begin(IBackground background, double lnK, bool derivatives, IModeSystem[] systems)
    {
        Background = background;
        LnK = lnK;
        Derivatives = derivatives;
        Layout.Clear();
        GrowingSystem = -1;
        for (int i = 0; i < systems.Length; i++)
        {
            _systems[i] = systems[i];
            Layout.Add(systems[i].Name, systems[i].StateSize(derivatives));
            if (GrowingSystem < 0 && systems[i].GrowsOutsideHorizon) GrowingSystem = i;
        }
    }
}
