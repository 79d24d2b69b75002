using System.Globalization;
using ModeSolver.Sweeps;
using ModeSolver.Tests.Decks;
using PureHDF;

namespace ModeSolver.Tests.Sweeps;

/// <summary>
/// Sweep axes over the catalogue id (<c>model</c>), <c>phi_end</c>, <c>reheat.dof</c> and <c>start.efolds</c>, and the
/// demo deck that sweeps the T-model over six decades of alpha from a start in e-folds.
/// </summary>
public class SweepAxisKeyTests
{
    private const string RunDeck = """
        [model]
        catalogue = "t-model"

        [model.parameters]
        alpha = 1.0

        [pivot]
        k = 0.05

        [reheating]
        w = 0.0
        efolds = 2

        """;

    private static SweepPoint FirstPoint(string deckText) => SweepDeck.ParseSpec(deckText, "deck.toml").GetPoint(0);

    [Fact]
    public void Phi_end_dof_and_start_efolds_override_their_deck_values()
    {
        string deck = RunDeck + """
            [sweep]
            [[sweep.axis]]
            key = "phi_end"
            values = [1.5]
            [[sweep.axis]]
            key = "reheat.dof"
            values = [300]
            [[sweep.axis]]
            key = "start.efolds"
            values = [64]
            """;
        var settings = PipelineSweepEvaluator.FromDeckText(deck, "deck.toml").SettingsFor(FirstPoint(deck));
        Assert.Equal(1.5, settings.Model.PhiEnd);
        Assert.Equal(300, settings.Pivot.Reheating.Dof);
        Assert.Equal(64, settings.Initial.StartEfolds);
    }

    [Fact]
    public void A_model_axis_takes_catalogue_ids_and_each_point_runs_its_model()
    {
        string deck = RunDeck + """
            [sweep]
            [[sweep.axis]]
            key = "model"
            values = ["t-model", "e-model"]
            [[sweep.axis]]
            key = "param.alpha"
            values = [1.0, 4.0]
            """;
        var spec = SweepDeck.ParseSpec(deck, "deck.toml");
        Assert.Equal(["t-model", "e-model"], spec.Axes[0].Labels!);
        Assert.Equal("e-model", spec.Axes[0].Text(1));
        var evaluator = PipelineSweepEvaluator.FromDeckText(deck, "deck.toml");
        Assert.Equal("t-model", evaluator.SettingsFor(spec.GetPoint(0)).Model.CatalogueId);
        Assert.Equal("e-model", evaluator.SettingsFor(spec.GetPoint(3)).Model.CatalogueId);
        Assert.Equal(4.0, evaluator.SettingsFor(spec.GetPoint(3)).Model.Parameters["alpha"]);

        var dir = SweepTestSupport.TempDir("model-axis");
        var summary = SweepRunner.Run(spec, deck, evaluator, SweepTestSupport.Options(dir, 1));
        Assert.Equal(0, summary.Failed);
        var csv = File.ReadAllLines(Path.Combine(dir, SweepFiles.Csv));
        Assert.StartsWith("index,model,param.alpha,", csv[0]);
        Assert.StartsWith("0,t-model,1,", csv[1]);
        Assert.StartsWith("3,e-model,4,", csv[4]);
        var (_, records) = SweepResults.Load(dir);
        var r = records.OrderBy(x => x.Index).ToArray();
        // The two models differ at the same alpha (E-model and T-model plateaus are not the same potential).
        Assert.NotEqual(r[0].R, r[2].R);
        using var h5 = H5File.OpenRead(Path.Combine(dir, SweepFiles.Hdf5));
        Assert.Equal(["t-model", "e-model"], h5.Group("grid").Dataset("model").Attribute("names").Read<string[]>());

        // The names are part of the fingerprint: another list is another sweep.
        var other = SweepDeck.ParseSpec(deck.Replace("\"e-model\"", "\"starobinsky\"").Replace("values = [1.0, 4.0]", "values = [1.0]"), "deck.toml");
        Assert.NotEqual(spec.CanonicalText(), other.CanonicalText());
        Assert.Contains("axis model List: t-model starobinsky", other.CanonicalText());
    }

    [Theory]
    [InlineData("key = \"model\"\nvalues = [\"t-model\", \"no-such-model\"]", "sweep axis 'model': 'no-such-model' is not a catalogue model (see `modesolver models`)")]
    [InlineData("key = \"model\"\nvalues = [1, 2]", "sweep axis 'model': 'values' must be a list of catalogue ids, e.g. [\"t-model\", \"e-model\"]")]
    [InlineData("key = \"phi_end\"\nvalues = [\"t-model\"]", "sweep axis 'phi_end': 'values' must be numbers (only the axis 'model' takes names)")]
    [InlineData("key = \"model\"\nvalues = [\"t-model\", \"starobinsky\"]\n[[sweep.axis]]\nkey = \"param.alpha\"\nvalues = [1.0]", "sweep axis 'param.alpha': model starobinsky (of the axis 'model') has no parameter 'alpha' (its parameters: V0)")]
    public void Bad_model_axes_stop_the_sweep_in_one_line(string axis, string expected)
    {
        string deck = RunDeck + "[sweep]\n[[sweep.axis]]\n" + axis + "\n";
        var e = Assert.Throws<SweepException>(() => PipelineSweepEvaluator.FromDeckText(deck, "deck.toml"));
        Assert.Equal("deck.toml: " + expected, e.Message);
    }

    [Fact]
    public void A_model_axis_refuses_a_deck_that_writes_out_its_potential()
    {
        string deck = "[model]\npotential = \"V0*phi^2\"\n[model.parameters]\nV0 = 1.0\n[start]\nphi0 = 16.0\n[sweep]\n[[sweep.axis]]\nkey = \"model\"\nvalues = [\"t-model\"]\n";
        var e = Assert.Throws<SweepException>(() => PipelineSweepEvaluator.FromDeckText(deck, "deck.toml"));
        Assert.Contains("sweeps catalogue models, but the deck writes out a potential", e.Message);
    }

    /// <summary>
    /// The demo deck runs/tmodel-wide-sweep.toml: alpha from 1e-3 to 1e3 (7 values) at two reheating durations, each
    /// point started 70 e-folds before the end (no phi0 per point). Every point must run. At alpha = 1e-3 r is near the
    /// attractor value 12 alpha / N_*^2 (Kallosh, Linde &amp; Roest 2013, JHEP 11, 198; the O(1/N) correction is checked
    /// in PipelineSweepTests, here 10% is allowed), and r grows with alpha along each family (towards the quadratic
    /// potential's r = 8/N_*, from memory).
    /// </summary>
    [Fact]
    public void The_wide_T_model_demo_runs_at_every_point_from_a_start_in_efolds()
    {
        string deckPath = DeckTests.RepoFile("runs/tmodel-wide-sweep.toml");
        string text = File.ReadAllText(deckPath);
        var spec = SweepDeck.ParseSpec(text, deckPath);
        Assert.Equal(14, spec.PointCount);
        var evaluator = PipelineSweepEvaluator.FromDeckText(text, deckPath);
        Assert.Equal(70, evaluator.SettingsFor(spec.GetPoint(0)).Initial.StartEfolds);
        var dir = SweepTestSupport.TempDir("wide-tmodel");
        var summary = SweepRunner.Run(spec, text, evaluator, SweepTestSupport.Options(dir, 2));
        Assert.Equal(14, summary.Done);
        Assert.Equal(0, summary.Failed);
        var r = SweepResults.Load(dir).Records.OrderBy(x => x.Index).ToArray();
        var values = new double[2];
        foreach (int family in new[] { 0, 1 })
        {
            var line = r.Where(x => x.Index % 2 == family).ToArray();
            for (int i = 1; i < line.Length; i++) Assert.True(line[i].R > line[i - 1].R, $"r does not grow with alpha at point {line[i].Index}");
            spec.GetValues(line[0].Index, values);
            Assert.Equal(1e-3, values[0], 15);
            double attractor = 12 * 1e-3 / (line[0].NStar * line[0].NStar);
            Assert.True(Math.Abs(line[0].R / attractor - 1) < 0.1, $"r = {line[0].R} at alpha = 1e-3, attractor {attractor}");
            Assert.True(line[^1].R < 8 / line[^1].NStar, $"r = {line[^1].R} at alpha = 1e3 above the quadratic limit");
        }
        SweepPlot.Write(dir, spec, r, new SweepPlotOptions { LogR = true, Subject = evaluator.Subject });
        var texts = ModeSolver.Tests.Output.SvgText.Of(File.ReadAllText(Path.Combine(dir, SweepFiles.PlotSvg)));
        Assert.Contains("T-model, alpha from 1e-3 to 1e3, start 70 e-folds before the end: n_s and r, lines along param.alpha", texts);
        Assert.Contains("param.alpha = 0.001", texts);
        Assert.Contains("1000", texts);
        Assert.Contains("reheat.efolds = 10", texts);
        Assert.Equal("T-model, alpha from 1e-3 to 1e3, start 70 e-folds before the end", PipelineSweepEvaluator.SubjectOfDeckText(text, deckPath));
    }

    [Fact]
    public void The_subject_is_the_title_else_the_model_else_the_potential()
    {
        string sweep = "[sweep]\n[[sweep.axis]]\nkey = \"efolds\"\nvalues = [55]\n";
        Assert.Equal(ModelName("t-model") + " (t-model)", Subject("[model]\ncatalogue = \"t-model\"\n" + sweep));
        Assert.Equal("V = V0*phi^2", Subject("[model]\npotential = \"V0*phi^2\"\n[start]\nphi0 = 16.0\n" + sweep));
        Assert.Equal("my run", Subject("title = \"my run\"\n[model]\ncatalogue = \"t-model\"\n" + sweep));
        Assert.Equal("models t-model, e-model", Subject("[model]\ncatalogue = \"t-model\"\n[sweep]\n[[sweep.axis]]\nkey = \"model\"\nvalues = [\"t-model\", \"e-model\"]\n"));

        static string Subject(string deck) => PipelineSweepEvaluator.FromDeckText(deck, "deck.toml").Subject;
        static string ModelName(string id) => ModeSolver.Models.ModelCatalogue.Get(id).Name;
    }
}
