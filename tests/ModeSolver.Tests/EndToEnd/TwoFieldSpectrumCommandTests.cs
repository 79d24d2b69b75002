using System.Text.Json;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>One full `modesolver spectrum` run of the two-field demo deck (16 wavenumbers), shared by the file checks.</summary>
public sealed class TwoFieldDemoRun() : CliDeckRun("two-field", "runs/two-field-demo.toml", "--k-count", "16");

/// <summary>`modesolver spectrum` on a two-field deck writes and lists the n-field outputs (isocurvature, delta N, trajectory plots).</summary>
[Collection("ConsoleCapture")]
public class TwoFieldSpectrumCommandTests : IClassFixture<TwoFieldDemoRun>
{
    private static readonly string[] Files =
    [
        "summary.json", "run.h5", "primordial.dat", "spectra.png", "spectra.svg", "background.png", "background.svg",
        "trajectory.png", "trajectory.svg", "turn-rate.png", "turn-rate.svg",
    ];

    private readonly TwoFieldDemoRun _run;

    public TwoFieldSpectrumCommandTests(TwoFieldDemoRun run) => _run = run;

    [Fact]
    public void RunWritesAndListsTheFieldPlots()
    {
        Assert.True(_run.Code == 0, _run.Err);
        Assert.Equal(Files.Order(StringComparer.Ordinal), Directory.GetFiles(_run.Dir).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Assert.Contains($"Wrote {Files.Length} files to {_run.Dir}", _run.Out);
        foreach (string plot in new[] { "trajectory.png", "trajectory.svg", "turn-rate.png", "turn-rate.svg" })
        {
            Assert.Contains(plot, _run.Out);
            Assert.True(new FileInfo(_run.File(plot)).Length > 1000, $"{plot} is (nearly) empty");
        }
        // A PNG starts with its 8-byte signature; an SVG is XML with an <svg> root.
        Assert.Equal(new byte[] { 0x89, (byte)'P', (byte)'N', (byte)'G' }, File.ReadAllBytes(_run.File("trajectory.png"))[..4]);
        Assert.Contains("<svg", File.ReadAllText(_run.File("turn-rate.svg")));
    }

    [Fact]
    public void SummaryJsonHasIsocurvatureAndLocalFnl()
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(_run.File("summary.json")));
        var j = doc.RootElement;
        var iso = j.GetProperty("isocurvature");
        foreach (string key in new[] { "P_S", "beta_iso", "cos_delta", "T_RS" })
            Assert.Equal(JsonValueKind.Number, iso.GetProperty(key).ValueKind);
        Assert.InRange(iso.GetProperty("beta_iso").GetDouble(), 0, 1);      // P_S / (P_zeta + P_S)
        Assert.InRange(iso.GetProperty("cos_delta").GetDouble(), -1, 1);    // a correlation
        Assert.True(iso.GetProperty("P_S").GetDouble() > 0);
        Assert.Equal(JsonValueKind.Number, j.GetProperty("f_NL_local").ValueKind);
        Assert.Equal(JsonValueKind.Number, j.GetProperty("f_NL_local_error").ValueKind);
        // The demo's light field turns the trajectory only mildly: |f_NL_local| is of order slow roll, far below 1
        // (Vernizzi & Wands 2006: a large local f_NL needs a sharp, strongly sourcing turn).
        Assert.InRange(Math.Abs(j.GetProperty("f_NL_local").GetDouble()), 0, 0.1);
    }

    [SkippableFact]
    public void Hdf5HasTheIsocurvatureAndMultiFieldGroups()
    {
        string? h5dump = ExternalTools.FindOnPath("h5dump");
        Skip.If(h5dump is null, "h5dump not installed: apt-get install hdf5-tools");
        // h5dump: the HDF Group's reference implementation (Debian hdf5-tools).
        string path = _run.File("run.h5");
        string tree = ExternalTools.Run(h5dump!, "-n " + path);
        foreach (string name in new[] { "group      /isocurvature", "/isocurvature/P_S", "/isocurvature/beta_iso", "/isocurvature/spectra_matrix",
                     "group      /multifield", "/multifield/trajectory/eta_perp", "/multifield/trajectory/m_s2_over_H2", "/multifield/delta_N/N_I" })
            Assert.Contains(name, tree);
        using var doc = JsonDocument.Parse(File.ReadAllText(_run.File("summary.json")));
        double beta = doc.RootElement.GetProperty("isocurvature").GetProperty("beta_iso").GetDouble();
        double[] dumped = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-a /isocurvature/beta_iso -m %.17g " + path));
        Assert.Equal([beta], dumped);
        Assert.Equal(16, ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /isocurvature/k -m %.17g " + path)).Length);
    }

    [Fact]
    public void TooShortAStartNamesEveryFieldsStartValue()
    {
        // Started at phi = 11 the demo inflates about 33 e-folds, fewer than the pivot needs: the one-line error names
        // the start of both fields, not only the first.
        string dir = CliRunner.TempDir("two-field-short");
        Directory.CreateDirectory(dir);
        try
        {
            string deck = Path.Combine(dir, "short.toml");
            File.WriteAllText(deck, File.ReadAllText(Decks.DeckTests.RepoFile("runs/two-field-demo.toml")).Replace("phi0 = [17.0, 2.0]", "phi0 = [11.0, 2.0]", StringComparison.Ordinal));
            var (code, _, err) = CliRunner.Run("spectrum", deck, "--out", Path.Combine(dir, "out"), "--quiet");
            Assert.NotEqual(0, code);
            Assert.Contains("phi0 = [11, 2] for (phi, chi)", err);
            Assert.Single(err.Trim().Split('\n'));
            Assert.False(Directory.Exists(Path.Combine(dir, "out")), "nothing is written after a refused run");
        }
        finally { Directory.Delete(dir, true); }
    }
}
