using System.Globalization;
using System.Text;

namespace ModeSolver.Sweeps;

/// <summary>A user error in a sweep specification, its journal or its outputs. The message is one line and names the key or file.</summary>
public sealed class SweepException : Physics.ModeSolverException
{
    /// <summary>Creates the error with its one-line message.</summary>
    public SweepException(string message) : base(message) { }

    /// <inheritdoc/>
    public override int ExitCode => Physics.ExitCodes.Input;
}

/// <summary>How an axis' values were given in the deck.</summary>
public enum SweepAxisKind
{
    /// <summary>count values evenly spaced from start to stop (both included).</summary>
    Linear,
    /// <summary>count values evenly spaced in log10 from start to stop (both included, both &gt; 0).</summary>
    Log,
    /// <summary>An explicit list of values.</summary>
    List,
}

/// <summary>One swept setting: an opaque key (interpreted by the evaluator) and its ordered values.</summary>
public sealed class SweepAxis
{
    private readonly double[]? _list;
    private readonly double _start, _stop;
    private readonly int _count;

    /// <summary>Creates an axis; <paramref name="values"/> is copied.</summary>
    public SweepAxis(string key, SweepAxisKind kind, IReadOnlyList<double> values)
    {
        if (string.IsNullOrWhiteSpace(key)) throw new SweepException("sweep axis: key is empty");
        if (values.Count == 0) throw new SweepException($"sweep axis '{key}': no values");
        Key = key;
        Kind = kind;
        _list = values.ToArray();
        _count = _list.Length;
        Values = _list;
    }

    // A linear or log axis keeps only its bounds: its values are computed on demand, so a huge count allocates nothing.
    private SweepAxis(string key, SweepAxisKind kind, double start, double stop, int count)
    {
        Key = key;
        Kind = kind;
        _start = start;
        _stop = stop;
        _count = count;
        Values = new LazyValues(this);
    }

    /// <summary>The setting's key, e.g. "param.alpha" or "efolds".</summary>
    public string Key { get; }

    /// <summary>How the values were specified.</summary>
    public SweepAxisKind Kind { get; }

    /// <summary>The values in deck order (computed on demand for linear and log axes).</summary>
    public IReadOnlyList<double> Values { get; }

    /// <summary>The number of values.</summary>
    public int Count => _count;

    /// <summary>The value at position <paramref name="i"/> (0 &lt;= i &lt; <see cref="Count"/>).</summary>
    public double ValueAt(int i)
    {
        if ((uint)i >= (uint)_count) throw new ArgumentOutOfRangeException(nameof(i));
        if (_list is not null) return _list[i];
        if (_count == 1 || i == 0) return _start;
        if (i == _count - 1) return _stop;
        if (Kind == SweepAxisKind.Linear) return _start + (_stop - _start) * i / (_count - 1);
        double l0 = Math.Log10(_start), l1 = Math.Log10(_stop);
        return Math.Pow(10.0, l0 + (l1 - l0) * i / (_count - 1));
    }

    /// <summary>count values from start to stop, linearly spaced; the end points are exact.</summary>
    public static SweepAxis Linear(string key, double start, double stop, int count)
    {
        if (count < 1) throw new SweepException($"sweep axis '{key}': linear count must be at least 1, got {count}");
        if (!double.IsFinite(start) || !double.IsFinite(stop)) throw new SweepException($"sweep axis '{key}': linear bounds must be finite");
        if (string.IsNullOrWhiteSpace(key)) throw new SweepException("sweep axis: key is empty");
        return new SweepAxis(key, SweepAxisKind.Linear, start, stop, count);
    }

    /// <summary>count values from start to stop, evenly spaced in log10; the end points are exact.</summary>
    public static SweepAxis Log(string key, double start, double stop, int count)
    {
        if (count < 1) throw new SweepException($"sweep axis '{key}': log count must be at least 1, got {count}");
        if (!(start > 0) || !(stop > 0) || !double.IsFinite(start) || !double.IsFinite(stop))
            throw new SweepException($"sweep axis '{key}': log bounds must be positive and finite, got [{Fmt(start)}, {Fmt(stop)}]");
        if (string.IsNullOrWhiteSpace(key)) throw new SweepException("sweep axis: key is empty");
        return new SweepAxis(key, SweepAxisKind.Log, start, stop, count);
    }

    /// <summary>
    /// An axis over names (catalogue ids): its values are the positions 0, 1, ... in <paramref name="names"/>, which
    /// the evaluator maps back to the names (<see cref="Labels"/>); the outputs show the names.
    /// </summary>
    public static SweepAxis Named(string key, IReadOnlyList<string> names)
    {
        ArgumentNullException.ThrowIfNull(names);
        foreach (var n in names)
            if (string.IsNullOrWhiteSpace(n)) throw new SweepException($"sweep axis '{key}': names must be non-empty strings");
        var axis = new SweepAxis(key, SweepAxisKind.List, [.. Enumerable.Range(0, names.Count).Select(i => (double)i)]);
        axis.Labels = [.. names.Select(n => n.Trim())];
        return axis;
    }

    /// <summary>The names of an axis over names (<see cref="Named"/>), in order; null for a numeric axis.</summary>
    public IReadOnlyList<string>? Labels { get; private set; }

    /// <summary>The text of value <paramref name="v"/> of this axis: the name for an axis over names, else the number (G6).</summary>
    public string Text(double v) =>
        Labels is { } l && v >= 0 && v < l.Count && v == Math.Floor(v) ? l[(int)v] : v.ToString("G6", CultureInfo.InvariantCulture);

    /// <summary>An explicit list of values.</summary>
    public static SweepAxis List(string key, IReadOnlyList<double> values)
    {
        foreach (var x in values)
            if (!double.IsFinite(x)) throw new SweepException($"sweep axis '{key}': values must be finite numbers");
        return new SweepAxis(key, SweepAxisKind.List, values);
    }

    internal static string Fmt(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    private sealed class LazyValues(SweepAxis axis) : IReadOnlyList<double>
    {
        public double this[int index] => axis.ValueAt(index);
        public int Count => axis.Count;
        public IEnumerator<double> GetEnumerator()
        {
            for (int i = 0; i < axis.Count; i++) yield return axis.ValueAt(i);
        }
        System.Collections.IEnumerator System.Collections.IEnumerable.GetEnumerator() => GetEnumerator();
    }
}

/// <summary>
/// A sweep: axes over named keys, combined as a full grid, with optional zipped groups (axes of equal length that
/// move together and form one grid dimension). Point order: grid dimensions in deck order (a zip group sits at the
/// position of its first axis), the FIRST dimension slowest and the last fastest (row-major); point index =
/// sum over dimensions of i_d * stride_d. The index is stable: the same spec gives the same index for the same values.
/// </summary>
public sealed class SweepSpec
{
    private readonly int[][] _dimensions; // each dimension: axis indices moving together
    private readonly long[] _strides;

    /// <summary>Creates a spec. <paramref name="zip"/> lists groups of keys that move together (equal lengths).</summary>
    public SweepSpec(IReadOnlyList<SweepAxis> axes, IReadOnlyList<IReadOnlyList<string>>? zip = null,
        string? families = null, string? markers = null, bool spectra = false)
    {
        if (axes.Count == 0) throw new SweepException("sweep: at least one [[sweep.axis]] is required");
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var a in axes)
            if (!seen.Add(a.Key)) throw new SweepException($"sweep axis '{a.Key}': key appears twice");
        Axes = axes.ToArray();
        var groupOf = new int[Axes.Count];
        Array.Fill(groupOf, -1);
        var zipGroups = new List<IReadOnlyList<string>>();
        if (zip is not null)
        {
            for (int g = 0; g < zip.Count; g++)
            {
                var group = zip[g];
                if (group.Count < 2) throw new SweepException($"sweep.zip: group {g + 1} needs at least two keys");
                int len = -1;
                foreach (var key in group)
                {
                    int ai = IndexOf(key);
                    if (ai < 0) throw new SweepException($"sweep.zip: '{key}' is not a swept key");
                    if (groupOf[ai] >= 0) throw new SweepException($"sweep.zip: '{key}' appears in two zip groups");
                    groupOf[ai] = g;
                    if (len >= 0 && Axes[ai].Count != len)
                        throw new SweepException($"sweep.zip: '{key}' has {Axes[ai].Count} values but '{group[0]}' has {len}; zipped axes need equal lengths");
                    len = Axes[ai].Count;
                }
                zipGroups.Add(group.ToArray());
            }
        }
        Zip = zipGroups;
        var dims = new List<int[]>();
        var placed = new bool[Axes.Count];
        for (int ai = 0; ai < Axes.Count; ai++)
        {
            if (placed[ai]) continue;
            if (groupOf[ai] < 0) { dims.Add([ai]); placed[ai] = true; continue; }
            var members = new List<int>();
            for (int aj = ai; aj < Axes.Count; aj++)
                if (groupOf[aj] == groupOf[ai]) { members.Add(aj); placed[aj] = true; }
            dims.Add(members.ToArray());
        }
        _dimensions = dims.ToArray();
        _strides = new long[_dimensions.Length];
        long total = 1;
        for (int d = _dimensions.Length - 1; d >= 0; d--)
        {
            _strides[d] = total;
            long len = Axes[_dimensions[d][0]].Count;
            if (total > long.MaxValue / len) throw new SweepException($"sweep: the grid has more than {long.MaxValue} points ({GridSizeText()}); use fewer or shorter axes");
            total *= len;
        }
        PointCount = total;
        if (families is not null && IndexOf(families) < 0) throw new SweepException($"sweep.families: '{families}' is not a swept key");
        if (markers is not null && IndexOf(markers) < 0) throw new SweepException($"sweep.markers: '{markers}' is not a swept key");
        Families = families;
        Markers = markers;
        Spectra = spectra;
        Keys = Axes.Select(a => a.Key).ToArray();
    }

    /// <summary>The axes in deck order.</summary>
    public IReadOnlyList<SweepAxis> Axes { get; }

    /// <summary>The swept keys in deck order (the column order of the outputs).</summary>
    public IReadOnlyList<string> Keys { get; }

    /// <summary>Groups of keys that move together.</summary>
    public IReadOnlyList<IReadOnlyList<string>> Zip { get; }

    /// <summary>The key along which the plot draws a line (one line per combination of the other keys), or null.</summary>
    public string? Families { get; }

    /// <summary>The key whose values get distinct marker shapes in the plot, or null.</summary>
    public string? Markers { get; }

    /// <summary>Whether the plot draws r on a logarithmic axis (plot only: not part of <see cref="CanonicalText"/>).</summary>
    public bool LogR { get; init; }

    /// <summary>Whether each point should also return its spectrum arrays (k, P_s, P_t).</summary>
    public bool Spectra { get; }

    /// <summary>The number of points.</summary>
    public long PointCount { get; }

    /// <summary>The position of <paramref name="key"/> in <see cref="Keys"/>, or -1.</summary>
    public int IndexOf(string key)
    {
        for (int i = 0; i < Axes.Count; i++)
            if (string.Equals(Axes[i].Key, key, StringComparison.Ordinal)) return i;
        return -1;
    }

    /// <summary>Fills <paramref name="values"/> (length = number of axes, deck order) with the values of point <paramref name="index"/>.</summary>
    public void GetValues(long index, Span<double> values)
    {
        if ((ulong)index >= (ulong)PointCount) throw new ArgumentOutOfRangeException(nameof(index));
        if (values.Length != Axes.Count) throw new ArgumentException("length must equal the number of axes", nameof(values));
        long rest = index;
        for (int d = 0; d < _dimensions.Length; d++)
        {
            int i = (int)(rest / _strides[d]);
            rest %= _strides[d];
            foreach (int ai in _dimensions[d]) values[ai] = Axes[ai].ValueAt(i);
        }
    }

    /// <summary>The point with the given index.</summary>
    public SweepPoint GetPoint(long index)
    {
        var v = new double[Axes.Count];
        GetValues(index, v);
        return new SweepPoint(index, Keys, v, Spectra);
    }

    /// <summary>All points in index order (enumerated lazily).</summary>
    public IEnumerable<SweepPoint> Points()
    {
        for (long i = 0; i < PointCount; i++) yield return GetPoint(i);
    }

    /// <summary>The default limit on the number of points of one sweep (<see cref="CheckPointCount"/>).</summary>
    public const long DefaultMaxPoints = 100_000_000;

    /// <summary>
    /// Refuses a grid above <paramref name="maxPoints"/> points in one line with the count (checked before anything
    /// is allocated per point: the grid itself is never materialised).
    /// </summary>
    public void CheckPointCount(long maxPoints, string source)
    {
        if (PointCount > maxPoints)
            throw new SweepException($"{source}: the sweep has {PointCount} points ({GridSizeText()}), above the limit of {maxPoints}; shorten the axes or raise the limit with --max-points");
    }

    private string GridSizeText() => string.Join(" x ", Axes.Select(a => $"{a.Count} {a.Key}"));

    /// <summary>A canonical text of the spec (values in round-trip form), used for the fingerprint.</summary>
    public string CanonicalText()
    {
        var sb = new StringBuilder();
        WriteCanonical(piece => sb.Append(piece));
        return sb.ToString();
    }

    /// <summary>The pieces of <see cref="CanonicalText"/> in order, without building the whole text.</summary>
    public void WriteCanonical(Action<string> sink)
    {
        ArgumentNullException.ThrowIfNull(sink);
        sink("sweep-spec v1\n");
        foreach (var a in Axes)
        {
            sink("axis " + a.Key + " " + a.Kind.ToString() + ":");
            if (a.Labels is { } names) foreach (var n in names) sink(" " + n);
            else for (int i = 0; i < a.Count; i++) sink(" " + SweepAxis.Fmt(a.ValueAt(i)));
            sink("\n");
        }
        foreach (var g in Zip) sink("zip " + string.Join(' ', g) + "\n");
        sink("spectra " + (Spectra ? "true" : "false") + "\n");
    }
}
