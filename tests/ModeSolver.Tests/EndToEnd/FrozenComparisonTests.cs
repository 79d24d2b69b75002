using ModeSolver.Decks;
using ModeSolver.Diagnostics;
using ModeSolver.Pipeline;
using Xunit.Abstractions;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>`[compare] freeze`: the one-field model with the named fields held at their pivot-exit values, beside the n-field run.</summary>
public class FrozenComparisonTests(ITestOutputHelper output)
{
    private static RunSettings Resolve(string deck) => SettingsResolver.Resolve(DeckReader.Parse(deck, "freeze.toml"));

    private const string Modes = "[modes]\nk_min = 0.01\nk_max = 0.1\ncount = 4\n";

    [Fact]
    public void HeavyFieldAtItsMinimum_FrozenModelAgreesWithinTheErrors()
    {
        // physics.md section 7 oracle: a field of mass about 10 H at its minimum leaves single-field results unchanged
        // (H_* ~ m phi_*/sqrt(6) ~ 6 m at phi_* ~ 15, so M = 60 m); frozen at chi = 0 the one-field model is the quadratic.
        var s = Resolve("[model]\nfields = [\"phi\", \"chi\"]\npotential = \"m^2 * phi^2 / 2 + (60 * m)^2 * chi^2 / 2\"\n[model.parameters]\nm = 6e-6\n"
            + "[start]\nphi0 = [17.0, 0.0]\n[compare]\nfreeze = [\"chi\"]\n" + Modes);
        var report = FieldPipeline.Run(s);
        var f = report.Frozen!;
        output.WriteLine($"two fields n_s {report.Pivot.Ns:R} +- {report.Pivot.Errors.Ns:E1}, r {report.Pivot.R:R}; frozen n_s {f.Ns:R} +- {f.NsError:E1}, r {f.R:R} +- {f.RError:E1}");
        Assert.Null(f.Note);
        Assert.Equal(new[] { "chi" }, f.Frozen.ToArray());
        Assert.Equal(0.0, f.Values[0]);
        Assert.Equal("phi", f.Free);
        Assert.False(f.Differs(report.Pivot), $"n_s {report.Pivot.Ns:R} against {f.Ns:R}, r {report.Pivot.R:R} against {f.R:R}");
        Assert.DoesNotContain(report.Flags, x => x.Kind == FlagKinds.FrozenReductionDiffers);
        Assert.InRange(f.Ns, 0.95, 0.975);
    }

    [Fact]
    public void DiskWithAnAngularForce_FrozenAngleIsTheTModelAndIsFlaggedBeyondTheErrors()
    {
        // theta frozen at its exit value: V0 tanh^2(phi/sqrt(6 alpha)) (1 + A cos theta_*) with G_phiphi = 1, the T-model
        // with a rescaled V0 (Achucarro et al. 2018). The angular motion shifts n_s by ~5e-6 (FieldReductionSpectrumTests),
        // far beyond the modes' errors (~2e-7): the comparison flags it.
        var s = Resolve("[model]\ncatalogue = \"disk-alpha\"\n[model.parameters]\nalpha = 1.0\nA = 0.3\n[start]\nphi0 = [6.4, 1.0]\n[compare]\nfreeze = [\"theta\"]\n" + Modes);
        var report = FieldPipeline.Run(s);
        var f = report.Frozen!;
        var t = SpectrumPipeline.RunPivot(Resolve("[model]\ncatalogue = \"t-model\"\n[model.parameters]\nalpha = 1.0\n[start]\nphi0 = 7.4\n"));
        output.WriteLine($"disk n_s {report.Pivot.Ns:R} r {report.Pivot.R:R}; frozen theta = {f.Values[0]:R}: n_s {f.Ns:R} +- {f.NsError:E1} r {f.R:R}; T-model n_s {t.Exact.Ns:R} r {t.Exact.R:R}");
        Assert.Null(f.Note);
        Assert.InRange(f.Values[0], 1.0, 1.01); // theta has hardly moved from 1 (towards the minimum of cos theta at pi) by the pivot's exit
        // The frozen model is the T-model up to its V scale, which normalisation and N_* from reheating barely feel.
        Assert.True(Math.Abs(f.Ns - t.Exact.Ns) < 1e-5, $"frozen n_s {f.Ns:R}, T-model {t.Exact.Ns:R}");
        Assert.True(Math.Abs(f.R / t.Exact.R - 1) < 1e-3, $"frozen r {f.R:R}, T-model {t.Exact.R:R}");
        Assert.True(f.Differs(report.Pivot));
        var flag = Assert.Single(report.Flags, x => x.Kind == FlagKinds.FrozenReductionDiffers);
        Assert.Contains("theta = ", flag.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void OneFieldModelThatCannotEnd_IsANoteAndTheRunStands()
    {
        // The demo's chi frozen at 2 leaves mu^2 chi^2/2 in V: the one-field potential never reaches zero, so its
        // inflation never ends; the n-field results are kept and the comparison says why it has no numbers.
        var s = SettingsResolver.Resolve(DeckReader.Parse(File.ReadAllText(Decks.DeckTests.RepoFile("runs/two-field-demo.toml")) + "\n[compare]\nfreeze = [\"chi\"]\n" + Modes, "demo.toml"));
        var report = FieldPipeline.Run(s);
        Assert.NotNull(report.Frozen!.Note);
        Assert.Contains("cannot be run", report.Frozen.Note, StringComparison.Ordinal);
        Assert.True(double.IsNaN(report.Frozen.Ns));
        Assert.False(report.Frozen.Differs(report.Pivot));
        Assert.InRange(report.Pivot.Ns, 0.95, 0.98);
    }

    [Theory]
    [InlineData("[model]\ncatalogue = \"t-model\"\n[compare]\nfreeze = [\"chi\"]\n", "freeze.toml:4: compare.freeze compares a several-field model with its one-field reduction")]
    [InlineData("[model]\ncatalogue = \"double-quadratic\"\n[compare]\nfreeze = [\"psi\"]\n", "names 'psi', which is not a field of the model (the fields are phi, chi)")]
    [InlineData("[model]\ncatalogue = \"double-quadratic\"\n[compare]\nfreeze = [\"phi\", \"chi\"]\n", "must name every field but one (the model has 2: phi, chi; got 2)")]
    [InlineData("[model]\ncatalogue = \"n-quadratic\"\n[compare]\nfreeze = [\"phi1\"]\n", "must name every field but one (the model has 3")]
    public void BadFreezeLists_AreOneLineErrors(string deck, string expected)
    {
        var e = Assert.Throws<DeckException>(() => Resolve(deck));
        Assert.Contains(expected, e.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', e.Message);
    }
}
