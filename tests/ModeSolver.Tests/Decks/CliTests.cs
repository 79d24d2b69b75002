using ModeSolver.Cli;
using ModeSolver.Models;

namespace ModeSolver.Tests.Decks;

[Collection("ConsoleCapture")]
public class CliTests
{
    private static (int Code, string Out, string Err) Run(params string[] args) => CliRunner.Run(args);

    private static string TempDir()
    {
        string d = Path.Combine(Path.GetTempPath(), "modesolver-tests-" + Guid.NewGuid().ToString("N")[..10]);
        return d;
    }

    [Fact]
    public void ModelsListsEveryCatalogueEntry()
    {
        var (code, output, err) = Run("models");
        Assert.Equal(0, code);
        Assert.Equal("", err);
        Assert.StartsWith("id ", output);
        foreach (var entry in ModelCatalogue.All)
        {
            Assert.Contains(entry.Id, output);
            Assert.Contains(entry.Potential, output);
            Assert.Contains(entry.Source, output);
        }
        Assert.Contains("Omega^2 = 1 + xi * phi^2", output);
        Assert.Contains("alpha=1", output);
    }

    [Fact]
    public void ModelsShowsOneEntryInFull()
    {
        var (code, output, _) = Run("models", "broken-linear");
        Assert.Equal(0, code);
        Assert.Contains("A_minus = 0.0002", output);
        Assert.Contains("phi_end        = -0.013", output);
        Assert.Contains("Starobinsky 1992, JETP Lett. 55, 489", output);
        var bad = Run("models", "nope");
        Assert.Equal(2, bad.Code);
        Assert.StartsWith("modesolver: unknown model 'nope'", bad.Err);
        Assert.Single(bad.Err.TrimEnd().Split('\n'));
    }

    [Fact]
    public void FrameWritesTableAndPlots()
    {
        string dir = TempDir();
        try
        {
            var (code, output, err) = Run("frame", "--model", "higgs-like", "--phi-min", "0", "--phi-max", "0.3", "--points", "50", "--out", dir);
            Assert.True(code == 0, err);
            Assert.Contains("frame.txt", output);
            foreach (string f in new[] { "frame.txt", "frame-chi.png", "frame-chi.svg", "frame-potential.png", "frame-potential.svg" })
                Assert.True(new FileInfo(Path.Combine(dir, f)).Length > 100, f);
            Assert.Equal(5, Directory.GetFiles(dir).Length); // no temporary files left
            var lines = File.ReadAllLines(Path.Combine(dir, "frame.txt"));
            Assert.StartsWith("# ", lines[0]);
            var data = lines.Where(l => !l.StartsWith('#')).ToArray();
            Assert.Equal(50, data.Length);
            var last = data[^1].Split(' ', StringSplitOptions.RemoveEmptyEntries).Select(s => double.Parse(s, System.Globalization.CultureInfo.InvariantCulture)).ToArray();
            Assert.Equal(0.3, last[0], 12);
            // chi(0.3) for xi = 1000 lies near sqrt(3/2) ln(1 + xi phi^2) (large-field form, Bezrukov & Shaposhnikov 2008).
            Assert.Equal(Math.Sqrt(1.5) * Math.Log(1 + 1000 * 0.09), last[1], 1);
            var png = File.ReadAllBytes(Path.Combine(dir, "frame-chi.png"));
            Assert.Equal(0x89, png[0]);
            Assert.Equal((byte)'P', png[1]);
            Assert.Contains("<svg", File.ReadAllText(Path.Combine(dir, "frame-potential.svg")));
        }
        finally
        {
            if (Directory.Exists(dir)) Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void FrameRefusesAnInvalidRangeAndWritesNothing()
    {
        string dir = TempDir();
        try
        {
            var (code, _, err) = Run("frame", "--potential", "phi^2", "--coupling", "1 - 0.1*phi^2", "--phi-min", "0", "--phi-max", "5", "--out", dir);
            Assert.Equal(2, code);
            Assert.StartsWith("modesolver: Omega^2 <= 0 at phi = 3.16228", err);
            Assert.Single(err.TrimEnd().Split('\n'));
            Assert.False(Directory.Exists(dir) && Directory.GetFiles(dir).Length > 0);
        }
        finally
        {
            if (Directory.Exists(dir)) Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void SpectrumResolvesDeckWithOverridesAndSummarises()
    {
        string deck = DeckTests.RepoFile("runs/plateau-demo.toml");
        var (code, output, err) = Run("spectrum", deck, "--check", "--param", "alpha=2", "--efolds", "50", "--k-count", "7");
        Assert.True(code == 0, err);
        Assert.Contains("alpha = 2", output);
        Assert.Contains("N_* = 50", output);
        Assert.Contains("7 wavenumbers", output);
        Assert.Equal("", err);
    }

    [Theory]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--phi0", "abc" }, "modesolver: --phi0 expects a number (got 'abc')")]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--bogus", "1" }, "modesolver: unknown option '--bogus'")]
    [InlineData(new[] { "spectrum", "--potential", "phi^2" }, "modesolver: command line: start.phi0 or start.efolds (or --phi0 or --start-efolds) is required")]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--param", "alpha" }, "modesolver: --param expects NAME=VALUE")]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--reheat-w", "0.3" }, "modesolver: --reheat-w needs the end of reheating too")]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--amplitude", "-1" }, "modesolver: --amplitude must be a positive number below 1")]
    [InlineData(new[] { "spectrum", "--potential", "phi^2 * (", "--phi0", "1" }, "modesolver: --potential is not a valid formula: ")]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--potential", "phi^2" }, "modesolver: --potential cannot be given together with --model")]
    [InlineData(new[] { "spectrum", "--model", "t-model", "--phi0" }, "modesolver: --phi0 needs a value")]
    [InlineData(new[] { "frame", "--model", "t-model", "--points", "1" }, "modesolver: --points expects a whole number from 2")]
    public void SpectrumRejectsBadInputWithOneLine(string[] args, string expectedStart)
    {
        var (code, output, err) = Run(args);
        Assert.Equal(2, code);
        Assert.Equal("", output);
        Assert.StartsWith(expectedStart, err);
        Assert.Single(err.TrimEnd().Split('\n'));
    }

    [Fact]
    public void NegativeNumbersAreOptionValues()
    {
        var (code, output, err) = Run("spectrum", "--check", "--model", "natural", "--phi0", "-3", "--dphi0", "-0.01");
        Assert.True(code == 0, err);
        Assert.Contains("phi0 = -3 with dphi/dN = -0.01", output);
    }

    [Fact]
    public void SpectrumOneLineJordanFormRejectsUnusedParameter()
    {
        var (code, output, err) = Run("spectrum", "--check", "--potential", "lambda*phi^4/4", "--coupling", "1 + xi*phi^2", "--param", "lambda=0.1",
            "--param", "xi=100", "--param", "zeta=3", "--phi0", "1", "--reheat-T", "1e9");
        Assert.Equal(2, code);
        Assert.Equal("", output);
        Assert.Equal("modesolver: --param zeta names a parameter no formula of the model uses (they use: lambda, xi)", err.TrimEnd());
        (code, output, err) = Run("spectrum", "--check", "--potential", "lambda*phi^4/4", "--coupling", "1 + xi*phi^2", "--param", "lambda=0.1",
            "--param", "xi=100", "--phi0", "1", "--reheat-T", "1e9");
        Assert.True(code == 0, err);
        Assert.Contains("Jordan frame, metric", output);
        Assert.Contains("T_reh = 1E+09 GeV", output);
    }
}
