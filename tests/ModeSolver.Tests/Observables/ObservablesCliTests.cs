using System.CommandLine;
using System.Text.Json;
using ModeSolver.Cli.Commands;
using ModeSolver.Decks;
using ModeSolver.Observables;
using ModeSolver.Tests.Decks;
using PureHDF;

namespace ModeSolver.Tests.Observables;

/// <summary>One run of the demo deck runs/bump-peak.toml (small-scale peak, every observable on), shared by the checks.</summary>
public sealed class BumpPeakRun() : CliDeckRun("bump", "runs/bump-peak.toml", "--quiet")
{
    public JsonElement Summary(string? dir = null)
    {
        using var doc = JsonDocument.Parse(System.IO.File.ReadAllText(Path.Combine(dir ?? Dir, "summary.json")));
        return doc.RootElement.Clone();
    }
}

[Collection("ConsoleCapture")]
public class ObservablesCliTests : IClassFixture<BumpPeakRun>
{
    private readonly BumpPeakRun _run;

    public ObservablesCliTests(BumpPeakRun run) => _run = run;

    [Fact]
    public void EveryDeckKeyHasItsOptionOnTheSpectrumCommand()
    {
        var pairs = RunOptions.DeckKeyOptions.ToDictionary(p => p.DeckKey, p => p.Option, StringComparer.Ordinal);
        var command = SpectrumCommand.Create();
        var names = command.Options.Select(o => o.Name).ToHashSet(StringComparer.Ordinal);
        foreach (var (section, keys) in DeckReader.Schema)
            foreach (var key in keys)
            {
                string full = section + "." + key;
                Assert.True(pairs.TryGetValue(full, out var option), $"deck key {full} has no entry in RunOptions.DeckKeyOptions");
                Assert.Contains(option, names);
            }
        Assert.Contains(pairs["title"], names);
    }

    [Fact]
    public void DeckTableAndOptionsSetTheChoicesAndTheCommandLineWins()
    {
        const string deck = """
            [model]
            catalogue = "starobinsky"
            [observables]
            pbh = true
            threshold = 0.5
            window = "top-hat"
            g_star = 10.75
            gw_per_decade = 4
            data_use_alpha_s = true
            """;
        var input = DeckReader.Parse(deck, "obs.toml");
        var s = SettingsResolver.Resolve(input).Observables;
        Assert.True(s.Pbh);
        Assert.False(s.InducedGw);
        Assert.True(s.Distance && s.Peak);
        Assert.Equal(0.5, s.DeltaC);
        Assert.Equal(PbhWindow.TopHat, s.Window);
        Assert.Equal(10.75, s.GStar);
        Assert.Equal(4, s.GwPointsPerDecade);
        Assert.True(s.Data.UseAlphaS);

        var root = new RootCommand();
        var probe = new Command("probe");
        var o = RunOptions.Add(probe);
        root.Subcommands.Add(probe);
        var parse = root.Parse(["probe", "--obs-threshold", "0.45", "--obs-window", "gaussian", "--obs-induced-gw", "--obs-pbh", "false"]);
        var merged = SettingsResolver.Resolve(RunInput.Merge(input, o.Overrides(parse))).Observables;
        Assert.Equal(0.45, merged.DeltaC);
        Assert.Equal(PbhWindow.Gaussian, merged.Window);
        Assert.True(merged.InducedGw);
        Assert.False(merged.Pbh);
        Assert.Equal(10.75, merged.GStar); // from the deck

        // The deck writer records the non-default choices, and reading them back gives the same choices.
        var back = SettingsResolver.Resolve(DeckReader.Parse(DeckWriter.Write(SettingsResolver.Resolve(input)), "written.toml")).Observables;
        Assert.Equal(ObservablesKeys.Entries(s), ObservablesKeys.Entries(back));
    }

    [Fact]
    public void DemoDeckWritesEveryObservableToTheFilesAndTheTerminal()
    {
        Assert.True(_run.Code == 0, _run.Err);
        foreach (var f in new[] { "summary.json", "run.h5", "induced-gw.png", "induced-gw.svg", "black-holes.png", "black-holes.svg" })
            Assert.True(new FileInfo(Path.Combine(_run.Dir, f)).Length > 100, f);
        var j = _run.Summary();
        var peak = j.GetProperty("peak");
        Assert.True(peak.GetProperty("found").GetBoolean());
        double kPeak = peak.GetProperty("k_peak").GetDouble(), pPeak = peak.GetProperty("P_peak").GetDouble();
        // The demo's bump makes a peak near 3e13 /Mpc of height ~7e-3 (its own scenario, see the deck).
        Assert.InRange(kPeak, 1e13, 1e14);
        Assert.InRange(pPeak, 1e-3, 3e-2);
        // N at exit of k_peak: k_peak / k_pivot = e^(N_* - N_before_end) up to the slow change of H, so N_before_end is
        // N_* - ln(k_peak / k_*) to within about an e-fold.
        double before = peak.GetProperty("efolds_before_end").GetDouble();
        Assert.InRange(before, j.GetProperty("N_star").GetDouble() - Math.Log(kPeak / 0.05) - 1.5, j.GetProperty("N_star").GetDouble() - Math.Log(kPeak / 0.05) + 1.5);
        var gw = j.GetProperty("induced_gw");
        double fPeak = gw.GetProperty("peak_frequency_Hz").GetDouble();
        // The GW peak sits at f of order that of k_peak (f = c k / 2 pi = 1.546e-15 Hz per 1/Mpc, physics.md section 9).
        Assert.InRange(fPeak, 0.3 * 1.546e-15 * kPeak, 3 * 1.546e-15 * kPeak);
        Assert.True(gw.GetProperty("peak_Omega_GW_h2").GetDouble() > 0);
        Assert.Equal(106.75, gw.GetProperty("g_star").GetDouble());
        var pbh = j.GetProperty("pbh");
        Assert.True(pbh.GetProperty("f_PBH_total").GetDouble() > 0);
        Assert.Equal(0.41, pbh.GetProperty("delta_c").GetDouble());
        Assert.Equal("gaussian", pbh.GetProperty("window").GetString());
        var d = j.GetProperty("data_distance");
        double chi2 = Math.Pow((j.GetProperty("n_s").GetDouble() - 0.9649) / 0.0042, 2) + Math.Pow(j.GetProperty("r").GetDouble() / 0.018, 2);
        Assert.Equal(chi2, d.GetProperty("delta_chi2").GetDouble(), 1e-9);
        Assert.Equal(0.41, j.GetProperty("settings").GetProperty("observables.threshold").GetDouble());
        Assert.True(j.GetProperty("settings").GetProperty("observables.pbh").GetBoolean());
        Assert.Contains(j.GetProperty("observables_notes").EnumerateArray(), n => n.GetString()!.Contains("CAUTION", StringComparison.Ordinal));

        using (var h5 = H5File.OpenRead(Path.Combine(_run.Dir, "run.h5")))
        {
            var g = h5.Group("observables");
            var f = g.Group("induced_gw").Dataset("f_Hz").Read<double[]>();
            var om = g.Group("induced_gw").Dataset("Omega_GW_h2").Read<double[]>();
            Assert.Equal(f.Length, om.Length);
            Assert.True(f.Length > 10);
            var m = g.Group("pbh").Dataset("M_solar").Read<double[]>();
            Assert.Equal(m.Length, g.Group("pbh").Dataset("f_PBH").Read<double[]>().Length);
            Assert.Equal(m.Length, g.Group("pbh").Dataset("beta").Read<double[]>().Length);
            Assert.Equal(chi2, g.Group("data_distance").Attribute("delta_chi2").Read<double>(), 1e-9);
        }

        foreach (var line in new[] { "distance to the data: Delta chi^2 =", "peak: k_peak =", "induced GWs: Omega_GW,0 h^2 peaks at", "black holes: f_PBH =", "CAUTION", "delta_c = 0.41" })
            Assert.Contains(line, _run.Out);
    }

    [Fact]
    public void OneLineFormWithAHigherThresholdGivesFewerBlackHoles()
    {
        Assert.True(_run.Code == 0, _run.Err);
        string dir = Path.Combine(_run.Root, "one-line");
        var (code, output, err) = CliRunner.Run("spectrum",
            "--potential", "V0 * (1 - exp(-sqrt(2/3) * phi))^2 * (1 + A * exp(-(phi - phib)^2 / (2 * s^2)))",
            "--param", "V0=1e-10", "--param", "A=2.33542e-3", "--param", "phib=3.91", "--param", "s=0.02",
            "--phi0", "6.5", "--amplitude", "2.1e-9", "--k-min", "1e-4", "--k-max", "1e16", "--tolerance", "1e-6",
            "--obs-pbh", "--obs-pbh-per-decade", "40", "--obs-threshold", "0.45", "--formats", "json", "--out", dir, "--quiet");
        Assert.True(code == 0, err);
        var j = _run.Summary(dir);
        var deck = _run.Summary();
        Assert.Equal(0.45, j.GetProperty("pbh").GetProperty("delta_c").GetDouble());
        Assert.True(j.GetProperty("pbh").GetProperty("f_PBH_total").GetDouble() < deck.GetProperty("pbh").GetProperty("f_PBH_total").GetDouble());
        Assert.False(j.TryGetProperty("induced_gw", out _)); // not switched on
        Assert.Equal(deck.GetProperty("peak").GetProperty("k_peak").GetDouble(), j.GetProperty("peak").GetProperty("k_peak").GetDouble(), 1e-6 * deck.GetProperty("peak").GetProperty("k_peak").GetDouble());
        Assert.Contains("black holes: CAUTION", output);
    }
}
