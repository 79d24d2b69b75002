using System.Security.Cryptography;
using System.Text;
using System.Text.Json;

namespace ModeSolver.Sweeps;

/// <summary>A shard of a sweep: the points with index % Count == Index.</summary>
public readonly record struct ShardSpec(int Index, int Count)
{
    /// <summary>The whole sweep (one shard).</summary>
    public static ShardSpec All => new(0, 1);

    /// <summary>True when this shard runs point <paramref name="pointIndex"/>.</summary>
    public bool Contains(long pointIndex) => pointIndex % Count == Index;

    /// <summary>Parses "I/N" with 0 &lt;= I &lt; N.</summary>
    public static ShardSpec Parse(string text)
    {
        var parts = text.Split('/');
        if (parts.Length != 2 || !int.TryParse(parts[0], out int i) || !int.TryParse(parts[1], out int n) || n < 1 || i < 0 || i >= n)
            throw new SweepException($"--shard: expected I/N with 0 <= I < N (e.g. 0/4), got '{text}'");
        return new ShardSpec(i, n);
    }

    /// <inheritdoc />
    public override string ToString() => $"{Index}/{Count}";
}

/// <summary>Receives a journal record, the byte offset of its line and the line itself (without its newline).</summary>
public delegate void JournalLineHandler(SweepRecord record, long offset, ReadOnlySpan<byte> line);

/// <summary>The header line of a journal.</summary>
public sealed record SweepJournalHeader(string Fingerprint, long PointCount, ShardSpec Shard)
{
    internal const string Magic = "modesolver-sweep-journal";
    private const long MaxPoints = 1L << 40;

    internal byte[] ToJsonLine()
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms))
        {
            w.WriteStartObject();
            w.WriteString("journal", Magic);
            w.WriteNumber("version", 1);
            w.WriteString("fingerprint", Fingerprint);
            w.WriteNumber("points", PointCount);
            w.WriteString("shard", Shard.ToString());
            w.WriteEndObject();
        }
        ms.WriteByte((byte)'\n');
        return ms.ToArray();
    }

    internal static SweepJournalHeader? TryParse(ReadOnlySpan<byte> line)
    {
        try
        {
            using var doc = JsonDocument.Parse(line.ToArray());
            var e = doc.RootElement;
            if (!e.TryGetProperty("journal", out var m) || m.GetString() != Magic) return null;
            long points = e.GetProperty("points").GetInt64();
            if (points < 0 || points > MaxPoints) return null; // not a journal we wrote (and not worth a bit set that large)
            return new SweepJournalHeader(e.GetProperty("fingerprint").GetString() ?? "", points,
                ShardSpec.Parse(e.GetProperty("shard").GetString() ?? ""));
        }
        catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or SweepException or FormatException)
        {
            return null;
        }
    }
}

/// <summary>
/// The append-only journal of a sweep: a header line, then one JSON line per finished point, each written with a
/// single write and flushed. Reading tolerates a truncated last line (it is cut off before appending).
/// </summary>
public sealed class SweepJournal : IDisposable
{
    private readonly FileStream _stream;
    private readonly object _gate = new();

    private SweepJournal(FileStream stream, string path, SweepJournalHeader header)
    {
        _stream = stream;
        Path = path;
        Header = header;
    }

    /// <summary>The journal file.</summary>
    public string Path { get; }

    /// <summary>The header of this journal.</summary>
    public SweepJournalHeader Header { get; }

    /// <summary>The fingerprint of a sweep: SHA-256 of the spec's canonical text and of the deck without its sweep table.</summary>
    public static string Fingerprint(SweepSpec spec, string deckTextWithoutSweep)
    {
        // Streamed into the hash: a long axis never becomes one big string.
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        void Add(string piece) => hash.AppendData(Encoding.UTF8.GetBytes(piece));
        spec.WriteCanonical(Add);
        Add("\n--- deck ---\n");
        Add(deckTextWithoutSweep.Replace("\r\n", "\n"));
        return Convert.ToHexStringLower(hash.GetHashAndReset());
    }

    /// <summary>
    /// Reads a journal file: its header and its records (first occurrence of each index wins). A last line without
    /// its newline (a write cut by a kill) is ignored and reported in <paramref name="validLength"/> (the byte length
    /// up to the last complete line). Throws a <see cref="SweepException"/> naming the file and line for any other damage.
    /// Holds every record: for small journals and tests; the runner and the merge use <see cref="Scan"/>.
    /// </summary>
    public static (SweepJournalHeader Header, List<SweepRecord> Records) Read(string path, out long validLength)
    {
        var records = new List<SweepRecord>();
        var header = Scan(path, (r, _, _) => records.Add(r), out validLength);
        return (header, records);
    }

    /// <summary>
    /// Streams a journal file: calls <paramref name="onRecord"/> with each record (first occurrence of each index),
    /// the byte offset of its line and the line (without the newline), in file order. Memory: one line and
    /// one bit per point of the sweep. Same damage rules as <see cref="Read"/>.
    /// </summary>
    public static SweepJournalHeader Scan(string path, JournalLineHandler onRecord, out long validLength)
    {
        var result = new ScanResult();
        foreach (var (rec, offset, line) in Entries(path, result)) onRecord(rec, offset, line.Span);
        validLength = result.ValidLength;
        return result.Header;
    }

    /// <summary>The records of a journal file (first occurrence of each index), streamed in file order; same damage rules as <see cref="Read"/>.</summary>
    public static IEnumerable<SweepRecord> Records(string path)
    {
        foreach (var (rec, _, _) in Entries(path, new ScanResult())) yield return rec;
    }

    private sealed class ScanResult
    {
        public SweepJournalHeader Header = new("", 0, ShardSpec.All);
        public long ValidLength;
    }

    // The line memory is valid until the next item.
    private static IEnumerable<(SweepRecord Record, long Offset, ReadOnlyMemory<byte> Line)> Entries(string path, ScanResult result)
    {
        using var fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, 1 << 16);
        var reader = new LineReader(fs);
        long lineNo = 0;
        SweepJournalHeader? header = null;
        PointSet? seen = null;
        while (reader.Next(out var line, out long offset))
        {
            lineNo++;
            result.ValidLength = offset + line.Length + 1;
            if (lineNo == 1)
            {
                header = SweepJournalHeader.TryParse(line.Span) ?? throw new SweepException($"{path}: line 1 is not a sweep journal header");
                result.Header = header;
                seen = new PointSet(header.PointCount);
                continue;
            }
            if (line.IsEmpty) continue;
            SweepRecord rec;
            try { rec = SweepRecord.FromJson(line.Span); }
            catch (Exception e) when (e is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
            {
                throw new SweepException($"{path}: line {lineNo} is damaged ({SweepDeck.OneLine(e.Message)})");
            }
            if (rec.Index < 0 || rec.Index >= header!.PointCount)
                throw new SweepException($"{path}: line {lineNo} has point index {rec.Index} outside 0..{header!.PointCount - 1}");
            if (seen!.Add(rec.Index)) yield return (rec, offset, line);
        }
        // Without even a complete header the journal counts as empty (the kill came before the first flush).
        if (header is null) result.ValidLength = 0;
    }

    /// <summary>The header of the journal at <paramref name="path"/>, or null when its first line is not complete or not a header.</summary>
    public static SweepJournalHeader? ReadHeader(string path)
    {
        using var probe = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, 1 << 12);
        return new LineReader(probe).Next(out var first, out _) ? SweepJournalHeader.TryParse(first.Span) : null;
    }

    /// <summary>
    /// Opens the journal for appending. An existing journal must carry the same fingerprint, point count and shard,
    /// else a <see cref="SweepException"/> says so (unless <paramref name="restart"/>, which starts a new journal).
    /// <paramref name="onExisting"/> receives the records already in it (with their line offsets and lengths).
    /// </summary>
    public static SweepJournal Open(string path, SweepJournalHeader header, bool restart, JournalLineHandler? onExisting = null)
    {
        if (File.Exists(path) && !restart)
        {
            long valid;
            // Check the header before handing out any record, so a journal of another sweep is refused without side effects.
            var h = HasCompleteFirstLine(path)
                ? ReadHeader(path) ?? throw new SweepException($"{path}: line 1 is not a sweep journal header")
                : new SweepJournalHeader("", 0, ShardSpec.All);
            if (h.Fingerprint.Length > 0)
            {
                if (h.Fingerprint != header.Fingerprint || h.PointCount != header.PointCount)
                    throw new SweepException($"{path} belongs to a different deck or sweep (fingerprint {Short(h.Fingerprint)} here, {Short(header.Fingerprint)} now); use --restart to start over or another --out");
                if (h.Shard != header.Shard)
                    throw new SweepException($"{path} was written for shard {h.Shard}, not {header.Shard}; use --restart to start over or another --out");
                Scan(path, onExisting ?? ((_, _, _) => { }), out valid);
                var fs = OpenExclusive(path, FileMode.Open);
                fs.SetLength(valid);
                fs.Seek(valid, SeekOrigin.Begin);
                return new SweepJournal(fs, path, header);
            }
        }
        var created = OpenExclusive(path, FileMode.Create);
        var bytes = header.ToJsonLine();
        created.Write(bytes);
        created.Flush(true);
        return new SweepJournal(created, path, header);
    }

    /// <summary>Same as <see cref="Open(string, SweepJournalHeader, bool, JournalLineHandler?)"/>, collecting the existing records.</summary>
    public static SweepJournal Open(string path, SweepJournalHeader header, bool restart, out List<SweepRecord> existing)
    {
        var list = new List<SweepRecord>();
        var journal = Open(path, header, restart, (r, _, _) => list.Add(r));
        existing = list;
        return journal;
    }

    private static bool HasCompleteFirstLine(string path)
    {
        using var probe = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite, 1 << 12);
        return new LineReader(probe).Next(out _, out _);
    }

    // Unbuffered (every append is one write), readable by this process for the snapshots (RandomAccess on the handle).
    private static FileStream OpenExclusive(string path, FileMode mode, FileShare share = FileShare.Read) =>
        new(path, mode, FileAccess.ReadWrite, share, bufferSize: 0);

    /// <summary>
    /// Creates a new journal that no other process can open while this one holds it (an exclusive flock): a rank's
    /// own journal, so that a later run cannot fold it while a rank of a killed run still writes.
    /// </summary>
    public static SweepJournal CreateHeld(string path, SweepJournalHeader header)
    {
        var created = OpenExclusive(path, FileMode.Create, FileShare.None);
        created.Write(header.ToJsonLine());
        created.Flush(true);
        return new SweepJournal(created, path, header);
    }

    /// <summary>The bytes of a line at <paramref name="offset"/> written through this journal (or found in it when opened).</summary>
    public void ReadLine(long offset, Span<byte> line) => RandomAccess.Read(_stream.SafeFileHandle, line, offset);

    /// <summary>Appends a record as one line (one write, then flush). Thread-safe. Returns the line's offset.</summary>
    public long Append(SweepRecord record) => AppendLine(record.ToJsonLine());

    /// <summary>Appends ready-made journal line bytes (ending in '\n'). Thread-safe. Returns the line's offset.</summary>
    public long AppendLine(ReadOnlySpan<byte> line)
    {
        lock (_gate)
        {
            long at = _stream.Position;
            _stream.Write(line);
            _stream.Flush(false);
            return at;
        }
    }

    /// <summary>Flushes to disk.</summary>
    public void FlushToDisk()
    {
        lock (_gate) _stream.Flush(true);
    }

    /// <inheritdoc />
    public void Dispose()
    {
        lock (_gate)
        {
            _stream.Flush(true);
            _stream.Dispose();
        }
    }

    /// <summary>Reads a stream line by line (lines end in '\n'; a last line without one is not returned), with offsets.</summary>
    private sealed class LineReader(Stream stream)
    {
        private byte[] _buffer = new byte[1 << 16];
        private int _start, _end;
        private long _bufferOffset;
        private bool _eof;

        public bool Next(out ReadOnlyMemory<byte> line, out long offset)
        {
            while (true)
            {
                int nl = Array.IndexOf(_buffer, (byte)'\n', _start, _end - _start);
                if (nl >= 0)
                {
                    line = new ReadOnlyMemory<byte>(_buffer, _start, nl - _start);
                    offset = _bufferOffset + _start;
                    _start = nl + 1;
                    return true;
                }
                if (_eof) { line = default; offset = _bufferOffset + _start; return false; }
                // Move the partial line to the front (grow for a long line) and read more.
                int rest = _end - _start;
                if (rest == _buffer.Length) Array.Resize(ref _buffer, _buffer.Length * 2);
                Buffer.BlockCopy(_buffer, _start, _buffer, 0, rest);
                _bufferOffset += _start;
                _start = 0;
                _end = rest;
                int n = stream.Read(_buffer, _end, _buffer.Length - _end);
                if (n == 0) _eof = true;
                else _end += n;
            }
        }
    }

    private static string Short(string fp) => fp.Length > 12 ? fp[..12] : fp.Length == 0 ? "(none)" : fp;
}
