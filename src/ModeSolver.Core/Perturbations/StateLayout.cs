namespace ModeSolver.Perturbations;

/// <summary>One named block of a mode's state vector: <paramref name="Size"/> doubles from <paramref name="Offset"/>.</summary>
/// <param name="Name">Name of the mode system that owns the block (e.g. "zeta", "tensor").</param>
/// <param name="Offset">Index of the block's first component in the state vector.</param>
/// <param name="Size">Number of doubles in the block.</param>
internal readonly record struct StateBlock(string Name, int Offset, int Size)
{
    /// <summary>The block's part of <paramref name="state"/>.</summary>
    public Span<double> Of(Span<double> state) => state.Slice(Offset, Size);

    /// <summary>The block's part of <paramref name="state"/>, read only.</summary>
    public ReadOnlySpan<double> Of(ReadOnlySpan<double> state) => state.Slice(Offset, Size);
}

/// <summary>
/// The state vector of one mode integration as named blocks laid end to end, one per mode system, in the order the
/// systems were added. Replaces hand-written offsets: a system reads and writes only its block, and the driver,
/// the stop test and the oscillatory-regime propagator find blocks here. Reused between modes (<see cref="Clear"/>);
/// adding a block does not allocate.
/// </summary>
internal sealed class StateLayout
{
    /// <summary>Most blocks one layout holds.</summary>
    public const int MaxBlocks = 8;

    private readonly StateBlock[] _blocks = new StateBlock[MaxBlocks];

    /// <summary>Number of blocks.</summary>
    public int Count { get; private set; }

    /// <summary>Total number of doubles (the ODE dimension).</summary>
    public int Dimension { get; private set; }

    /// <summary>Block <paramref name="i"/> (in the order added).</summary>
    public StateBlock this[int i] => (uint)i < (uint)Count ? _blocks[i] : throw new ArgumentOutOfRangeException(nameof(i), i, $"the layout has {Count} blocks");

    /// <summary>Removes every block.</summary>
    public void Clear()
    {
        Count = 0;
        Dimension = 0;
    }

    /// <summary>Appends a block of <paramref name="size"/> doubles named <paramref name="name"/>; returns its index.</summary>
    public int Add(string name, int size)
    {
        if (Count == MaxBlocks) throw new InvalidOperationException($"a mode state holds at most {MaxBlocks} blocks");
        if (size <= 0) throw new ArgumentOutOfRangeException(nameof(size), size, "a block needs at least one component");
        _blocks[Count] = new StateBlock(name, Dimension, size);
        Dimension += size;
        return Count++;
    }

    /// <summary>Index of the block named <paramref name="name"/>, or -1.</summary>
    public int IndexOf(string name)
    {
        for (int i = 0; i < Count; i++)
            if (string.Equals(_blocks[i].Name, name, StringComparison.Ordinal)) return i;
        return -1;
    }
}
