using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Pipeline;

namespace ModeSolver.Tests.Models;

/// <summary>The several-field catalogue entries: each builds and inflates to an end; physics checks with their sources.</summary>
public class FieldCatalogueTests
{
    private static RunSettings Resolve(string deck) => SettingsResolver.Resolve(DeckReader.Parse(deck, "catalogue.toml"));

    public static TheoryData<string, string> Entries() => new()
    {
        { "double-quadratic", "" },
        { "n-quadratic", "" },
        { "n-quadratic", "N = 2" },
        { "n-quadratic", "N = 10" },
        { "disk-alpha", "" },
        { "disk-alpha", "alpha = 0.1\n[start]\nphi0 = [2.92, 1.0]" }, // N ~ (3 alpha/8) exp(2 phi/sqrt(6 alpha)) ~ 70 (slow roll of the T-model)
        { "two-field-nonminimal", "" },
    };

    [Theory]
    [MemberData(nameof(Entries))]
    public void Entry_BuildsAndItsBackgroundRunsToTheEndOfInflation(string id, string parameters)
    {
        var s = Resolve($"[model]\ncatalogue = \"{id}\"\n[model.parameters]\n{parameters}\n");
        Assert.True(s.Model.IsMultiField);
        var entry = ModelCatalogue.Find(id)!;
        Assert.False(string.IsNullOrWhiteSpace(entry.Source));
        var run = FieldPipeline.RunBackground(s);
        Assert.NotEmpty(run.Background.RisingCrossings);
        Assert.InRange(run.Background.NTotal, 55, 90); // the defaults are chosen for 60 to 80 e-folds (slow-roll estimates in the notes)
        if (parameters == "N = 10") Assert.Equal(10, run.Theory.FieldCount);
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(0.1)]
    public void Disk_RicciScalarIsMinusFourOverThreeAlpha(double alpha)
    {
        // physics.md section 7 (Achucarro, Kallosh, Linde, Wang & Welling 2018, JCAP 04, 028): R_fs = -4/(3 alpha).
        var s = Resolve($"[model]\ncatalogue = \"disk-alpha\"\n[model.parameters]\nalpha = {alpha}\n");
        var theory = TheoryFactory.BuildFields(s.Model);
        foreach (double phi in new[] { 0.5, 2.0, 6.4 })
        {
            double r = FieldGeometry.RicciScalar(theory, new[] { phi, 1.0 });
            Assert.True(Math.Abs(r + 4 / (3 * alpha)) <= 1e-10 * (4 / (3 * alpha)), $"R = {r} at phi = {phi}, expected {-4 / (3 * alpha)}");
        }
    }

    [Fact]
    public void TwoFieldNonMinimal_WithChiAtZero_IsTheHiggsLikeModel()
    {
        // physics.md section 7: the two-field Jordan-frame model with the second field at zero reduces to the single-field
        // one (chi = 0 is a solution: V_J and Omega^2 are even in chi, so V_chi = 0 and G_phichi = 0 there).
        var two = Resolve("[model]\ncatalogue = \"two-field-nonminimal\"\n[start]\nphi0 = [0.3, 0.0]\n");
        var one = Resolve("[model]\ncatalogue = \"higgs-like\"\n[model.parameters]\nlambda = 0.01\nxi = 1000\n[start]\nphi0 = 0.3\n[pivot]\nefolds = 50\n");
        var field = FieldPipeline.RunBackground(two).Background;
        var single = SpectrumPipeline.SolveBackground(TheoryFactory.Build(one), one);
        double nSingle = single.NEnd - single.NStart;
        Assert.True(Math.Abs(field.NTotal - nSingle) <= 1e-8 * nSingle, $"N_total: two fields {field.NTotal:R}, one field {nSingle:R}");
        Assert.Equal(0.0, field.FieldsAt(field.NEnd)[1]);
    }

    [Theory]
    [InlineData(1.0, 0.0)]
    [InlineData(1.0 / 3.0, 0.3)]
    public void Disk_WithoutAngularForce_IsTheSingleFieldTModel(double alpha, double a)
    {
        // On the disk the radial direction is a geodesic (G_phiphi = 1, Gamma^phi_phiphi = 0): with no angular force
        // (A = 0, or theta at the maximum of cos theta) theta stays put and phi is the single-field T-model
        // (Kallosh, Linde & Roest 2013 potential; its one-field reduction, Achucarro et al. 2018).
        var disk = Resolve($"[model]\ncatalogue = \"disk-alpha\"\n[model.parameters]\nalpha = {alpha:R}\nA = {a:R}\n[start]\nphi0 = [6.0, 0.0]\n");
        var one = Resolve($"[model]\ncatalogue = \"t-model\"\n[model.parameters]\nalpha = {alpha:R}\n[start]\nphi0 = 6.0\n");
        var field = FieldPipeline.RunBackground(disk).Background;
        var single = SpectrumPipeline.SolveBackground(TheoryFactory.Build(one), one);
        double nSingle = single.NEnd - single.NStart;
        Assert.True(Math.Abs(field.NTotal - nSingle) <= 1e-8 * nSingle, $"N_total: disk {field.NTotal:R}, T-model {nSingle:R}");
        Assert.Equal(0.0, field.FieldsAt(field.NEnd)[1]);
    }

    [Theory]
    [InlineData(2)]
    [InlineData(5)]
    public void EqualMasses_AreTheSingleFieldQuadraticInTheRadius(int n)
    {
        // physics.md section 7 oracle: equal masses started radially are exactly single-field quadratic (the default start
        // is the diagonal at radius 17, so the single-field start is phi0 = 17).
        var s = Resolve($"[model]\ncatalogue = \"n-quadratic\"\n[model.parameters]\nN = {n}\n");
        var one = Resolve("[model]\npotential = \"m^2 * phi^2 / 2\"\n[model.parameters]\nm = 1\n[start]\nphi0 = 17\n");
        var field = FieldPipeline.RunBackground(s).Background;
        var single = SpectrumPipeline.SolveBackground(TheoryFactory.Build(one), one);
        double nSingle = single.NEnd - single.NStart;
        Assert.True(Math.Abs(field.NTotal - nSingle) <= 1e-7 * nSingle, $"N_total: {n} fields {field.NTotal:R}, one field {nSingle:R}");
    }

    [Fact]
    public void NQuadratic_RefusesAFieldCountOutOfRange()
    {
        var e = Assert.Throws<DeckException>(() => Resolve("[model]\ncatalogue = \"n-quadratic\"\n[model.parameters]\nN = 11\n"));
        Assert.Contains("catalogue.toml:4: model.parameters.N does not give a model: the number of fields N must be a whole number from 1 to 10 (got 11)", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void DoubleQuadratic_HeavyFieldSettlesFirst()
    {
        // Polarski & Starobinsky 1992: with m_chi > m_phi the heavy field rolls first and the last e-folds are driven by phi.
        var run = FieldPipeline.RunBackground(Resolve("[model]\ncatalogue = \"double-quadratic\"\n")).Background;
        var end = run.FieldsAt(run.NEnd);
        Assert.True(Math.Abs(end[1]) < 1e-3 && end[0] > 0.5, $"(phi, chi) at the end = ({end[0]}, {end[1]})");
    }
}
