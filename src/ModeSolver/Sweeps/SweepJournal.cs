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

/// <summary>The header line of a journal.</summary>
public sealed record SweepJournalHeader(string Fingerprint, long PointCount, ShardSpec Shard)
{
    internal const string Magic = "modesolver-sweep-journal";

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
            return new SweepJournalHeader(e.GetProperty("fingerprint").GetString() ?? "", e.GetProperty("points").GetInt64(),
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
        var text = spec.CanonicalText() + "\n--- deck ---\n" + deckTextWithoutSweep.Replace("\r\n", "\n");
        return Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(text)));
    }

    /// <summary>
    /// Reads a journal file: its header and its records (first occurrence of each index wins). A last line without
    /// its newline (a write cut by a kill) is ignored and reported in <paramref name="validLength"/> (the byte length
    /// up to the last complete line). Throws a <see cref="SweepException"/> naming the file and line for any other damage.
    /// </summary>
    public static (SweepJournalHeader Header, List<SweepRecord> Records) Read(string path, out long validLength)
    {
        byte[] bytes = File.ReadAllBytes(path);
        int lastNewline = Array.LastIndexOf(bytes, (byte)'\n');
        validLength = lastNewline + 1;
        int pos = 0, lineNo = 0;
        SweepJournalHeader? header = null;
        var records = new List<SweepRecord>();
        var seen = new HashSet<long>();
        while (pos < validLength)
        {
            int nl = Array.IndexOf(bytes, (byte)'\n', pos);
            var line = new ReadOnlySpan<byte>(bytes, pos, nl - pos);
            pos = nl + 1;
            lineNo++;
            if (lineNo == 1)
            {
                header = SweepJournalHeader.TryParse(line) ?? throw new SweepException($"{path}: line 1 is not a sweep journal header");
                continue;
            }
            if (line.IsEmpty) continue;
            SweepRecord rec;
            try { rec = SweepRecord.FromJson(line); }
            catch (Exception e) when (e is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
            {
                throw new SweepException($"{path}: line {lineNo} is damaged ({SweepDeck.OneLine(e.Message)})");
            }
            if (rec.Index < 0 || rec.Index >= header!.PointCount)
                throw new SweepException($"{path}: line {lineNo} has point index {rec.Index} outside 0..{header!.PointCount - 1}");
            if (seen.Add(rec.Index)) records.Add(rec);
        }
        if (header is null)
        {
            // Not even a complete header: treat as empty (the kill came before the first flush).
            validLength = 0;
            return (new SweepJournalHeader("", 0, ShardSpec.All), records);
        }
        return (header, records);
    }

    /// <summary>
    /// Opens the journal for appending. An existing journal must carry the same fingerprint, point count and shard,
    /// else a <see cref="SweepException"/> says so (unless <paramref name="restart"/>, which starts a new journal).
    /// Returns the journal and the records already in it.
    /// </summary>
    public static SweepJournal Open(string path, SweepJournalHeader header, bool restart, out List<SweepRecord> existing)
    {
        existing = [];
        if (File.Exists(path) && !restart)
        {
            var (h, recs) = Read(path, out long valid);
            if (valid > 0)
            {
                if (h.Fingerprint != header.Fingerprint || h.PointCount != header.PointCount)
                    throw new SweepException($"{path} belongs to a different deck or sweep (fingerprint {Short(h.Fingerprint)} here, {Short(header.Fingerprint)} now); use --restart to start over or another --out");
                if (h.Shard != header.Shard)
                    throw new SweepException($"{path} was written for shard {h.Shard}, not {header.Shard}; use --restart to start over or another --out");
                existing = recs;
                var fs = new FileStream(path, FileMode.Open, FileAccess.Write, FileShare.Read);
                fs.SetLength(valid);
                fs.Seek(valid, SeekOrigin.Begin);
                return new SweepJournal(fs, path, header);
            }
        }
        var created = new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.Read);
        var bytes = header.ToJsonLine();
        created.Write(bytes);
        created.Flush(true);
        return new SweepJournal(created, path, header);
    }

    /// <summary>Appends a record as one line (one write, then flush). Thread-safe.</summary>
    public void Append(SweepRecord record) => AppendLine(record.ToJsonLine());

    /// <summary>Appends ready-made journal line bytes (ending in '\n'). Thread-safe.</summary>
    public void AppendLine(byte[] line)
    {
        lock (_gate)
        {
            _stream.Write(line);
            _stream.Flush(false);
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

    private static string Short(string fp) => fp.Length > 12 ? fp[..12] : fp.Length == 0 ? "(none)" : fp;
}
