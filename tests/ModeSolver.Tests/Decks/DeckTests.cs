using ModeSolver.Decks;
using ModeSolver.Models;

namespace ModeSolver.Tests.Decks;

public class DeckTests
{
    internal static string RepoFile(string relative)
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "ModeSolver.sln"))) dir = dir.Parent;
        Assert.NotNull(dir);
        return Path.Combine(dir!.FullName, relative);
    }

    private static string Demo => RepoFile("runs/plateau-demo.toml");

    private static RunSettings FromText(string toml) => SettingsResolver.Resolve(DeckReader.Parse(toml, "test.toml"));

    private static DeckException Bad(string toml) => Assert.Throws<DeckException>(() => FromText(toml));

    [Fact]
    public void DemoDeckReadsAsWritten()
    {
        var s = SettingsResolver.Load(Demo);
        Assert.Equal("e-model", s.Model.CatalogueId);
        Assert.Equal(4.0, s.Model.Parameters["alpha"]);
        Assert.Equal(1e-10, s.Model.Parameters["V0"]);
        Assert.Null(s.Model.Coupling);
        Assert.Equal(8.5, s.Initial.Phi0);
        Assert.Null(s.Initial.DPhi0);
        Assert.Equal(0.05, s.Pivot.KPivot);
        Assert.Null(s.Pivot.Efolds);
        Assert.Equal(ReheatingKind.Temperature, s.Pivot.Reheating.Kind);
        Assert.Equal(0.0, s.Pivot.Reheating.W);
        Assert.Equal(1e10, s.Pivot.Reheating.TemperatureGeV);
        Assert.Equal(106.75, s.Pivot.Reheating.Dof);
        Assert.Equal(2.1e-9, s.Amplitude.ScalarAmplitude);
        Assert.Equal(new KRangeSpec(1e-5, 1.0, 80, 1e-5), s.KRange);
        Assert.Equal("out/plateau-demo", s.Output.Directory);
        Assert.Equal(["hdf5", "table", "json", "plots"], s.Output.Formats);
        Assert.Empty(s.Warnings);
        Assert.StartsWith("E-model plateau", s.Title);
    }

    [Fact]
    public void DemoDeckRoundTripsThroughTheWriter()
    {
        var s = SettingsResolver.Load(Demo);
        string text = DeckWriter.Write(s);
        var back = FromText(text);
        Assert.Equal(s.Model.Potential, back.Model.Potential);
        Assert.Equal(s.Model.Parameters.OrderBy(p => p.Key), back.Model.Parameters.OrderBy(p => p.Key));
        Assert.Equal(s.Model.PhiEnd, back.Model.PhiEnd);
        Assert.Equal(s.Initial, back.Initial);
        Assert.Equal(s.Pivot, back.Pivot);
        Assert.Equal(s.Amplitude, back.Amplitude);
        Assert.Equal(s.KRange, back.KRange);
        Assert.Equal(s.Output.Directory, back.Output.Directory);
        Assert.Equal(s.Output.Formats, back.Output.Formats);
        Assert.Equal(s.Title, back.Title);
    }

    [Fact]
    public void JordanFrameSettingsRoundTrip()
    {
        var s = FromText("""
            [model]
            potential = "lambda * phi^4 / 4"
            coupling = "1 + xi * phi^2"
            palatini = true
            [model.parameters]
            lambda = 1e-3
            xi = 30
            [start]
            phi0 = 20
            dphi0 = -0.1
            [pivot]
            efolds = 52.5
            [normalisation]
            a_s = "none"
            """);
        Assert.True(s.Model.Palatini);
        Assert.Null(s.Amplitude.ScalarAmplitude);
        var back = FromText(DeckWriter.Write(s));
        Assert.Equal(s.Model, back.Model with { Parameters = s.Model.Parameters });
        Assert.Equal(s.Model.Parameters.OrderBy(p => p.Key), back.Model.Parameters.OrderBy(p => p.Key));
        Assert.Equal(s.Initial, back.Initial);
        Assert.Equal(s.Pivot, back.Pivot);
        Assert.Equal(s.Amplitude, back.Amplitude);
    }

    [Fact]
    public void CommandLineOverridesWin()
    {
        var cli = new RunInput
        {
            Phi0 = new(9.0, "--phi0"),
            Efolds = new(50.0, "--efolds"),
            KCount = new(12, "--k-count"),
            Amplitude = new(null, "--amplitude"),
            OutDir = new("elsewhere", "--out"),
        };
        cli.Parameters["alpha"] = new(2.0, "--param alpha");
        var s = SettingsResolver.Load(Demo, cli);
        Assert.Equal(9.0, s.Initial.Phi0);
        Assert.Equal(2.0, s.Model.Parameters["alpha"]);
        Assert.Equal(1e-10, s.Model.Parameters["V0"]); // deck value kept where the command line is silent
        Assert.Equal(50.0, s.Pivot.Efolds);             // --efolds replaces the deck's reheating section
        Assert.Equal(ReheatingKind.Instantaneous, s.Pivot.Reheating.Kind);
        Assert.Equal(12, s.KRange.Count);
        Assert.Equal(1e-5, s.KRange.KMin);
        Assert.Null(s.Amplitude.ScalarAmplitude);
        Assert.Equal("elsewhere", s.Output.Directory);
    }

    [Fact]
    public void CommandLineModelReplacesDeckModel()
    {
        var cli = new RunInput { Potential = new("m^2 * phi^2 / 2", "--potential"), Phi0 = new(16.0, "--phi0") };
        cli.Parameters["m"] = new(1e-5, "--param m");
        var s = SettingsResolver.Load(Demo, cli);
        Assert.Null(s.Model.CatalogueId);
        Assert.Equal("m^2 * phi^2 / 2", s.Model.Potential);
        // The deck's alpha is now unused: reported as a warning naming the deck line.
        Assert.Contains(s.Warnings, w => w.Contains("model.parameters.alpha") && w.Contains("plateau-demo.toml:"));
    }

    [Fact]
    public void InstantaneousReheatingByDefault()
    {
        var s = FromText("[model]\ncatalogue = \"starobinsky\"\n");
        Assert.Equal(ReheatingKind.Instantaneous, s.Pivot.Reheating.Kind);
        Assert.Null(s.Pivot.Efolds);
        // Catalogue models start a fixed number of e-folds before the end; phi0 is the slow-roll first guess.
        Assert.Equal(ModelCatalogue.DefaultStartEfolds, s.Initial.StartEfolds);
        Assert.InRange(s.Initial.Phi0, 5.6, 5.8);
        Assert.Equal(2.099e-9, s.Amplitude.ScalarAmplitude);
    }

    [Fact]
    public void UnusedParameterIsAWarning()
    {
        var s = FromText("[model]\ncatalogue = \"t-model\"\n[model.parameters]\nbeta = 2\n");
        var w = Assert.Single(s.Warnings);
        Assert.Equal("test.toml:4: model.parameters.beta is not used by the model's formulas", w);
    }

    [Fact]
    public void UnknownKeyIsRejectedWithValidKeysAndLine()
    {
        var e = Bad("[model]\ncatalogue = \"t-model\"\n\n[start]\nphi_0 = 3\n");
        Assert.Equal("test.toml:5: start.phi_0 is not a key of [start] (valid: phi0, dphi0, efolds)", e.Message);
        Assert.Equal("start.phi_0", e.Key);
        Assert.Equal(5, e.Line);
    }

    [Fact]
    public void UnknownSectionIsRejected()
    {
        var e = Bad("[model]\ncatalogue = \"t-model\"\n[initial]\nphi0 = 3\n");
        Assert.Contains("initial is not a deck section or key", e.Message);
        Assert.Contains("[start]", e.Message);
    }

    [Theory]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[start]\nphi0 = \"six\"\n", "test.toml:4: start.phi0 must be a number, or an array of numbers (one per field) (got the string \"six\")")]
    [InlineData("[model]\ncatalogue = \"no-such\"\n", "test.toml:2: model.catalogue names no catalogue model 'no-such'")]
    [InlineData("[model]\npotential = \"phi^2\"\npalatini = true\n[start]\nphi0 = 3\n", "test.toml:3: model.palatini needs a coupling")]
    [InlineData("[model]\npotential = \"phi^2 +\"\n[start]\nphi0 = 3\n", "test.toml:2: model.potential is not a valid formula: ")]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[reheating]\nw = 2\ntemperature_gev = 1e9\n", "test.toml:4: reheating.w must satisfy -1/3 < w <= 1")]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[pivot]\nefolds = 50\n[reheating]\ntemperature_gev = 1e9\n", "test.toml:6: reheating.temperature_gev cannot be combined with pivot.efolds")]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[reheating]\ntemperature_gev = 1e-4\n", "test.toml:4: reheating.temperature_gev must be at least 0.004 GeV")]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[modes]\nk_min = 2.0\nk_max = 1.0\n", "test.toml:4: modes.k_min gives k_min = 2 above k_max = 1")]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[output]\nformats = [\"pdf\"]\n", "test.toml:4: output.formats has an unknown format 'pdf' (valid: hdf5, table, json, plots)")]
    [InlineData("[model]\npotential = \"phi^2\"\n", "test.toml: start.phi0 or start.efolds (or --phi0 or --start-efolds) is required")]
    [InlineData("[model]\ncatalogue = \"exponential\"\nphi_end = -3\n[start]\nphi0 = 0\n", "test.toml:3: model.phi_end = -3 is not ahead of phi0 = 0 in the roll direction")]
    [InlineData("[model]\npotential = \"1 - phi^2\"\n[start]\nphi0 = 2\n", "test.toml:4: start.phi0 = 2 gives V = -3; inflation needs V > 0")]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[normalisation]\na_s = \"lots\"\n", "test.toml:4: normalisation.a_s must be a number or \"none\"")]
    public void BadDecksNameTheKeyAndLine(string toml, string expectedStart)
    {
        var e = Bad(toml);
        Assert.StartsWith(expectedStart, e.Message);
        Assert.DoesNotContain("\n", e.Message);
    }

    [Fact]
    public void TomlSyntaxErrorGivesFileAndLine()
    {
        var e = Bad("[model]\ncatalogue = \"t-model\"\n[start]\nphi0 = = 3\n");
        Assert.StartsWith("test.toml:4: TOML syntax error", e.Message);
        Assert.DoesNotContain("\n", e.Message);
    }

    [Fact]
    public void JordanTheoryFromDeckIsValidatedAroundPhi0()
    {
        var s = FromText("[model]\npotential = \"phi^2\"\ncoupling = \"1 - 0.1 * phi^2\"\n[start]\nphi0 = 1\n");
        var theory = TheoryFactory.Build(s);
        Assert.Equal(-Math.Sqrt(10), theory.ValidRange.Min, 8);
        Assert.Equal(Math.Sqrt(10), theory.ValidRange.Max, 8);
        var e = Bad("[model]\npotential = \"phi^2\"\ncoupling = \"1 - 0.1 * phi^2\"\n[start]\nphi0 = 4\n");
        Assert.Equal("test.toml:5: start.phi0 = 4 is outside the theory's valid region: Omega^2 <= 0 there", e.Message);
    }
}
