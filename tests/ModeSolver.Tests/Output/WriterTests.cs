using System.Diagnostics;
using System.Globalization;
using System.Text.Json;
using ModeSolver.Output;
using PureHDF;
using ModeSolver.Spectra;

namespace ModeSolver.Tests.Output;

public class WriterTests
{
    [Fact]
    public void Json_has_every_key_scripts_rely_on_with_round_trip_values()
    {
        var r = SyntheticReport.Create();
        using var doc = JsonDocument.Parse(SummaryJsonWriter.ToJson(r));
        var root = doc.RootElement;
        var p = r.Pivot;
        var expected = new Dictionary<string, double>
        {
            ["n_s"] = p.Ns, ["alpha_s"] = p.AlphaS, ["r"] = p.R, ["n_t"] = p.Nt, ["A_s"] = p.As, ["k_pivot"] = p.KPivot,
            ["N_star"] = p.NStar, ["phi_star"] = p.PhiStar, ["H_star"] = p.HStar, ["energy_scale_GeV"] = p.EnergyScaleGeV,
            ["V_scale"] = p.VScale, ["N_total"] = p.NTotal, ["max_rel_error"] = p.MaxRelError,
            ["rhs_evaluations_per_mode"] = p.RhsEvaluationsPerMode,
        };
        foreach (var (key, value) in expected)
            Assert.Equal(value, root.GetProperty(key).GetDouble()); // exact: full round-trip precision
        Assert.Equal(p.HStar * 2.435e18, root.GetProperty("H_star_GeV").GetDouble());

        foreach (var order in new[] { "first_order", "second_order", "potential" })
        {
            var o = root.GetProperty("slow_roll").GetProperty(order);
            foreach (var key in new[] { "n_s", "r", "alpha_s", "n_t", "A_s" }) Assert.True(o.TryGetProperty(key, out _), $"{order}.{key}");
        }
        Assert.Equal(r.SlowRoll.SecondOrder.Ns, root.GetProperty("slow_roll").GetProperty("second_order").GetProperty("n_s").GetDouble());
        // NaN (first order gives no alpha_s) is written as null.
        Assert.Equal(JsonValueKind.Null, root.GetProperty("slow_roll").GetProperty("first_order").GetProperty("alpha_s").ValueKind);

        var flags = root.GetProperty("flags");
        Assert.Equal(r.Flags.Length, flags.GetArrayLength());
        var f0 = flags[0];
        foreach (var key in new[] { "kind", "message", "where", "exact", "slow_roll", "difference" }) Assert.True(f0.TryGetProperty(key, out _), key);
        Assert.Equal("spectrum-deviation", f0.GetProperty("kind").GetString());
        Assert.Equal(r.Flags[0].Difference, f0.GetProperty("difference").GetDouble());

        var model = root.GetProperty("model");
        Assert.Equal("demo-plateau", model.GetProperty("id").GetString());
        Assert.Equal("einstein", model.GetProperty("frame").GetString());
        Assert.Equal(1e-10, model.GetProperty("parameters").GetProperty("V0").GetDouble());
        Assert.Equal("1e-06", root.GetProperty("settings").GetProperty("tolerance").GetString());
        Assert.Equal("1/Mpc", root.GetProperty("units").GetProperty("k").GetString());
        Assert.StartsWith("modesolver ", root.GetProperty("version").GetString());
        Assert.Equal(0.01, root.GetProperty("flag_settings").GetProperty("spectrum_threshold").GetDouble());
    }

    [Fact]
    public void Json_numbers_survive_awkward_values_exactly()
    {
        var r = SyntheticReport.Create();
        double awkward = 0.1 + 0.2; // 0.30000000000000004
        var r2 = r with { Pivot = r.Pivot with { Ns = awkward, As = 2.0990000000000001e-9, NReh = double.NaN } };
        using var doc = JsonDocument.Parse(SummaryJsonWriter.ToJson(r2));
        Assert.Equal(awkward, doc.RootElement.GetProperty("n_s").GetDouble());
        Assert.Equal(2.0990000000000001e-9, doc.RootElement.GetProperty("A_s").GetDouble());
        Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("N_reh").ValueKind);
    }

    [Fact]
    public void Hdf5_reads_back_with_PureHDF()
    {
        var r = SyntheticReport.Create();
        string dir = SyntheticReport.TempDir();
        try
        {
            string path = Path.Combine(dir, "run.h5");
            Hdf5Writer.Write(r, path);
            using var file = H5File.OpenRead(path);
            Assert.Equal(r.Spectrum.K.ToArray(), file.Dataset("/spectrum/k").Read<double[]>());
            Assert.Equal(r.Spectrum.Ps.ToArray(), file.Dataset("/spectrum/P_s").Read<double[]>());
            Assert.Equal(r.Background.Epsilon2.ToArray(), file.Dataset("/background/epsilon_2").Read<double[]>());
            Assert.Equal(r.SlowRollSpectra.PtSecondOrder.ToArray(), file.Dataset("/slow_roll_spectrum/P_t_second_order").Read<double[]>());
            Assert.Equal(r.Table.K.Length, file.Dataset("/table/k").Read<double[]>().Length);
            var pivot = file.Group("pivot");
            Assert.Equal(r.Pivot.Ns, pivot.Attribute("n_s").Read<double>());
            Assert.Equal(r.Pivot.NStar, pivot.Attribute("N_star").Read<double>());
            Assert.Equal(r.SlowRoll.Potential.R, file.Group("pivot").Group("slow_roll").Group("potential").Attribute("r").Read<double>());
            Assert.Equal("einstein", file.Group("model").Attribute("frame").Read<string>());
            Assert.Equal(r.Background.NEnd, file.Group("background").Attribute("N_end").Read<double>());
            var kinds = file.Dataset("/flags/kind").Read<string[]>();
            Assert.Equal(r.Flags.Select(f => f.Kind).ToArray(), kinds);
            Assert.Equal("1e-06", file.Group("settings").Attribute("tolerance").Read<string>());
        }
        finally { Directory.Delete(dir, true); }
    }

    [SkippableFact]
    public void Hdf5_is_readable_by_the_reference_library_h5dump()
    {
        string? h5dump = ExternalTools.FindOnPath("h5dump");
        Skip.If(h5dump is null, "h5dump not installed: apt-get install hdf5-tools");
        var r = SyntheticReport.Create(modes: 12);
        string dir = SyntheticReport.TempDir();
        try
        {
            string path = Path.Combine(dir, "run.h5");
            Hdf5Writer.Write(r, path);
            // h5dump (the HDF Group's reference implementation) prints every sample; %.17g keeps full precision.
            var k = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /spectrum/k -m %.17g " + path));
            Assert.Equal(r.Spectrum.K.ToArray(), k);
            var ps = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /spectrum/P_s -m %.17g " + path));
            Assert.Equal(r.Spectrum.Ps.ToArray(), ps);
            var ns = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-a /pivot/n_s -m %.17g " + path));
            Assert.Equal([r.Pivot.Ns], ns);
            string frame = ExternalTools.Run(h5dump!, "-a /model/frame " + path);
            Assert.Contains("\"einstein\"", frame);
            string flagKinds = ExternalTools.Run(h5dump!, "-d /flags/kind " + path);
            Assert.Contains("\"spectrum-deviation\"", flagKinds);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Table_round_trips_with_header_and_increasing_k()
    {
        var r = SyntheticReport.Create();
        var sw = new StringWriter();
        PrimordialTableWriter.Write(r, sw);
        var lines = sw.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries);
        var comments = lines.TakeWhile(l => l.StartsWith('#')).ToList();
        Assert.Contains(comments, l => l.Contains("demo-plateau"));
        Assert.Contains(comments, l => l.Contains("1/Mpc"));
        Assert.Contains(comments, l => l.Contains("A_s = 2.100000e-09"));
        Assert.Contains(comments, l => l.Contains("n_s = 0.965000"));
        Assert.Contains(comments, l => l.Contains("modesolver"));
        var rows = lines.Skip(comments.Count).ToList();
        Assert.Equal(r.Table.K.Length, rows.Count);
        double prev = 0;
        for (int i = 0; i < rows.Count; i++)
        {
            var cols = rows[i].Split(' ', StringSplitOptions.RemoveEmptyEntries);
            Assert.Equal(3, cols.Length);
            foreach (var c in cols) Assert.Matches(@"^-?\d\.\d{10}e[+-](\d{2}|[1-9]\d{2})$", c); // C's %.10e: two-digit exponent at least
            double k = double.Parse(cols[0], CultureInfo.InvariantCulture);
            double ps = double.Parse(cols[1], CultureInfo.InvariantCulture);
            double pt = double.Parse(cols[2], CultureInfo.InvariantCulture);
            Assert.True(k > prev);
            prev = k;
            // 11 significant digits: relative agreement to 5e-11.
            Assert.True(Math.Abs(k / r.Table.K[i] - 1) < 5e-11);
            Assert.True(Math.Abs(ps / r.Table.Ps[i] - 1) < 5e-11);
            Assert.True(Math.Abs(pt / r.Table.Pt[i] - 1) < 5e-11);
        }
    }

    [Fact]
    public void Table_grid_is_log_spaced_with_the_requested_density()
    {
        var k = WavenumberGrid.LogSpaced(1e-6, 10, 50);
        Assert.Equal(351, k.Length);
        Assert.Equal(1e-6, k[0]);
        Assert.Equal(10, k[^1]);
        for (int i = 1; i < k.Length; i++) Assert.Equal(0.02, Math.Log10(k[i] / k[i - 1]), 9);
        Assert.Throws<ArgumentException>(() => WavenumberGrid.LogSpaced(1, 0.5));
    }

    [Fact]
    public void Plots_are_non_empty_png_and_svg()
    {
        var r = SyntheticReport.Create();
        string dir = SyntheticReport.TempDir();
        try
        {
            var png = Path.Combine(dir, "spectra.png");
            var svg = Path.Combine(dir, "spectra.svg");
            var bpng = Path.Combine(dir, "background.png");
            var bsvg = Path.Combine(dir, "background.svg");
            RunPlots.SaveSpectra(r, png, PlotFormat.Png);
            RunPlots.SaveSpectra(r, svg, PlotFormat.Svg);
            RunPlots.SaveBackground(r, bpng, PlotFormat.Png);
            RunPlots.SaveBackground(r, bsvg, PlotFormat.Svg);
            byte[] sig = [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A];
            foreach (var f in new[] { png, bpng })
            {
                var bytes = File.ReadAllBytes(f);
                Assert.Equal(sig, bytes[..8]);
                Assert.True(bytes.Length > 20_000, $"{f}: {bytes.Length} bytes");
                // IHDR width and height (big-endian) at bytes 16..23.
                Assert.Equal(RunPlots.Width, (bytes[16] << 24) | (bytes[17] << 16) | (bytes[18] << 8) | bytes[19]);
            }
            Assert.Equal(RunPlots.SpectraTopHeight + RunPlots.SpectraBottomHeight,
                (File.ReadAllBytes(png)[20] << 24) | (File.ReadAllBytes(png)[21] << 16) | (File.ReadAllBytes(png)[22] << 8) | File.ReadAllBytes(png)[23]);
            foreach (var f in new[] { svg, bsvg })
            {
                var x = System.Xml.Linq.XDocument.Load(f);
                Assert.Equal("svg", x.Root!.Name.LocalName);
                Assert.True(x.Descendants().Count(e => e.Name.LocalName == "path") > 20);
            }
            // The stacked SVG holds both panels.
            var stacked = System.Xml.Linq.XDocument.Load(svg);
            Assert.Equal(2, stacked.Root!.Elements().Count(e => e.Name.LocalName == "svg"));
            Assert.Contains("k [Mpc^-1]", File.ReadAllText(svg));
            Assert.Contains("N [e-folds]", File.ReadAllText(bsvg));
        }
        finally { Directory.Delete(dir, true); }
    }
}
