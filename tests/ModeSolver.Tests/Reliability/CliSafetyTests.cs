using System.Text.Json;

namespace ModeSolver.Tests.Reliability;

/// <summary>
/// From the command line: control characters of decks never reach the terminal raw, a warning and an error make one
/// line, a legal long --table name works, and the limits of the pivot matching hold exactly where they apply.
/// </summary>
[Collection("ConsoleCapture")]
public class CliSafetyTests
{
    /// <summary>Runs <paramref name="body"/> in a new scratch directory, removed afterwards.</summary>
    private static void InScratch(Action<string> body)
    {
        string dir = CliRunner.TempDir("cli-safety");
        Directory.CreateDirectory(dir);
        try { body(dir); }
        finally { Directory.Delete(dir, true); }
    }

    private static string Deck(string dir, string text)
    {
        string path = Path.Combine(dir, "deck.toml");
        File.WriteAllText(path, text);
        return path;
    }

    private static void NoControlCharacters(string text) =>
        Assert.False(text.Any(c => char.IsControl(c) && c != '\n'), $"raw control character in: {text}");

    [Theory]
    [InlineData("[model]\ncatalogue = \"starobinsky\"\n\"bad\\u001b[2Jkey\" = 3\n", "model.badU+001B[2Jkey is not a key of [model]")]
    [InlineData("[model]\ncatalogue = \"star\\u001b[31m\\u0007\"\n", "names no catalogue model 'starU+001B[31mU+0007'")]
    [InlineData("[model]\npotential = \"phi^2\\u009b\"\n[start]\nphi0 = 17\n", "U+009B")]
    public void Control_characters_of_a_deck_key_or_value_are_escaped_in_the_error(string deck, string expected)
    {
        InScratch(dir =>
        {
            var (code, o, e) = CliRunner.Run("spectrum", Deck(dir, deck), "--check");
            Assert.Equal(2, code);
            Assert.Contains(expected, e);
            Assert.Single(e.TrimEnd('\n').Split('\n'));
            NoControlCharacters(o + e);
        });
    }

    [Fact]
    public void A_title_with_control_characters_reaches_the_files_but_never_the_terminal()
    {
        InScratch(dir =>
        {
            string deck = Deck(dir, "title = \"t\\u001b[31mred\\u0007\"\n[model]\ncatalogue = \"starobinsky\"\n[model.parameters]\nunused = 1\n");
            var check = CliRunner.Run("spectrum", deck, "--check");
            Assert.Equal(0, check.Code);
            NoControlCharacters(check.Out + check.Err);
            string outDir = Path.Combine(dir, "out");
            var run = CliRunner.Run("spectrum", deck, "--k-count", "3", "--k-min", "0.01", "--k-max", "0.1", "--formats", "json", "--out", outDir);
            Assert.True(run.Code == 0, run.Err);
            Assert.Contains("warning: ", run.Err);
            NoControlCharacters(run.Out + run.Err);
            using var json = JsonDocument.Parse(File.ReadAllText(Path.Combine(outDir, "summary.json")));
            Assert.Equal("t\u001b[31mred\u0007", json.RootElement.GetProperty("settings").GetProperty("title").GetString()); // the file keeps the title as given
        });
    }

    [Fact]
    public void Control_characters_of_a_sweep_deck_are_escaped_in_the_error()
    {
        InScratch(dir =>
        {
            string deck = Deck(dir, "[model]\ncatalogue = \"t-model\"\n[pivot]\nefolds = 55\n[sweep]\n[[sweep.axis]]\nkey = \"ef\\u001b[2Jolds\"\nlinear = [46, 64, 3]\n");
            var (code, o, e) = CliRunner.Run("sweep", deck, "--out", Path.Combine(dir, "out"), "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("sweep axis 'efU+001B[2Jolds' is not a key", e);
            NoControlCharacters(o + e);
        });
    }

    [Fact]
    public void A_warning_and_an_error_give_one_line()
    {
        InScratch(dir =>
        {
            string deck = Deck(dir, "[model]\ncatalogue = \"starobinsky\"\n[model.parameters]\nunused = 1\n");
            var (code, o, e) = CliRunner.Run("spectrum", deck, "--reheat-T", "1e100", "--quiet", "--out", Path.Combine(dir, "out"));
            Assert.Equal(3, code);
            Assert.Equal("", o);
            string line = Assert.Single(e.TrimEnd('\n').Split('\n'));
            Assert.StartsWith("modesolver: The reheating temperature T_reh = 1E+100 GeV is above the temperature at the end of inflation (", line);
            Assert.EndsWith("; lower T_reh; warning: " + deck + ":4: model.parameters.unused is not used by the model's formulas", line);
            Assert.Equal(["deck.toml"], Directory.GetFileSystemEntries(dir).Select(Path.GetFileName));
        });
    }

    [Fact]
    public void A_legal_250_character_table_name_is_written()
    {
        InScratch(dir =>
        {
            string name = new string('k', 246) + ".dat";
            Assert.Equal(250, name.Length);
            var (code, _, e) = CliRunner.Run("spectrum", "--model", "starobinsky", "--k-count", "3", "--k-min", "0.01", "--k-max", "0.1", "--table", Path.Combine(dir, name), "--quiet");
            Assert.True(code == 0, e);
            Assert.Equal([name], Directory.GetFileSystemEntries(dir).Select(Path.GetFileName));
            Assert.StartsWith("# primordial power spectra", File.ReadAllText(Path.Combine(dir, name)));
        });
    }

    /// <summary>The one-wavenumber grid the k-range message recommends is a full run: every file, the plots included.</summary>
    [Fact]
    public void One_wavenumber_is_a_full_run_with_every_file()
    {
        InScratch(dir =>
        {
            string outDir = Path.Combine(dir, "out");
            var (code, o, e) = CliRunner.Run("spectrum", "--model", "starobinsky", "--k-count", "1", "--k-min", "0.05", "--k-max", "0.05", "--out", outDir, "--quiet");
            Assert.True(code == 0, e);
            Assert.Contains("Wrote 7 files", o);
            Assert.Equal(["background.png", "background.svg", "primordial.dat", "run.h5", "spectra.png", "spectra.svg", "summary.json"],
                Directory.GetFiles(outDir).Select(Path.GetFileName).Order(StringComparer.Ordinal));
            Assert.Contains("<svg", File.ReadAllText(Path.Combine(outDir, "spectra.svg")));
        });
    }

    /// <summary>The A_s and k_pivot bounds come from reheating: with N_* given, the same values are a result.</summary>
    [Theory]
    [InlineData("--amplitude", "1e-300")]
    [InlineData("--k-pivot", "1e50")]
    public void With_N_star_given_the_reheating_bounds_do_not_apply(string option, string value)
    {
        var refused = CliRunner.Run("background", "--model", "starobinsky", option, value);
        Assert.Equal(2, refused.Code);
        Assert.Contains("N_* from reheating; give N_* with pivot.efolds or --efolds", refused.Err);
        var (code, o, e) = CliRunner.Run("background", "--model", "starobinsky", option, value, "--efolds", "55");
        Assert.True(code == 0, e);
        Assert.Contains("N_*                        55.000000  (given)", o);
    }
}
