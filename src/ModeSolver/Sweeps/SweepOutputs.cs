using System.Globalization;
using System.Text;
using PureHDF;

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

/// <summary>Writes the CSV and HDF5 files of a sweep from its records, sorted by index, each under a temporary name then renamed.</summary>
public static class SweepOutputs
{
    /// <summary>The result columns of the CSV after the index and the swept keys.</summary>
    public static readonly IReadOnlyList<string> ResultColumns = ["n_s", "r", "alpha_s", "n_t", "A_s", "N_star", "V_scale", "flags", "status", "message"];

    /// <summary>Writes points.csv and sweep.h5 into <paramref name="directory"/>. Records need not be sorted.</summary>
    public static void Write(string directory, SweepSpec spec, string fingerprint, IEnumerable<SweepRecord> records)
    {
        var sorted = records.OrderBy(r => r.Index).ToList();
        WriteAtomically(Path.Combine(directory, SweepFiles.Csv), path => File.WriteAllText(path, Csv(spec, sorted), new UTF8Encoding(false)));
        WriteAtomically(Path.Combine(directory, SweepFiles.Hdf5), path => BuildHdf5(spec, fingerprint, sorted).Write(path));
    }

    /// <summary>Runs <paramref name="write"/> on a temporary name beside <paramref name="path"/>, then renames it over <paramref name="path"/>.</summary>
    public static void WriteAtomically(string path, Action<string> write)
    {
        string tmp = path + ".tmp";
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

    /// <summary>The CSV text: header, then one row per record sorted by index (records must be sorted).</summary>
    public static string Csv(SweepSpec spec, IReadOnlyList<SweepRecord> sorted)
    {
        var sb = new StringBuilder();
        sb.Append("index");
        foreach (var k in spec.Keys) sb.Append(',').Append(Quote(k));
        foreach (var c in ResultColumns) sb.Append(',').Append(c);
        sb.Append('\n');
        var values = new double[spec.Keys.Count];
        foreach (var r in sorted)
        {
            spec.GetValues(r.Index, values);
            sb.Append(r.Index.ToString(CultureInfo.InvariantCulture));
            foreach (var v in values) sb.Append(',').Append(F(v));
            if (r.Ok)
            {
                foreach (var v in new[] { r.Ns, r.R, r.AlphaS, r.Nt, r.As, r.NStar, r.VScale }) sb.Append(',').Append(F(v));
                sb.Append(',').Append(Quote(string.Join(';', r.Flags))).Append(",ok,");
            }
            else
            {
                sb.Append(",,,,,,,,,failed,").Append(Quote(r.Message));
            }
            sb.Append('\n');
        }
        return sb.ToString();
    }

    /// <summary>
    /// The HDF5 object model: root attributes (format, fingerprint, keys, counts), /grid/&lt;key&gt; (each axis'
    /// values), /points/index, /points/settings/&lt;key&gt;, /points/{n_s, r, alpha_s, n_t, A_s, N_star, V_scale} (NaN
    /// for failed points), /points/{status, message, flags} (strings), and /spectra/&lt;index, 8 digits&gt;/{k, P_s, P_t}.
    /// </summary>
    public static H5File BuildHdf5(SweepSpec spec, string fingerprint, IReadOnlyList<SweepRecord> sorted)
    {
        int n = sorted.Count;
        var file = new H5File();
        file.Attributes["format"] = "modesolver-sweep-1";
        file.Attributes["fingerprint"] = fingerprint;
        file.Attributes["keys"] = spec.Keys.ToArray();
        file.Attributes["point_count"] = spec.PointCount;
        file.Attributes["done_count"] = (long)n;
        file.Attributes["failed_count"] = (long)sorted.Count(r => !r.Ok);
        var grid = new H5Group();
        foreach (var a in spec.Axes)
        {
            var ds = new H5Dataset<double[]>(a.Values.ToArray());
            ds.Attributes["kind"] = a.Kind.ToString().ToLowerInvariant();
            grid[a.Key] = ds;
        }
        file["grid"] = grid;
        var points = new H5Group();
        points["index"] = sorted.Select(r => r.Index).ToArray();
        var settings = new H5Group();
        var cols = new double[spec.Keys.Count][];
        for (int j = 0; j < cols.Length; j++) cols[j] = new double[n];
        var v = new double[spec.Keys.Count];
        for (int i = 0; i < n; i++)
        {
            spec.GetValues(sorted[i].Index, v);
            for (int j = 0; j < cols.Length; j++) cols[j][i] = v[j];
        }
        for (int j = 0; j < cols.Length; j++) settings[spec.Keys[j]] = cols[j];
        points["settings"] = settings;
        points["n_s"] = Col(sorted, r => r.Ns);
        points["r"] = Col(sorted, r => r.R);
        points["alpha_s"] = Col(sorted, r => r.AlphaS);
        points["n_t"] = Col(sorted, r => r.Nt);
        points["A_s"] = Col(sorted, r => r.As);
        points["N_star"] = Col(sorted, r => r.NStar);
        points["V_scale"] = Col(sorted, r => r.VScale);
        points["status"] = sorted.Select(r => r.Ok ? "ok" : "failed").ToArray();
        points["message"] = sorted.Select(r => r.Message).ToArray();
        points["flags"] = sorted.Select(r => string.Join(';', r.Flags)).ToArray();
        file["points"] = points;
        if (spec.Spectra)
        {
            var spectra = new H5Group();
            foreach (var r in sorted)
            {
                if (r.K is null) continue;
                var g = new H5Group { ["k"] = r.K };
                if (r.Ps is not null) g["P_s"] = r.Ps;
                if (r.Pt is not null) g["P_t"] = r.Pt;
                spectra[r.Index.ToString("D8", CultureInfo.InvariantCulture)] = g;
            }
            file["spectra"] = spectra;
        }
        return file;
    }

    private static double[] Col(IReadOnlyList<SweepRecord> sorted, Func<SweepRecord, double> f)
    {
        var a = new double[sorted.Count];
        for (int i = 0; i < a.Length; i++) a[i] = sorted[i].Ok ? f(sorted[i]) : double.NaN;
        return a;
    }

    private static string F(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    private static string Quote(string s) =>
        s.IndexOfAny([',', '"', '\n', '\r']) < 0 ? s : "\"" + s.Replace("\"", "\"\"") + "\"";
}
