using System.Diagnostics;
using System.Globalization;
using System.Text.Json;
using ModeSolver.Cli;
using ModeSolver.Tests.Decks;
using ModeSolver.Tests.Output;
using PureHDF;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>One full `modesolver spectrum` run of the plateau demo (24 wavenumbers), shared by the file checks.</summary>
public sealed class PlateauDemoRun() : CliDeckRun("plateau", "runs/plateau-demo.toml", "--k-count", "24");

[Collection("ConsoleCapture")]
public class SpectrumCommandTests : IClassFixture<PlateauDemoRun>
{
    private static readonly string[] Files = ["summary.json", "run.h5", "primordial.dat", "spectra.png", "spectra.svg", "background.png", "background.svg"];
    private readonly PlateauDemoRun _run;

    public SpectrumCommandTests(PlateauDemoRun run) => _run = run;

    private JsonElement Summary()
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(_run.File("summary.json")));
        return doc.RootElement.Clone();
    }

    [Fact]
    public void RunSucceedsAndWritesExactlyTheSevenFiles()
    {
        Assert.True(_run.Code == 0, _run.Err);
        Assert.Equal(Files.Order(StringComparer.Ordinal), Directory.GetFiles(_run.Dir).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Assert.Contains($"Wrote 7 files to {_run.Dir}", _run.Out);
    }

    [Fact]
    public void SummaryJsonHasEveryKeyWithSensibleValues()
    {
        var j = Summary();
        foreach (string key in new[] { "n_s", "alpha_s", "r", "n_t", "A_s", "k_pivot", "N_star", "phi_star", "H_star", "energy_scale_GeV",
                     "V_scale", "N_total", "max_rel_error", "rhs_evaluations_per_mode" })
            Assert.Equal(JsonValueKind.Number, j.GetProperty(key).ValueKind);
        foreach (string order in new[] { "first_order", "second_order", "potential" })
            foreach (string q in new[] { "n_s", "r", "alpha_s", "n_t" })
                Assert.Equal(JsonValueKind.Number, j.GetProperty("slow_roll").GetProperty(order).GetProperty(q).ValueKind);
        Assert.Equal(JsonValueKind.Array, j.GetProperty("flags").ValueKind);
        Assert.Equal("e-model", j.GetProperty("model").GetProperty("id").GetString());
        Assert.Equal(24, j.GetProperty("settings").GetProperty("modes.count").GetDouble());

        // The deck asks for a_s = 2.1e-9 at k = 0.05 /Mpc.
        Assert.True(Math.Abs(j.GetProperty("A_s").GetDouble() / 2.1e-9 - 1) < 1e-4);
        Assert.Equal(0.05, j.GetProperty("k_pivot").GetDouble());
        double ns = j.GetProperty("n_s").GetDouble(), nStar = j.GetProperty("N_star").GetDouble(), r = j.GetProperty("r").GetDouble();
        Assert.InRange(ns, 0.9, 1.0);
        Assert.InRange(nStar, 40, 70);
        // The demo is a viable plateau: r below the BICEP/Keck 2021 bound 0.036 (PRL 127, 151301) and
        // r = 16 epsilon_1 (2nd order) agrees with the exact r to 1e-3 (Schwarz et al. 2001; physics.md 4c).
        Assert.InRange(r, 1e-4, 0.036);
        Assert.True(Math.Abs(j.GetProperty("slow_roll").GetProperty("second_order").GetProperty("r").GetDouble() / r - 1) < 1e-3);
        Assert.True(j.GetProperty("N_total").GetDouble() > nStar);
        Assert.InRange(j.GetProperty("max_rel_error").GetDouble(), 0, 1e-4); // deck tolerance 1e-5
        // V_*^(1/4) = (3 pi^2 A_s r / 2)^(1/4) M_pl (physics.md 4f), M_pl = 2.435e18 GeV.
        double vq = Math.Pow(1.5 * Math.PI * Math.PI * 2.1e-9 * r, 0.25) * 2.435e18;
        Assert.True(Math.Abs(j.GetProperty("energy_scale_GeV").GetDouble() / vq - 1) < 1e-3);
    }

    [Fact]
    public void PlateauDemoHasNoFlags_SecondOrderSlowRollIsFarBetterThanATenthSigma()
    {
        // Second-order slow roll on a plateau is accurate to third order in epsilon_n ~ 1e-2 (Stewart & Lyth 1993;
        // Schwarz et al. 2001): n_s to ~1e-5, far below 0.1 sigma(n_s) = 4.2e-4 (Planck 2018 X).
        var j = Summary();
        Assert.Equal(0, j.GetProperty("flags").GetArrayLength());
        double dns = j.GetProperty("n_s").GetDouble() - j.GetProperty("slow_roll").GetProperty("second_order").GetProperty("n_s").GetDouble();
        Assert.True(Math.Abs(dns) < 0.1 * 0.1 * 0.0042, $"n_s exact - SR2 = {dns:E3}");
        Assert.Contains("flags: none", _run.Out);
    }

    [Fact]
    public void Hdf5ReadsBackWithPureHdfAndAgreesWithTableAndJson()
    {
        var j = Summary();
        using var file = H5File.OpenRead(_run.File("run.h5"));
        var k = file.Dataset("/spectrum/k").Read<double[]>();
        var ps = file.Dataset("/spectrum/P_s").Read<double[]>();
        Assert.Equal(k.Length, ps.Length);
        Assert.True(k.Length >= 24);
        Assert.Equal(1e-5, k[0], 12);
        Assert.Equal(1.0, k[^1], 12);
        // The pivot is one of the spectrum samples; its P_s is the normalised amplitude.
        int iPivot = Array.IndexOf(k, 0.05);
        Assert.True(iPivot >= 0, "pivot k is a spectrum sample");
        Assert.True(Math.Abs(ps[iPivot] / j.GetProperty("A_s").GetDouble() - 1) < 1e-4);
        var pivot = file.Group("pivot");
        foreach (string key in new[] { "n_s", "r", "A_s", "N_star", "alpha_s", "n_t", "V_scale" })
            Assert.Equal(j.GetProperty(key).GetDouble(), pivot.Attribute(key).Read<double>());
        Assert.Equal(j.GetProperty("slow_roll").GetProperty("potential").GetProperty("r").GetDouble(),
            pivot.Group("slow_roll").Group("potential").Attribute("r").Read<double>());
        // The table datasets are the rows of primordial.dat (printed with 11 significant digits).
        var (tk, tps, _) = ReadTable(_run.File("primordial.dat"));
        var hk = file.Dataset("/table/k").Read<double[]>();
        var hps = file.Dataset("/table/P_s").Read<double[]>();
        Assert.Equal(tk.Length, hk.Length);
        for (int i = 0; i < tk.Length; i++)
        {
            Assert.True(Math.Abs(tk[i] / hk[i] - 1) < 1e-10);
            Assert.True(Math.Abs(tps[i] / hps[i] - 1) < 1e-10);
        }
        Assert.Equal("einstein", file.Group("model").Attribute("frame").Read<string>());
        Assert.Equal(file.Dataset("/background/N").Read<double[]>().Length, file.Dataset("/background/epsilon_2").Read<double[]>().Length);
    }

    [SkippableFact]
    public void Hdf5ReadsBackWithTheReferenceLibrary()
    {
        string? h5dump = ExternalTools.FindOnPath("h5dump");
        Skip.If(h5dump is null, "h5dump not installed: apt-get install hdf5-tools");
        // h5dump: the HDF Group's reference implementation (Debian hdf5-tools); %.17g prints every double exactly.
        string path = _run.File("run.h5");
        using var file = H5File.OpenRead(path);
        Assert.Equal(file.Dataset("/spectrum/k").Read<double[]>(), H5DumpValues(h5dump!, "-d /spectrum/k -m %.17g " + path));
        Assert.Equal(file.Dataset("/spectrum/P_s").Read<double[]>(), H5DumpValues(h5dump!, "-d /spectrum/P_s -m %.17g " + path));
        Assert.Equal([Summary().GetProperty("A_s").GetDouble()], H5DumpValues(h5dump!, "-a /pivot/A_s -m %.17g " + path));
        var (tk, _, _) = ReadTable(_run.File("primordial.dat"));
        var dk = H5DumpValues(h5dump!, "-d /table/k -m %.17g " + path);
        Assert.Equal(tk.Length, dk.Length);
        for (int i = 0; i < tk.Length; i++) Assert.True(Math.Abs(tk[i] / dk[i] - 1) < 1e-10);
        Assert.Contains("\"e-model\"", ExternalTools.Run(h5dump!, "-a /model/id " + path));
    }

    [Fact]
    public void PrimordialTableParses()
    {
        var lines = File.ReadAllLines(_run.File("primordial.dat"));
        int firstData = Array.FindIndex(lines, l => !l.StartsWith('#'));
        Assert.True(firstData > 0, "comment header first");
        Assert.All(lines[firstData..], l => Assert.False(l.StartsWith('#')));
        var (k, ps, pt) = ReadTable(_run.File("primordial.dat"));
        Assert.True(k.Length > 100);
        Assert.Equal(1e-5, k[0], 15);
        Assert.Equal(1.0, k[^1], 12);
        double step = Math.Log(k[1] / k[0]);
        for (int i = 1; i < k.Length; i++)
        {
            Assert.True(k[i] > k[i - 1]);
            Assert.True(Math.Abs(Math.Log(k[i] / k[i - 1]) / step - 1) < 1e-6, $"log spacing at row {i}");
            Assert.True(ps[i] > 0 && pt[i] > 0);
        }
        // P_s at the pivot, interpolated linearly in (ln k, ln P) between the rows around it (rows 0.046 apart in
        // ln k; the curvature alpha_s ~ -7e-4 makes that error ~ 2e-7).
        int j = Array.FindIndex(k, x => x > 0.05);
        double t = Math.Log(0.05 / k[j - 1]) / Math.Log(k[j] / k[j - 1]);
        double psPivot = Math.Exp(Math.Log(ps[j - 1]) + t * Math.Log(ps[j] / ps[j - 1]));
        Assert.True(Math.Abs(psPivot / Summary().GetProperty("A_s").GetDouble() - 1) < 1e-4, $"P_s(k_*) = {psPivot:E6}");
    }

    [Fact]
    public void PlotsAreNonTrivial()
    {
        byte[] sig = [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A];
        foreach (string png in new[] { "spectra.png", "background.png" })
        {
            var bytes = File.ReadAllBytes(_run.File(png));
            Assert.Equal(sig, bytes[..8]);
            Assert.True(bytes.Length > 20_000, $"{png}: {bytes.Length} bytes");
        }
        foreach (string svg in new[] { "spectra.svg", "background.svg" })
        {
            var x = System.Xml.Linq.XDocument.Load(_run.File(svg));
            Assert.Equal("svg", x.Root!.Name.LocalName);
            Assert.True(x.Descendants().Count(e => e.Name.LocalName == "path") > 20, svg);
        }
    }

    [Fact]
    public void SummaryTableShowsExactAndSlowRollColumnsAndTheFlagsLine()
    {
        var lines = _run.Out.Split('\n');
        string header = Assert.Single(lines, l => l.Contains("quantity") && l.Contains("exact"));
        foreach (string col in new[] { "SR 1st", "SR 2nd", "SR potential", "diff" }) Assert.Contains(col, header);
        foreach (string row in new[] { "A_s", "n_s", "alpha_s", "r ", "n_t" })
            Assert.Contains(lines, l => l.TrimStart('|', ' ').StartsWith(row, StringComparison.Ordinal));
        Assert.Contains(lines, l => l.StartsWith("flags: ", StringComparison.Ordinal));
        Assert.Contains("N_*", _run.Out);
        // Standard output is not a terminal here: plain text, no escape codes.
        Assert.DoesNotContain('\u001b', _run.Out);
    }

    [Fact]
    public void TableToStdoutWritesOnlyTheTableAndNoFiles()
    {
        string dir = CliRunner.TempDir("table");
        try
        {
            var (code, output, err) = CliRunner.Run("spectrum", DeckTests.RepoFile("runs/plateau-demo.toml"), "--k-count", "12", "--out", dir, "--table", "-");
            Assert.True(code == 0, err);
            Assert.False(Directory.Exists(dir), "no output directory for --table -");
            var lines = output.Split('\n', StringSplitOptions.RemoveEmptyEntries);
            Assert.All(lines, l => Assert.True(l.StartsWith('#') || l.Split(' ').Length == 3, $"not a table line: '{l}'"));
            var rows = lines.Where(l => !l.StartsWith('#')).ToArray();
            Assert.True(rows.Length > 100);
            Assert.All(rows, l => Assert.All(l.Split(' '), v => double.Parse(v, CultureInfo.InvariantCulture)));
            Assert.DoesNotContain("Wrote", output);
        }
        finally
        {
            if (Directory.Exists(dir)) Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void QuietRunPrintsNothingOnStderr()
    {
        // Progress lines go to stderr only when it is a terminal (never under the test host); --quiet must also
        // keep it empty here, while the summary still goes to stdout.
        string dir = CliRunner.TempDir("quiet");
        try
        {
            var (code, output, err) = CliRunner.Run("spectrum", DeckTests.RepoFile("runs/plateau-demo.toml"), "--k-count", "12", "--out", dir, "--quiet");
            Assert.True(code == 0, err);
            Assert.Equal("", err);
            Assert.Contains("flags:", output);
            Assert.Equal(7, Directory.GetFiles(dir).Length);
        }
        finally
        {
            if (Directory.Exists(dir)) Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void FailingRunLeavesTheOutputDirectoryAsItWas()
    {
        string dir = CliRunner.TempDir("fail");
        Directory.CreateDirectory(dir);
        string keep = Path.Combine(dir, "summary.json");
        File.WriteAllText(keep, "{\"earlier\": true}");
        var stamp = File.GetLastWriteTimeUtc(keep);
        try
        {
            // k_max far beyond what inflation serves (modes must leave the horizon before its end): physics, exit 3.
            var (code, output, err) = CliRunner.Run("spectrum", DeckTests.RepoFile("runs/plateau-demo.toml"), "--k-count", "12", "--k-max", "1e40", "--out", dir);
            Assert.Equal(3, code);
            Assert.Equal("", output);
            Assert.StartsWith("modesolver: ", err);
            Assert.Single(err.TrimEnd().Split('\n'));
            Assert.Contains("k range", err);
            Assert.Equal([keep], Directory.GetFileSystemEntries(dir));
            Assert.Equal("{\"earlier\": true}", File.ReadAllText(keep));
            Assert.Equal(stamp, File.GetLastWriteTimeUtc(keep));
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    private static (double[] K, double[] Ps, double[] Pt) ReadTable(string path)
    {
        var rows = File.ReadAllLines(path).Where(l => !l.StartsWith('#') && l.Length > 0)
            .Select(l => l.Split(' ').Select(v => double.Parse(v, CultureInfo.InvariantCulture)).ToArray()).ToArray();
        Assert.All(rows, r => Assert.Equal(3, r.Length));
        return (rows.Select(r => r[0]).ToArray(), rows.Select(r => r[1]).ToArray(), rows.Select(r => r[2]).ToArray());
    }

    private static double[] H5DumpValues(string h5dump, string args) =>
        ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump, args));

}
