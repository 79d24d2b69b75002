using System.Buffers.Binary;

namespace ModeSolver.Sweeps;

/// <summary>A set of point indices 0..count-1, one bit each; <see cref="Add"/> is thread-safe.</summary>
public sealed class PointSet
{
    private readonly long[] _words;
    private long _count;

    /// <summary>An empty set for indices below <paramref name="capacity"/>.</summary>
    public PointSet(long capacity)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(capacity);
        Capacity = capacity;
        _words = new long[(capacity + 63) / 64];
    }

    /// <summary>The exclusive upper bound of the indices.</summary>
    public long Capacity { get; }

    /// <summary>How many indices are in the set.</summary>
    public long Count => Interlocked.Read(ref _count);

    /// <summary>True when <paramref name="index"/> is in the set.</summary>
    public bool Contains(long index) => (Volatile.Read(ref _words[index >> 6]) & (1L << (int)(index & 63))) != 0;

    /// <summary>Adds <paramref name="index"/>; false when it was already there.</summary>
    public bool Add(long index)
    {
        long bit = 1L << (int)(index & 63);
        long before = Interlocked.Or(ref _words[index >> 6], bit);
        if ((before & bit) != 0) return false;
        Interlocked.Increment(ref _count);
        return true;
    }

    /// <summary>The bits as bytes (little-endian words), for broadcasting.</summary>
    public byte[] ToBytes()
    {
        var b = new byte[_words.Length * sizeof(long)];
        for (int i = 0; i < _words.Length; i++) BinaryPrimitives.WriteInt64LittleEndian(b.AsSpan(i * sizeof(long)), _words[i]);
        return b;
    }

    /// <summary>The set from <see cref="ToBytes"/>.</summary>
    public static PointSet FromBytes(byte[] bytes, long capacity)
    {
        var s = new PointSet(capacity);
        if (bytes.Length != s._words.Length * sizeof(long)) throw new ArgumentException("length does not match the capacity", nameof(bytes));
        for (int i = 0; i < s._words.Length; i++)
        {
            s._words[i] = BinaryPrimitives.ReadInt64LittleEndian(bytes.AsSpan(i * sizeof(long)));
            s._count += long.PopCount(s._words[i]);
        }
        return s;
    }
}

/// <summary>
/// Where each finished point of a run is: for every position of the shard, the journal file and the byte range of
/// its line, kept in a scratch file on disk (16 bytes per position) so that memory does not grow with the number of
/// points; plus one bit per position in memory. Reading back in position order gives the records sorted by index
/// (the outputs are streamed from it). Thread-safe for <see cref="Add"/>; the scratch file is deleted on dispose.
/// </summary>
public sealed class SweepIndex : IDisposable
{
    private const int EntrySize = 16;
    private const int BlockEntries = 4096;
    private readonly FileStream _entries;
    private readonly Func<int, long, int, byte[]> _readLine;
    private readonly object _countGate = new();
    private long _failed;

    /// <summary>Creates the index of <paramref name="positions"/> positions in a scratch file at <paramref name="scratchPath"/>.</summary>
    /// <param name="positions">Positions of the shard (point index = shard.Index + position * shard.Count).</param>
    /// <param name="shard">The shard.</param>
    /// <param name="scratchPath">The scratch file (created; deleted on dispose).</param>
    /// <param name="readLine">Reads (file id, offset, length) back as the line's bytes.</param>
    public SweepIndex(long positions, ShardSpec shard, string scratchPath, Func<int, long, int, byte[]> readLine)
    {
        Positions = positions;
        Shard = shard;
        ScratchPath = scratchPath;
        _readLine = readLine;
        Done = new PointSet(positions);
        _entries = new FileStream(scratchPath, FileMode.CreateNew, FileAccess.ReadWrite, FileShare.None, 1, FileOptions.DeleteOnClose);
        _entries.SetLength(positions * EntrySize);
    }

    /// <summary>The number of positions.</summary>
    public long Positions { get; }

    /// <summary>The shard whose points these are.</summary>
    public ShardSpec Shard { get; }

    /// <summary>The scratch file.</summary>
    public string ScratchPath { get; }

    /// <summary>The finished positions.</summary>
    public PointSet Done { get; }

    /// <summary>Finished points that failed.</summary>
    public long Failed
    {
        get { lock (_countGate) return _failed; }
    }

    /// <summary>The position of point <paramref name="index"/> in the shard.</summary>
    public long PositionOf(long index) => (index - Shard.Index) / Shard.Count;

    /// <summary>The point index at <paramref name="position"/>.</summary>
    public long IndexAt(long position) => Shard.Index + position * Shard.Count;

    /// <summary>Records where the line of <paramref name="record"/> is; false when the point was already there.</summary>
    public bool Add(SweepRecord record, int file, long offset, int length)
    {
        long pos = PositionOf(record.Index);
        if (Done.Contains(pos)) return false;
        Span<byte> e = stackalloc byte[EntrySize];
        BinaryPrimitives.WriteInt64LittleEndian(e, offset);
        BinaryPrimitives.WriteInt32LittleEndian(e[8..], length + 1); // 0 = empty
        BinaryPrimitives.WriteInt32LittleEndian(e[12..], file);
        RandomAccess.Write(_entries.SafeFileHandle, e, pos * EntrySize);
        lock (_countGate)
        {
            if (!Done.Add(pos)) return false; // a concurrent duplicate: same line content, harmless
            if (!record.Ok) _failed++;
        }
        return true;
    }

    /// <summary>A copy of the finished set and the failed count at one moment (for a consistent snapshot).</summary>
    public (PointSet Done, long Failed) Freeze()
    {
        lock (_countGate) return (PointSet.FromBytes(Done.ToBytes(), Positions), _failed);
    }

    /// <summary>
    /// The finished records in index order (those in <paramref name="only"/>, default all), read back from the journals
    /// (one line in memory at a time).
    /// </summary>
    public IEnumerable<SweepRecord> Records(PointSet? only = null)
    {
        var set = only ?? Done;
        var block = new byte[BlockEntries * EntrySize];
        for (long start = 0; start < Positions; start += BlockEntries)
        {
            int n = (int)Math.Min(BlockEntries, Positions - start);
            int read = 0;
            while (read < n * EntrySize)
            {
                int got = RandomAccess.Read(_entries.SafeFileHandle, block.AsSpan(read, n * EntrySize - read), start * EntrySize + read);
                if (got == 0) break;
                read += got;
            }
            for (int j = 0; j < n; j++)
            {
                if (!set.Contains(start + j)) continue;
                var e = block.AsSpan(j * EntrySize, EntrySize);
                long offset = BinaryPrimitives.ReadInt64LittleEndian(e);
                int length = BinaryPrimitives.ReadInt32LittleEndian(e[8..]) - 1;
                int file = BinaryPrimitives.ReadInt32LittleEndian(e[12..]);
                if (length < 0) continue;
                yield return SweepRecord.FromJson(_readLine(file, offset, length));
            }
        }
    }

    /// <inheritdoc />
    public void Dispose() => _entries.Dispose();
}
