using System.Globalization;
using System.Text;
using PureHDF;
using PureHDF.Selections;

namespace ModeSolver.Sweeps;

/// <summary>The file names inside a sweep output directory.</summary>
public static class SweepFiles
{
    /// <summary>The append-only journal (JSON lines).</summary>
    public const string Journal = "journal.jsonl";
    /// <summary>The table of points, sorted by index.</summary>
    public const string Csv = "points.csv";
    /// <summary>The HDF5 file, sorted by index.</summary>
    public const string Hdf5 = "sweep.h5";
    /// <summary>A copy of the deck the sweep ran with (read back by the shard merge).</summary>
    public const string Deck = "sweep-deck.toml";
    /// <summary>The (n_s, r) plot, PNG.</summary>
    public const string PlotPng = "ns-r.png";
    /// <summary>The (n_s, r) plot, SVG.</summary>
    public const string PlotSvg = "ns-r.svg";
}

/// <summary>
/// Writes the CSV and HDF5 files of a sweep from its records sorted by index, streamed (one block of rows in memory),
/// each under a temporary name unique to the run, then renamed.
/// </summary>
public static class SweepOutputs
{
    /// <summary>The result columns of the CSV after the index and the swept keys.</summary>
    public static readonly IReadOnlyList<string> ResultColumns =
        ["n_s", "r", "alpha_s", "n_t", "A_s", "N_star", "V_scale", "delta_chi2", "beta_iso", "cos_delta", "T_RS", "f_NL_local", "flags", "status", "message"];

    /// <summary>
    /// Delta chi^2 of a point's (n_s, r) in the Gaussian approximation of the data with its default values
    /// (<see cref="Observables.DataDistance"/>; an approximation, not the likelihood).
    /// </summary>
    public static double DeltaChi2(SweepRecord r)
    {
        ArgumentNullException.ThrowIfNull(r);
        return r.Ok ? Observables.DataDistance.DeltaChi2(r.Ns, r.R, DefaultData) : double.NaN;
    }

    private static readonly Observables.DataConstraints DefaultData = new();

    /// <summary>The end of every temporary name a sweep writes (leftovers of killed runs are recognised by it).</summary>
    public const string TemporaryExtension = ".sweep-tmp";

    private const int RowBlock = 1 << 14;

    /// <summary>Writes points.csv and sweep.h5 into <paramref name="directory"/>. Records need not be sorted (they are held in memory: small sweeps and tests).</summary>
    public static void Write(string directory, SweepSpec spec, string fingerprint, IEnumerable<SweepRecord> records)
    {
        var sorted = records.OrderBy(r => r.Index).ToList();
        Write(directory, spec, fingerprint, () => sorted, sorted.Count, sorted.Count(r => !r.Ok));
    }

    /// <summary>
    /// Writes points.csv and sweep.h5 into <paramref name="directory"/> from <paramref name="sorted"/> (enumerated once,
    /// twice with spectra), which yields <paramref name="count"/> records in index order, <paramref name="failed"/> of them failed.
    /// </summary>
    public static void Write(string directory, SweepSpec spec, string fingerprint, Func<IEnumerable<SweepRecord>> sorted, long count, long failed)
    {
        string csvPath = Path.Combine(directory, SweepFiles.Csv), h5Path = Path.Combine(directory, SweepFiles.Hdf5);
        string csvTmp = TemporaryName(csvPath), h5Tmp = TemporaryName(h5Path);
        try
        {
            var spectra = spec.Spectra ? new SpectraLayout(sorted()) : null;
            var layout = new Hdf5Layout(spec, fingerprint, count, failed, spectra?.Group);
            using (var csv = new StreamWriter(csvTmp, false, new UTF8Encoding(false), 1 << 16))
            using (var h5 = layout.File.BeginWrite(h5Tmp))
            {
                csv.NewLine = "\n";
                WriteCsvHeader(csv, spec);
                var values = new double[spec.Keys.Count];
                var block = new RowBuffer(spec.Keys.Count);
                long written = 0;
                foreach (var r in sorted())
                {
                    spec.GetValues(r.Index, values);
                    WriteCsvRow(csv, spec, values, r);
                    block.Add(r, values);
                    spectra?.Write(h5, r);
                    if (block.Count == RowBlock) { layout.WriteBlock(h5, block, written); written += block.Count; block.Clear(); }
                }
                if (block.Count > 0) { layout.WriteBlock(h5, block, written); written += block.Count; }
                if (written != count) throw new InvalidOperationException($"sweep outputs: {written} records where {count} were announced");
            }
            File.Move(csvTmp, csvPath, overwrite: true);
            File.Move(h5Tmp, h5Path, overwrite: true);
        }
        finally
        {
            if (File.Exists(csvTmp)) File.Delete(csvTmp);
            if (File.Exists(h5Tmp)) File.Delete(h5Tmp);
        }
    }

    /// <summary>Runs <paramref name="write"/> on a temporary name beside <paramref name="path"/> (unique to this run), then renames it over <paramref name="path"/>.</summary>
    public static void WriteAtomically(string path, Action<string> write)
    {
        string tmp = TemporaryName(path);
        try
        {
            write(tmp);
            File.Move(tmp, path, overwrite: true);
        }
        finally
        {
            if (File.Exists(tmp)) File.Delete(tmp);
        }
    }

    /// <summary>A temporary name beside <paramref name="path"/>, unique to this process and call.</summary>
    public static string TemporaryName(string path) =>
        $"{path}.{Environment.ProcessId:x}-{Guid.NewGuid().ToString("N")[..8]}{TemporaryExtension}";

    /// <summary>
    /// Removes the temporaries of killed runs (regular files ending in <see cref="TemporaryExtension"/>) from
    /// <paramref name="directory"/>. Call only while holding the directory's lock.
    /// </summary>
    public static void RemoveLeftovers(string directory)
    {
        foreach (var p in Directory.GetFiles(directory, "*" + TemporaryExtension))
            if (FileKind.IsRegularFile(p)) File.Delete(p);
    }

    /// <summary>The CSV text: header, then one row per record sorted by index (records must be sorted).</summary>
    public static string Csv(SweepSpec spec, IReadOnlyList<SweepRecord> sorted)
    {
        using var w = new StringWriter(CultureInfo.InvariantCulture) { NewLine = "\n" };
        WriteCsvHeader(w, spec);
        var values = new double[spec.Keys.Count];
        foreach (var r in sorted)
        {
            spec.GetValues(r.Index, values);
            WriteCsvRow(w, spec, values, r);
        }
        return w.ToString();
    }

    private static void WriteCsvHeader(TextWriter w, SweepSpec spec)
    {
        w.Write("index");
        foreach (var k in spec.Keys) { w.Write(','); w.Write(Quote(k)); }
        foreach (var c in ResultColumns) { w.Write(','); w.Write(c); }
        w.Write('\n');
    }

    private static void WriteCsvRow(TextWriter w, SweepSpec spec, double[] values, SweepRecord r)
    {
        w.Write(r.Index.ToString(CultureInfo.InvariantCulture));
        // An axis over names (catalogue ids) writes the name; a numeric axis its value in round-trip form.
        for (int j = 0; j < values.Length; j++) { w.Write(','); w.Write(spec.Axes[j].Labels is null ? F(values[j]) : Quote(spec.Axes[j].Text(values[j]))); }
        if (r.Ok)
        {
            foreach (var v in new[] { r.Ns, r.R, r.AlphaS, r.Nt, r.As, r.NStar, r.VScale, DeltaChi2(r) }) { w.Write(','); w.Write(F(v)); }
            // The n-field columns are empty where the point has no such value (one field; cos Delta not resolved).
            foreach (var v in new[] { r.BetaIso, r.CosDelta, r.Trs, r.FNlLocal }) { w.Write(','); if (double.IsFinite(v)) w.Write(F(v)); }
            w.Write(',');
            w.Write(Quote(string.Join(';', r.Flags)));
            w.Write(",ok,");
        }
        else
        {
            w.Write(",,,,,,,,,,,,,,failed,");
            w.Write(Quote(r.Message));
        }
        w.Write('\n');
    }

    /// <summary>
    /// The /spectra group, streamed: a first pass over the records declares each point's k, P_s, P_t datasets by
    /// length only; the second pass (the row loop) writes each point's arrays as it goes, so no spectrum is held in
    /// memory beyond the one being written (the declared datasets cost a few hundred bytes per point).
    /// </summary>
    private sealed class SpectraLayout
    {
        private readonly List<(long Index, H5Dataset<double[]>? K, H5Dataset<double[]>? Ps, H5Dataset<double[]>? Pt)> _points = [];
        private int _next;

        public SpectraLayout(IEnumerable<SweepRecord> sorted)
        {
            foreach (var r in sorted)
            {
                if (r.K is null) continue;
                var g = new H5Group();
                var k = Declare(g, "k", r.K);
                var ps = r.Ps is null ? null : Declare(g, "P_s", r.Ps);
                var pt = r.Pt is null ? null : Declare(g, "P_t", r.Pt);
                Group[r.Index.ToString("D8", CultureInfo.InvariantCulture)] = g;
                _points.Add((r.Index, k, ps, pt));
            }
        }

        public H5Group Group { get; } = new();

        /// <summary>Writes the arrays of <paramref name="r"/> (records must come in the order of the first pass).</summary>
        public void Write(H5NativeWriter w, SweepRecord r)
        {
            if (r.K is null) return;
            var (index, k, ps, pt) = _points[_next++];
            if (index != r.Index) throw new InvalidOperationException($"sweep outputs: spectrum of point {r.Index} where {index} was declared");
            if (k is not null) w.Write(k, r.K);
            if (ps is not null) w.Write(ps, r.Ps!);
            if (pt is not null) w.Write(pt, r.Pt!);
        }

        /// <summary>A dataset of the array's length, written later; an empty array is stored as it is (null returned).</summary>
        private static H5Dataset<double[]>? Declare(H5Group g, string name, double[] data)
        {
            if (data.Length == 0)
            {
                g[name] = data;
                return null;
            }
            var ds = new H5Dataset<double[]>(fileDims: [(ulong)data.Length]);
            g[name] = ds;
            return ds;
        }
    }

    /// <summary>A block of HDF5 rows (column buffers, reused).</summary>
    private sealed class RowBuffer
    {
        public readonly long[] Index = new long[RowBlock];
        public readonly double[][] Settings;
        public readonly double[][] Results = new double[12][];
        public readonly string[] Status = new string[RowBlock], Message = new string[RowBlock], Flags = new string[RowBlock];
        public int Count;

        public RowBuffer(int keys)
        {
            Settings = new double[keys][];
            for (int j = 0; j < keys; j++) Settings[j] = new double[RowBlock];
            for (int j = 0; j < Results.Length; j++) Results[j] = new double[RowBlock];
        }

        public void Add(SweepRecord r, double[] values)
        {
            int i = Count++;
            Index[i] = r.Index;
            for (int j = 0; j < values.Length; j++) Settings[j][i] = values[j];
            Results[0][i] = r.Ok ? r.Ns : double.NaN;
            Results[1][i] = r.Ok ? r.R : double.NaN;
            Results[2][i] = r.Ok ? r.AlphaS : double.NaN;
            Results[3][i] = r.Ok ? r.Nt : double.NaN;
            Results[4][i] = r.Ok ? r.As : double.NaN;
            Results[5][i] = r.Ok ? r.NStar : double.NaN;
            Results[6][i] = r.Ok ? r.VScale : double.NaN;
            Results[7][i] = DeltaChi2(r);
            Results[8][i] = r.Ok ? r.BetaIso : double.NaN;
            Results[9][i] = r.Ok ? r.CosDelta : double.NaN;
            Results[10][i] = r.Ok ? r.Trs : double.NaN;
            Results[11][i] = r.Ok ? r.FNlLocal : double.NaN;
            Status[i] = r.Ok ? "ok" : "failed";
            Message[i] = r.Message;
            Flags[i] = r.Flags.Count == 0 ? "" : string.Join(';', r.Flags);
        }

        public void Clear() => Count = 0;
    }

    /// <summary>
    /// The HDF5 layout: root attributes (format, fingerprint, keys, counts), /grid/&lt;key&gt; (each axis' values),
    /// /points/index, /points/settings/&lt;key&gt;, /points/{n_s, r, alpha_s, n_t, A_s, N_star, V_scale, delta_chi2} (NaN for
    /// failed points), /points/{beta_iso, cos_delta, T_RS, f_NL_local} (NaN for one field and failed points), /points/{status, message, flags} (strings), and /spectra/&lt;index, 8 digits&gt;/{k, P_s, P_t}.
    /// The /points datasets are declared with their final length and filled block by block.
    /// </summary>
    private sealed class Hdf5Layout
    {
        private static readonly string[] ResultNames = ["n_s", "r", "alpha_s", "n_t", "A_s", "N_star", "V_scale", "delta_chi2", "beta_iso", "cos_delta", "T_RS", "f_NL_local"];
        private readonly H5Dataset<long[]> _index;
        private readonly H5Dataset<double[]>[] _settings, _results;
        private readonly H5Dataset<string[]> _status, _message, _flags;

        public Hdf5Layout(SweepSpec spec, string fingerprint, long count, long failed, H5Group? spectra)
        {
            File = new H5File();
            File.Attributes["format"] = "modesolver-sweep-1";
            File.Attributes["fingerprint"] = fingerprint;
            File.Attributes["keys"] = spec.Keys.ToArray();
            File.Attributes["point_count"] = spec.PointCount;
            File.Attributes["done_count"] = count;
            File.Attributes["failed_count"] = failed;
            var grid = new H5Group();
            foreach (var a in spec.Axes)
            {
                var values = new double[a.Count];
                for (int i = 0; i < values.Length; i++) values[i] = a.ValueAt(i);
                var ds = new H5Dataset<double[]>(values);
                ds.Attributes["kind"] = a.Kind.ToString().ToLowerInvariant();
                if (a.Labels is { } names) ds.Attributes["names"] = names.ToArray(); // the values are positions in this list
                grid[a.Key] = ds;
            }
            File["grid"] = grid;
            ulong[] dims = [(ulong)count];
            var points = new H5Group();
            points["index"] = _index = new H5Dataset<long[]>(fileDims: dims);
            var settings = new H5Group();
            _settings = new H5Dataset<double[]>[spec.Keys.Count];
            for (int j = 0; j < _settings.Length; j++) settings[spec.Keys[j]] = _settings[j] = new H5Dataset<double[]>(fileDims: dims);
            points["settings"] = settings;
            _results = new H5Dataset<double[]>[ResultNames.Length];
            for (int j = 0; j < _results.Length; j++) points[ResultNames[j]] = _results[j] = new H5Dataset<double[]>(fileDims: dims);
            points["status"] = _status = new H5Dataset<string[]>(fileDims: dims);
            points["message"] = _message = new H5Dataset<string[]>(fileDims: dims);
            points["flags"] = _flags = new H5Dataset<string[]>(fileDims: dims);
            File["points"] = points;
            if (spectra is not null) File["spectra"] = spectra;
        }

        public H5File File { get; }

        public void WriteBlock(H5NativeWriter w, RowBuffer b, long start)
        {
            int n = b.Count;
            var sel = new HyperslabSelection(start: (ulong)start, block: (ulong)n);
            w.Write(_index, n == RowBlock ? b.Index : b.Index[..n], fileSelection: sel);
            for (int j = 0; j < _settings.Length; j++) w.Write(_settings[j], n == RowBlock ? b.Settings[j] : b.Settings[j][..n], fileSelection: sel);
            for (int j = 0; j < _results.Length; j++) w.Write(_results[j], n == RowBlock ? b.Results[j] : b.Results[j][..n], fileSelection: sel);
            w.Write(_status, n == RowBlock ? b.Status : b.Status[..n], fileSelection: sel);
            w.Write(_message, n == RowBlock ? b.Message : b.Message[..n], fileSelection: sel);
            w.Write(_flags, n == RowBlock ? b.Flags : b.Flags[..n], fileSelection: sel);
        }
    }

    private static string F(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    private static string Quote(string s) =>
        s.IndexOfAny([',', '"', '\n', '\r']) < 0 ? s : "\"" + s.Replace("\"", "\"\"") + "\"";
}
