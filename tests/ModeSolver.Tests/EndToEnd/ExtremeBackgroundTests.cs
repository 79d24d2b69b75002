using System.Globalization;
using System.Text.RegularExpressions;
using ModeSolver.Tests.Decks;

namespace ModeSolver.Tests.EndToEnd;

/// <summary>
/// Backgrounds at the extremes, end to end from the command line: thousands of e-folds before the pivot, pivot matching
/// with N_* given, and models whose continuation after the end of inflation breaks down.
/// </summary>
[Collection("ConsoleCapture")]
public class ExtremeBackgroundTests
{
    /// <summary>One row of the `background` table: A_s, n_s, r, alpha_s, n_t.</summary>
    private static double[] Row(string output, string label)
    {
        var line = output.Split('\n').Single(l => l.TrimStart().StartsWith(label, StringComparison.Ordinal));
        return line[(line.IndexOf(label, StringComparison.Ordinal) + label.Length)..]
            .Split(' ', StringSplitOptions.RemoveEmptyEntries).Select(x => double.Parse(x, CultureInfo.InvariantCulture)).ToArray();
    }

    private static (double[] Exact, double[] SlowRoll2, string Out, string Err) Background(params string[] args)
    {
        var (code, output, err) = CliRunner.Run(["background", .. args, "--quiet"]);
        Assert.True(code == 0, $"exit {code}: {err}");
        Assert.DoesNotContain("Infinity", output);
        Assert.DoesNotContain("NaN", output);
        return (Row(output, "exact (one mode)"), Row(output, "slow roll, hubble-2"), output, err);
    }

    private static double NTotal(string output) =>
        double.Parse(Regex.Match(output, @"N_total\s+([0-9.]+)").Groups[1].Value, CultureInfo.InvariantCulture);

    [Fact]
    public void QuadraticWithThousandsOfEfoldsBeforeThePivot_SameAsShortBackground()
    {
        // V = phi^2 started at phi0 = 20, 63.3 and 126.6 (about 100, 1000 and 4000 e-folds before the end). On the
        // attractor the last 55 e-folds are the same background, so the exact pivot values must agree; before, more than
        // about 700 e-folds overflowed k = aH = e^N H.
        var (shortRun, sr2, _, _) = Background("--model", "monomial", "--phi0", "20", "--efolds", "55");
        foreach (string phi0 in new[] { "63.3", "126.6" })
        {
            var (exact, _, output, _) = Background("--model", "monomial", "--phi0", phi0, "--efolds", "55");
            Assert.True(NTotal(output) > (phi0 == "63.3" ? 990 : 3990), output);
            Assert.Equal(shortRun[1], exact[1], 1e-6);                     // n_s
            Assert.Equal(1.0, exact[2] / shortRun[2], 1e-5);               // r
        }
        // Second-order slow roll (Stewart & Lyth 1993, Phys. Lett. B 302, 171; physics.md 4c) is accurate for the
        // quadratic at N_* = 55 (epsilon_1 ~ 1/(2 N)): n_s within 1e-5, r within 0.1%.
        Assert.True(Math.Abs(shortRun[1] - sr2[1]) < 1e-5, $"n_s {shortRun[1]} vs slow roll {sr2[1]}");
        Assert.True(Math.Abs(shortRun[2] / sr2[2] - 1) < 1e-3, $"r {shortRun[2]} vs slow roll {sr2[2]}");
    }

    [Theory]
    [InlineData("natural", "--phi0", "0.001", 900)]                                       // about 940 e-folds
    [InlineData("t-model", "--phi0", "0.1", 3000, "--param", "alpha=1.6667e-5")]           // about 3035 e-folds
    [InlineData("higgs-like", "--phi0", "-1.1", 850)]                                      // the far side of the Higgs-like potential
    public void LongInflationMatchesSlowRollAtThePivot(string model, string phiOption, string phi0, double minEfolds, params string[] extra)
    {
        // Plateau and hilltop models far from the end: second-order slow roll (Stewart & Lyth 1993; physics.md 4c) holds
        // at the pivot to a few 1e-5 in n_s and 0.1% in r (found: within 2e-5 and 0.01% here).
        var (exact, sr2, output, _) = Background(["--model", model, phiOption, phi0, .. extra]);
        Assert.True(NTotal(output) > minEfolds, output);
        Assert.True(Math.Abs(exact[1] - sr2[1]) < 5e-5, $"n_s {exact[1]} vs slow roll {sr2[1]}");
        Assert.True(Math.Abs(exact[2] / sr2[2] - 1) < 1e-3, $"r {exact[2]} vs slow roll {sr2[2]}");
        Assert.Equal(1.0, exact[0] / 2.099e-9, 1e-5);
    }

    [Fact]
    public void PlateauDemoWithAlphaOneHasAFiniteServedRange()
    {
        // 770 e-folds: before, k = aH overflowed to infinity inside the matcher (an internal error).
        var (exact, sr2, output, _) = Background(DeckTests.RepoFile("runs/plateau-demo.toml"), "--param", "alpha=1");
        Assert.Matches(@"k served \[1/Mpc\]\s+\[[0-9.E+-]+, [0-9.]+E\+1[0-9]\]", output);
        Assert.True(Math.Abs(exact[1] - sr2[1]) < 5e-5, $"n_s {exact[1]} vs slow roll {sr2[1]}");
    }

    [Fact]
    public void PalatiniWithGivenEfoldsIsOneRescaling()
    {
        // Before: 81-100 fixed-point iterations chasing the mode solver's noise for what is one rescaling.
        var (exact, _, output, _) = Background("--model", "higgs-like-palatini", "--param", "xi=1e4", "--efolds", "55");
        Assert.Contains("(amplitude from exact, 1 iterations)", output);
        Assert.Equal(1.0, exact[0] / 2.099e-9, 1e-5);
        var (_, _, byReheating, _) = Background("--model", "higgs-like-palatini");
        int evaluations = int.Parse(Regex.Match(byReheating, @"amplitude from exact, (\d+) iterations").Groups[1].Value, CultureInfo.InvariantCulture);
        Assert.InRange(evaluations, 2, 8);
    }

    [Fact]
    public void ReheatingRootNearTheEarliestComputablePivot()
    {
        // N_* = 66.05 of 73.24 e-folds: the first bracket trial (N_* = 69.4) leaves the pivot mode no room to start
        // inside the horizon, so the bracket must back off towards the estimate instead of giving up. The value is the
        // one the former fixed-point iteration found for this point of runs/tmodel-reheat-sweep.toml (within its 1e-6 tolerance).
        var (exact, _, output, _) = Background("--model", "t-model", "--param", "alpha=100", "--phi0", "15.9", "--reheat-T", "1e4", "--reheat-w", "1", "--amplitude", "2.1e-9");
        double nStar = double.Parse(Regex.Match(output, @"N_\*\s+([0-9.]+)").Groups[1].Value, CultureInfo.InvariantCulture);
        Assert.Equal(66.053570, nStar, 1e-5);
        Assert.Equal(0.9696209, exact[1], 1e-6);
    }

    [Fact]
    public void PalatiniAtRealisticCouplingsScalesAsSlowRollSays()
    {
        // Palatini Higgs-like inflation is V = lambda/(4 xi^2) tanh^4(sqrt(xi) chi) in the canonical field; at fixed
        // N_* slow roll (physics.md 4c) gives n_s independent of xi and r = 2/(xi N_*^2) up to O(1/(xi phi^2)) (worked out
        // here from epsilon_V = 32 xi / sinh^2(2 sqrt(xi) chi) and N = sinh^2(sqrt(xi) chi)/(8 xi)). Before, xi >= 1e7
        // exhausted the step budget: the plateau's slope is below double precision's resolution of V.
        var (reference, _, _, _) = Background("--model", "higgs-like-palatini", "--param", "xi=1e6", "--efolds", "55", "--phi0", "25");
        foreach (string xi in new[] { "1e9", "1e12" })
        {
            var (exact, _, output, err) = Background("--model", "higgs-like-palatini", "--param", "xi=" + xi, "--efolds", "55", "--phi0", "25");
            double ratio = double.Parse(xi, CultureInfo.InvariantCulture) / 1e6;
            Assert.Equal(reference[1], exact[1], 2e-6);                       // n_s
            Assert.Equal(1.0, exact[2] * ratio / reference[2], 1e-4);         // r xi
            // Oscillations at omega/H ~ sqrt(xi) about a smooth minimum: the continuation stops after a set number of
            // them, with a note and no warning.
            Assert.DoesNotContain("warning:", err);
            Assert.Contains("note: the continuation after the end of inflation stopped after 20 oscillations about the minimum", output);
        }
        // The catalogue's default start (75 e-folds before the end, found by slow roll) works there too.
        var (byDefault, _, _, _) = Background("--model", "higgs-like-palatini", "--param", "xi=1e12");
        Assert.Equal(1.0, byDefault[0] / 2.099e-9, 1e-5);
    }

    [Theory]
    [InlineData("V < 0 there", "--model", "monomial", "--param", "p=1", "--phi0", "16")]
    [InlineData("the model is not finite there", "--model", "monomial", "--param", "p=0.6666667")]
    [InlineData("the model is not finite there", "--model", "monomial", "--param", "p=1.5")]
    [InlineData("the potential is singular or not smooth there", "--potential", "V0*abs(phi)^(2/3)", "--param", "V0=1e-10", "--phi0", "10")]
    [InlineData("the potential is singular or not smooth there", "--potential", "sqrt(abs(phi))", "--phi0", "10")]
    [InlineData("V < 0 there", "--potential", "V0*(1-(phi/mu)^4)", "--param", "V0=1e-10", "--param", "mu=1", "--phi0", "0.01")]
    [InlineData("the model is not finite there", "--potential", "phi^2+1e-3*log(phi)", "--phi0", "16")]
    public void ContinuationFailureAfterTheEndIsOneWarning(string why, params string[] args)
    {
        // Textbook models whose minimum is singular or non-smooth, or where V < 0 or NaN lies past the end: inflation and
        // the pivot are fine, only the continuation stops (before: exit 3 for the whole run).
        var (exact, sr2, _, err) = Background(args);
        var warnings = err.Split('\n').Where(l => l.Contains("warning:", StringComparison.Ordinal)).ToArray();
        Assert.Single(warnings);
        Assert.Contains("the continuation after the end of inflation stopped", warnings[0]);
        Assert.Contains(why, warnings[0]);
        Assert.Contains("the background is recorded up to N = ", warnings[0]);
        // The pivot is far from the trouble: second-order slow roll (physics.md 4c) holds there.
        Assert.True(Math.Abs(exact[1] - sr2[1]) < 1e-4, $"n_s {exact[1]} vs slow roll {sr2[1]}");
    }

    [Fact]
    public void ContinuationWarningReachesTheSummary()
    {
        string dir = CliRunner.TempDir("continuation");
        try
        {
            var (code, _, err) = CliRunner.Run("spectrum", "--model", "monomial", "--param", "p=1.5", "--k-count", "6",
                "--k-min", "1e-3", "--k-max", "1", "--formats", "json", "--out", dir, "--quiet");
            Assert.True(code == 0, err);
            string json = File.ReadAllText(Path.Combine(dir, "summary.json"));
            Assert.Contains("the continuation after the end of inflation stopped", json);
        }
        finally
        {
            if (Directory.Exists(dir)) Directory.Delete(dir, true);
        }
    }
}
