using System.Globalization;
using System.Text.Json;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>
/// What a new user meets first, from the command line: the start in e-folds before the end, normalising by a
/// parameter, A_s as ln(10^10 A_s), an unused --param, the background command's options, default k range, help.
/// </summary>
[Collection("ConsoleCapture")]
public class FirstHourCliTests
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    private static (int Code, string Out, string Err) Run(params string[] args) => CliRunner.Run(args);

    // The value printed after `name` on a line of the background command's output ("  name   value ...").
    private static string Field(string output, string name)
    {
        var line = output.Split('\n').Single(l => l.TrimStart().StartsWith(name + " ", StringComparison.Ordinal));
        return line.TrimStart()[name.Length..].Trim();
    }

    private static double Number(string output, string name) =>
        double.Parse(Field(output, name).Split(' ', 2)[0], Inv);

    [Fact]
    public void Start_efolds_from_the_option_the_deck_and_the_catalogue_default_give_that_many_efolds()
    {
        var cli = Run("background", "--model", "t-model", "--start-efolds", "70", "--quiet");
        Assert.True(cli.Code == 0, cli.Err);
        Assert.Equal(70.0, Number(cli.Out, "N_total"), 6);
        Assert.Contains("(solved: starts 70 e-folds before the end)", Field(cli.Out, "phi0"));

        string deck = Path.GetTempFileName();
        try
        {
            File.WriteAllText(deck, "[model]\ncatalogue = \"e-model\"\n[start]\nefolds = 62.5\n");
            var fromDeck = Run("background", deck, "--quiet");
            Assert.True(fromDeck.Code == 0, fromDeck.Err);
            Assert.Equal(62.5, Number(fromDeck.Out, "N_total"), 6);
        }
        finally
        {
            File.Delete(deck);
        }

        var byDefault = Run("background", "--model", "starobinsky", "--quiet");
        Assert.True(byDefault.Code == 0, byDefault.Err);
        Assert.Equal(75.0, Number(byDefault.Out, "N_total"), 6);

        var formula = Run("background", "--potential", "0.5*m^2*phi^2", "--param", "m=1e-5", "--start-efolds", "65", "--quiet");
        Assert.True(formula.Code == 0, formula.Err);
        Assert.Equal(65.0, Number(formula.Out, "N_total"), 6);

        var both = Run("background", "--model", "t-model", "--phi0", "6", "--start-efolds", "70");
        Assert.Equal(2, both.Code);
        Assert.Equal("modesolver: --phi0 cannot be combined with --start-efolds: start at a field value or a number of e-folds before the end, not both", both.Err.Trim());
    }

    /// <summary>
    /// Higgs-like inflation normalised by solving for xi at fixed lambda. For xi >> 1 the Einstein-frame potential is
    /// (lambda / (4 xi^2)) (1 - exp(-sqrt(2/3) chi))^2 up to O(1/xi) (Bezrukov &amp; Shaposhnikov 2008, Phys. Lett. B 659,
    /// 703, eq. 6), so the solved lambda/xi^2 must equal the one reached by rescaling lambda at xi = 1000 to O(1/xi).
    /// </summary>
    [Fact]
    public void Normalising_by_xi_prints_the_solved_xi_and_matches_rescaling_in_lambda_over_xi_squared()
    {
        var solved = Run("background", "--model", "higgs-like", "--param", "lambda=0.13", "--normalise-by", "xi", "--quiet");
        Assert.True(solved.Code == 0, solved.Err);
        Assert.EndsWith("(solved for A_s; V not rescaled)", Field(solved.Out, "xi"));
        double xi = Number(solved.Out, "xi");
        Assert.InRange(xi, 1e4, 3e4);
        Assert.Contains(FormattableString.Invariant($"lambda = 0.13, xi = {xi:G6}"), solved.Out.Split('\n')[0]);
        double lx = Number(solved.Out, "lambda/xi^2");
        Assert.Equal(0.13 / (xi * xi), lx, 0.13 / (xi * xi) * 1e-6);

        var rescaled = Run("background", "--model", "higgs-like", "--quiet");
        Assert.True(rescaled.Code == 0, rescaled.Err);
        double lxRescaled = Number(rescaled.Out, "lambda/xi^2");
        Assert.True(Math.Abs(lx / lxRescaled - 1) < 1e-3, $"{lx} vs {lxRescaled}");
        Assert.Contains("lambda = " + (lxRescaled * 1e6).ToString("G8", Inv), Field(rescaled.Out, "parameters (normalised)"));

        var check = Run("spectrum", "--model", "higgs-like", "--normalise-by", "xi", "--check");
        Assert.Contains("by solving for the parameter xi (V not rescaled)", check.Out);
        var bad = Run("spectrum", "--model", "higgs-like", "--normalise-by", "zeta", "--check");
        Assert.Equal(2, bad.Code);
        Assert.Contains("zeta", bad.Err);
        Assert.Single(bad.Err.Trim().Split('\n'));
    }

    [Fact]
    public void Ln_amplitude_equals_the_amplitude_it_stands_for_from_the_option_and_the_deck()
    {
        string asText = (Math.Exp(3.044) * 1e-10).ToString("R", Inv);
        var ln = Run("background", "--model", "starobinsky", "--ln-amplitude", "3.044", "--quiet");
        var plain = Run("background", "--model", "starobinsky", "--amplitude", asText, "--quiet");
        Assert.True(ln.Code == 0, ln.Err);
        Assert.Equal(plain.Out, ln.Out);
        Assert.Equal(2.0989e-9, double.Parse(ln.Out.Split('\n').Single(l => l.Contains("exact (one mode)")).Split(' ', StringSplitOptions.RemoveEmptyEntries)[3], Inv), 1e-13);

        string deck = Path.GetTempFileName();
        try
        {
            File.WriteAllText(deck, "[model]\ncatalogue = \"starobinsky\"\n[normalisation]\nln_10_10_a_s = 3.044\n");
            var fromDeck = Run("background", deck, "--quiet");
            Assert.Equal(plain.Out, fromDeck.Out);
            File.WriteAllText(deck, "[model]\ncatalogue = \"starobinsky\"\n[normalisation]\na_s = 2e-9\nln_10_10_a_s = 3.044\n");
            var twice = Run("background", deck, "--check");
            Assert.Equal(2, twice.Code);
            Assert.Contains("normalisation.ln_10_10_a_s cannot be combined with normalisation.a_s", twice.Err);
        }
        finally
        {
            File.Delete(deck);
        }
        var clash = Run("spectrum", "--model", "starobinsky", "--ln-amplitude", "3.044", "--amplitude", "2e-9", "--check");
        Assert.Equal(2, clash.Code);
        Assert.Equal("modesolver: --ln-amplitude cannot be combined with --amplitude; give A_s in one form", clash.Err.Trim());
    }

    [Fact]
    public void A_param_no_formula_uses_is_an_error_on_the_command_line_and_a_warning_in_a_deck()
    {
        var cli = Run("spectrum", "--model", "t-model", "--param", "beta=1", "--check");
        Assert.Equal(2, cli.Code);
        Assert.Equal("modesolver: --param beta names a parameter no formula of the model uses (they use: V0, alpha)", cli.Err.Trim());
        var formula = Run("background", "--potential", "V0*phi^2", "--param", "V0=1", "--param", "m=2", "--phi0", "16", "--check");
        Assert.Equal(2, formula.Code);
        Assert.Contains("--param m names a parameter no formula of the model uses (they use: V0)", formula.Err);

        string deck = Path.GetTempFileName();
        try
        {
            File.WriteAllText(deck, "[model]\ncatalogue = \"t-model\"\n[model.parameters]\nbeta = 1.0\n");
            var fromDeck = Run("spectrum", deck, "--check");
            Assert.True(fromDeck.Code == 0, fromDeck.Err);
            Assert.Contains("beta is not used by the model's formulas", fromDeck.Err);
        }
        finally
        {
            File.Delete(deck);
        }
    }

    [Fact]
    public void Background_takes_check_and_quiet_and_refuses_the_options_it_would_ignore()
    {
        var check = Run("background", "--model", "t-model", "--phi-end", "1.5", "--reheat-efolds", "3", "--dof", "200", "--check");
        Assert.True(check.Code == 0, check.Err);
        Assert.Contains("Inflation is ended abruptly at phi_end = 1.5.", check.Out);
        Assert.Contains("lasting N_reh = 3 (g_reh = 200)", check.Out);
        Assert.DoesNotContain("Modes:", check.Out);
        Assert.DoesNotContain("Output:", check.Out);

        var quiet = Run("background", "--model", "t-model", "--phi-end", "1.5", "--quiet");
        Assert.True(quiet.Code == 0, quiet.Err);
        Assert.Equal("", quiet.Err);
        Assert.Equal("phi_end = 1.5 (set by hand)", Field(quiet.Out, "end of inflation"));

        string dir = CliRunner.TempDir("bg-out");
        foreach (var (option, value) in new[] { ("--out", dir), ("--k-min", "1e-3"), ("--k-max", "1"), ("--k-count", "5"), ("--formats", "json"), ("--table-h", "0.7") })
        {
            var refused = Run("background", "--model", "t-model", option, value);
            Assert.Equal(2, refused.Code);
            Assert.Equal($"modesolver: background computes no spectrum and writes no files: {option} does not apply (use `modesolver spectrum`)", refused.Err.Trim());
            Assert.Equal("", refused.Out);
        }
        Assert.False(Directory.Exists(dir));
    }

    [Fact]
    public void Every_deck_value_has_an_option_on_spectrum_and_background()
    {
        var check = Run("spectrum", "--model", "t-model", "--title", "probe", "--phi-end", "1.2", "--reheat-w", "0.1", "--reheat-efolds", "4",
            "--dof", "150", "--formats", "json,table", "--table-h", "0.7", "--flag-sigma-n-s", "0.01", "--flag-reference", "first_order", "--check");
        Assert.True(check.Code == 0, check.Err);
        Assert.Contains("ended abruptly at phi_end = 1.2", check.Out);
        Assert.Contains("w = 0.1 lasting N_reh = 4 (g_reh = 150)", check.Out);
        Assert.Contains("(json, table)", check.Out);
    }

    [Fact]
    public void The_default_k_range_starts_at_1e_minus_6_per_Mpc()
    {
        var check = Run("spectrum", "--model", "starobinsky", "--check");
        Assert.True(check.Code == 0, check.Err);
        Assert.Contains("wavenumbers in [1E-06, 10]/Mpc", check.Out);
    }

    [Fact]
    public void Frame_plots_carry_the_model_name()
    {
        string dir = CliRunner.TempDir("frame-title");
        try
        {
            var run = Run("frame", "--model", "higgs-like", "--phi-min", "0", "--phi-max", "0.3", "--points", "40", "--out", dir);
            Assert.True(run.Code == 0, run.Err);
            Assert.Contains("higgs-like: potential against the canonical field", Output.SvgText.Of(File.ReadAllText(Path.Combine(dir, "frame-potential.svg"))));
            Assert.Contains("higgs-like: canonical field chi(phi)", Output.SvgText.Of(File.ReadAllText(Path.Combine(dir, "frame-chi.svg"))));
            var formula = Run("frame", "--potential", "V0*phi^2", "--param", "V0=1", "--phi-min", "0", "--phi-max", "2", "--points", "20", "--out", Path.Combine(dir, "f"));
            Assert.True(formula.Code == 0, formula.Err);
            Assert.Contains("V = V0*phi^2: potential against the canonical field", Output.SvgText.Of(File.ReadAllText(Path.Combine(dir, "f", "frame-potential.svg"))));
        }
        finally
        {
            if (Directory.Exists(dir)) Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void Help_names_modesolver_and_lists_debug()
    {
        var root = Run("--help");
        Assert.Equal(0, root.Code);
        Assert.Contains("modesolver [command] [options]", root.Out);
        Assert.Contains("--debug", root.Out);
        foreach (var command in new[] { "spectrum", "background", "sweep", "frame" })
        {
            var help = Run(command, "--help");
            Assert.Equal(0, help.Code);
            Assert.Contains($"  modesolver {command}", help.Out);
            Assert.Contains("--debug", help.Out);
            Assert.DoesNotContain("ModeSolver.Cli", help.Out);
        }
    }
}
