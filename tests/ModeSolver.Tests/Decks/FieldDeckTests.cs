using ModeSolver.Background;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Pipeline;
using PureHDF;

namespace ModeSolver.Tests.Decks;

/// <summary>Several-field decks: the keys, their one-line options, the settings they resolve to and their background.</summary>
[Collection("ConsoleCapture")]
public class FieldDeckTests
{
    private const string Deck = """
        [model]
        fields = ["phi", "chi"]
        potential = "m^2 * phi^2 / 2 + mu^2 * chi^2 / 2"
        metric = [["1", "0"], ["0", "exp(2 * b * phi)"]]
        end = "chi - 1.2"
        [model.parameters]
        m = 6e-6
        mu = 4.5e-6
        b = 0.15
        [start]
        phi0 = [17.0, 2.0]
        dphi0 = [-0.12, 0.0]
        """;

    [Fact]
    public void Deck_ResolvesFieldsMetricStartAndEnd()
    {
        var s = SettingsResolver.Resolve(DeckReader.Parse(Deck, "fields.toml"));
        Assert.True(s.Model.IsMultiField);
        Assert.Equal(["phi", "chi"], s.Model.Fields!);
        Assert.Equal("exp(2 * b * phi)", s.Model.Metric![1][1]);
        Assert.Equal("chi - 1.2", s.Model.End);
        Assert.Equal([17.0, 2.0], s.Initial.Fields0!);
        Assert.Equal([-0.12, 0.0], s.Initial.Velocity0!);
        var report = SettingsSchema.ReportEntries(s).ToDictionary(e => e.Key, e => e.Value);
        Assert.Equal("phi,chi", report["model.fields"]);
        Assert.Equal("1, 0; 0, exp(2 * b * phi)", report["model.metric"]);
        Assert.Equal("17,2", report["start.phi0"]);
    }

    [Fact]
    public void NativeKeysGiveTheDecksSettings()
    {
        // The one-line forms (the same text the options take) reach the same settings as the deck.
        var input = new RunInput();
        input = RunInputKeys.WithText(input, "model.fields", "phi,chi");
        input = RunInputKeys.WithText(input, "model.potential", "m^2 * phi^2 / 2 + mu^2 * chi^2 / 2");
        input = RunInputKeys.WithText(input, "model.metric", "1, 0; 0, exp(2 * b * phi)");
        input = RunInputKeys.WithText(input, "model.end", "chi - 1.2");
        input = RunInputKeys.WithNumber(input, "model.parameters.m", 6e-6);
        input = RunInputKeys.WithNumber(input, "model.parameters.mu", 4.5e-6);
        input = RunInputKeys.WithNumber(input, "model.parameters.b", 0.15);
        input = RunInputKeys.WithText(input, "start.phi0", "17, 2");
        input = RunInputKeys.WithText(input, "start.dphi0", "-0.12,0");
        var a = SettingsResolver.Resolve(input);
        var b = SettingsResolver.Resolve(DeckReader.Parse(Deck, "fields.toml"));
        Assert.Equal(b.Model.Describe(), a.Model.Describe());
        Assert.Equal(b.Initial.Fields0!, a.Initial.Fields0!);
        Assert.Equal(b.Initial.Velocity0!, a.Initial.Velocity0!);
    }

    [Fact]
    public void BackgroundCommand_DeckAndOptionsPrintTheSame()
    {
        string dir = CliRunner.TempDir("fields");
        Directory.CreateDirectory(dir);
        try
        {
            string path = Path.Combine(dir, "fields.toml");
            File.WriteAllText(path, Deck);
            var fromDeck = CliRunner.Run("background", path, "--quiet");
            var fromOptions = CliRunner.Run("background", "--quiet", "--fields", "phi,chi", "--potential", "m^2 * phi^2 / 2 + mu^2 * chi^2 / 2",
                "--metric", "1, 0; 0, exp(2 * b * phi)", "--end", "chi - 1.2", "--param", "m=6e-6", "--param", "mu=4.5e-6", "--param", "b=0.15",
                "--phi0", "17,2", "--dphi0=-0.12,0");
            Assert.True(fromDeck.Code == 0, fromDeck.Err);
            Assert.Equal(fromDeck.Out, fromOptions.Out);
            Assert.Contains("on the end surface chi - 1.2 = 0", fromDeck.Out, StringComparison.Ordinal);
            Assert.Contains("field-space R at start     -0.045", fromDeck.Out, StringComparison.Ordinal); // R_fs = -2 b^2 of ds^2 = dphi^2 + e^(2 b phi) dchi^2
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void EndSurface_EndsTheBackgroundWhereTheFormulaCrossesZero()
    {
        var s = SettingsResolver.Resolve(DeckReader.Parse(Deck, "fields.toml"));
        var run = FieldPipeline.RunBackground(s);
        Assert.True(run.Background.EndedAtSurface);
        var end = run.Background.FieldsAt(run.Background.NEnd);
        Assert.True(Math.Abs(end[1] - 1.2) < 1e-8, $"chi at the end = {end[1]}");
        // Without the surface the same start inflates longer (chi passes 1.2 before epsilon_1 = 1).
        var free = FieldPipeline.RunBackground(s with { Model = s.Model with { End = null } });
        Assert.False(free.Background.EndedAtSurface);
        Assert.True(free.Background.NTotal > run.Background.NTotal);
    }

    [Fact]
    public void OneFieldFormulaDeck_KeepsTheSingleFieldPath()
    {
        // fields = ["x"] with a 1 x 1 metric is today's one-field deck with K = the metric entry: the same numbers.
        const string plain = "[model]\npotential = \"V0 * phi^2\"\nkinetic = \"1 + 0.1*phi^2\"\n[model.parameters]\nV0 = 1e-10\n[start]\nphi0 = 12\n";
        const string named = "[model]\nfields = [\"x\"]\npotential = \"V0 * x^2\"\nmetric = [[\"1 + 0.1*x^2\"]]\n[model.parameters]\nV0 = 1e-10\n[start]\nphi0 = [12]\n";
        var a = SettingsResolver.Resolve(DeckReader.Parse(plain, "plain.toml"));
        var b = SettingsResolver.Resolve(DeckReader.Parse(named, "named.toml"));
        Assert.False(b.Model.IsMultiField);
        Assert.Equal("1 + 0.1*x^2", b.Model.Kinetic);
        var ba = SpectrumPipeline.SolveBackground(TheoryFactory.Build(a), a);
        var bb = SpectrumPipeline.SolveBackground(TheoryFactory.Build(b), b);
        Assert.Equal(ba.NEnd - ba.NStart, bb.NEnd - bb.NStart);
        Assert.Equal(ba.At(ba.NEnd).Phi, bb.At(bb.NEnd).Phi);
    }

    [Fact]
    public void WrittenDeck_ReadsBackToTheSameSettings()
    {
        var s = SettingsResolver.Resolve(DeckReader.Parse(Deck, "fields.toml"));
        var back = SettingsResolver.Resolve(DeckReader.Parse(DeckWriter.Write(s), "written.toml"));
        Assert.Equal(s.Model.Describe(), back.Model.Describe());
        Assert.Equal(s.Initial.Fields0!, back.Initial.Fields0!);
        Assert.Equal(s.Initial.Velocity0!, back.Initial.Velocity0!);
        Assert.Equal(s.Model.End, back.Model.End);
    }

    [Fact]
    public void OneFieldPivotRecord_RefusesSeveralFieldsInOneLine()
    {
        var s = SettingsResolver.Resolve(DeckReader.Parse(Deck, "fields.toml"));
        var e = Assert.Throws<DeckException>(() => SpectrumPipeline.RunPivot(s));
        Assert.Contains("fields.toml: the one-field pivot record (PivotRun) of a model of 2 fields (phi, chi) is not available", e.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', e.Message);
    }

    [Fact]
    public void DemoDeck_RunsTheSpectrumEndToEnd()
    {
        // The several-field deck through the deck adapter and Core's n-field run: normalised to the requested A_s,
        // with the isocurvature in the report and the deck's settings list.
        string demo = DeckTests.RepoFile("runs/two-field-demo.toml");
        var s = SettingsResolver.Load(demo, RunInputKeys.WithNumber(new RunInput(), "modes.count", 5));
        var report = SpectrumPipeline.Run(s);
        Assert.True(Math.Abs(report.Pivot.As / 2.099e-9 - 1) < 1e-4, $"A_s = {report.Pivot.As}");
        Assert.NotNull(report.Isocurvature);
        Assert.Equal(2, report.Isocurvature!.FieldCount);
        Assert.Contains(report.Settings.Entries, e => e.Key == "model.fields" && e.Value == "phi,chi");
        Assert.Equal("[1, 0; 0, exp(2 * b * phi)]", report.Model.Kinetic);
    }

    [Fact]
    public void SweepOverASeveralFieldParameter_RunsEveryPoint()
    {
        string dir = CliRunner.TempDir("field-sweep");
        Directory.CreateDirectory(dir);
        try
        {
            string deck = Path.Combine(dir, "sweep.toml");
            File.WriteAllText(deck, "[model]\ncatalogue = \"double-quadratic\"\n[pivot]\nefolds = 55\n[sweep]\n[[sweep.axis]]\nkey = \"param.R\"\nvalues = [1.0, 3.0]\n");
            var (code, _, err) = CliRunner.Run("sweep", deck, "--out", Path.Combine(dir, "out"), "--quiet");
            Assert.True(code == 0, err);
            var rows = File.ReadAllLines(Path.Combine(dir, "out", "points.csv"));
            Assert.Equal(3, rows.Length);
            Assert.All(rows.Skip(1), r => Assert.Contains(",ok,", r, StringComparison.Ordinal));

            // The n-field columns: beta_iso, cos_delta, T_RS, f_NL_local, equal to a single run's pivot values.
            var header = rows[0].Split(',');
            int Col(string name) => Array.IndexOf(header, name);
            var cells = rows[2].Split(','); // R = 3
            var one = SettingsResolver.Resolve(DeckReader.Parse("[model]\ncatalogue = \"double-quadratic\"\n[model.parameters]\nR = 3.0\n[pivot]\nefolds = 55\n", "one.toml"));
            var stage = FieldPipeline.RunPivot(one);
            double Cell(string name) => double.Parse(cells[Col(name)], System.Globalization.CultureInfo.InvariantCulture);
            Assert.Equal(stage.Isocurvature!.BetaIso, Cell("beta_iso"));
            Assert.Equal(stage.Isocurvature.Trs, Cell("T_RS"));
            if (double.IsFinite(stage.Isocurvature.CosDelta)) Assert.Equal(stage.Isocurvature.CosDelta, Cell("cos_delta"));
            else Assert.Equal("", cells[Col("cos_delta")]);
            Assert.True(Cell("T_RS") > 0.01, $"T_RS = {Cell("T_RS")}: the trajectory turns at R = 3");
            double fnl = Cell("f_NL_local");
            Assert.True(double.IsFinite(fnl) && Math.Abs(fnl) < 1, $"f_NL_local = {fnl}"); // slow-roll size for the double quadratic (Vernizzi & Wands 2006)
            using var h5 = H5File.OpenRead(Path.Combine(dir, "out", "sweep.h5"));
            Assert.Equal(fnl, h5.Group("points").Dataset("f_NL_local").Read<double[]>()[1]);
            Assert.Equal(Cell("beta_iso"), h5.Group("points").Dataset("beta_iso").Read<double[]>()[1]);
            // The trajectory flag of a light turning field keeps its own name in the sweep files.
            Assert.Contains("light-entropic-turn", cells[Col("flags")], StringComparison.Ordinal);
            Assert.DoesNotContain("m_s^2", cells[Col("flags")], StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void Check_PrintsTheStartPerFieldAndTheBoundaries()
    {
        var (code, output, err) = CliRunner.Run("background", "--check", "--model", "two-field-nonminimal");
        Assert.True(code == 0, err);
        Assert.Contains("Start at (phi, chi) = (0.33, 0.001) on the slow-roll attractor direction.", output, StringComparison.Ordinal);
        Assert.Contains("The valid region is bounded by: Omega^2 = 0.", output, StringComparison.Ordinal);
    }
}
