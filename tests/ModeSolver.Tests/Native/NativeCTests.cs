using System.Globalization;
using System.Text.Json;
using ModeSolver.Tests.Reliability;

namespace ModeSolver.Tests.Native;

/// <summary>
/// libmodesolver.so from C: the programs of tests/native, compiled with gcc against modesolver.h, check the library's
/// values against the command line's summary.json for the demo decks, its codes and messages against the command
/// line's for the bad-input corpus, the external-command coupling (<c>--table -</c>) against the library, and runs
/// on two threads at once. The command line runs in-process here (hence the ConsoleCapture collection).
/// </summary>
[Collection("ConsoleCapture")]
public class NativeCTests
{
    /// <summary>The summary.json keys checked and the library's names for them.</summary>
    private static readonly (string Json, string Library)[] Values =
    [
        ("A_s", "A_s"), ("n_s", "n_s"), ("r", "r"), ("alpha_s", "alpha_s"), ("n_t", "n_t"), ("N_star", "N_star"),
        ("k_pivot", "k_pivot"), ("phi_star", "phi_star"), ("H_star", "H_star"), ("energy_scale_GeV", "energy_scale_gev"),
        ("V_scale", "V_scale"), ("N_total", "N_total"), ("N_reh", "N_reh"), ("max_rel_error", "max_rel_error"),
        ("rhs_evaluations_per_mode", "rhs_per_mode"),
    ];

    [SkippableTheory]
    [InlineData("plateau-demo.toml", "alpha")]
    [InlineData("step-feature.toml", "c")]
    [InlineData("jordan-quartic.toml", "xi")]
    public void ValuesMatchTheCommandLinesSummaryJson(string deck, string parameter)
    {
        Skip.If(NativeBuild.Gcc is null, NativeBuild.NoGcc);
        string exe = NativeBuild.CompileC("check_values");
        string path = Path.Combine(NativeBuild.Repo, "runs", deck);
        string tmp = CliRunner.TempDir("native-values");
        try
        {
            var (code, _, err) = CliRunner.Run("spectrum", path, "--quiet", "--out", tmp);
            Assert.True(code == 0, err);
            using var json = JsonDocument.Parse(File.ReadAllText(Path.Combine(tmp, "summary.json")));
            var root = json.RootElement;
            var args = new List<string> { path };
            foreach (var (key, name) in Values)
                if (root.GetProperty(key).ValueKind == JsonValueKind.Number)
                    args.Add(name + "=" + root.GetProperty(key).GetDouble().ToString("R", CultureInfo.InvariantCulture));
            foreach (var q in root.GetProperty("errors").EnumerateObject())
                if (q.Value.ValueKind == JsonValueKind.Number)
                    args.Add("error." + q.Name + "=" + q.Value.GetDouble().ToString("R", CultureInfo.InvariantCulture));
            Assert.Equal(5, args.Count(a => a.StartsWith("error.", StringComparison.Ordinal)));
            args.Add("tolerance_met=" + (root.GetProperty("tolerance_met").GetBoolean() ? "1" : "0"));
            args.Add("samples=" + root.GetProperty("statistics").GetProperty("modes").GetInt32().ToString(CultureInfo.InvariantCulture));
            args.Add("flags=" + root.GetProperty("flags").GetArrayLength().ToString(CultureInfo.InvariantCulture));
            double deckValue = root.GetProperty("model").GetProperty("parameters").GetProperty(parameter).GetDouble();
            args.Add($"model.parameters.{parameter}=" + deckValue.ToString("R", CultureInfo.InvariantCulture));
            var (c, o, e) = NativeBuild.Execute(exe, args);
            Assert.True(c == 0, $"check_values {deck}:\n{o}\n{e}");
            Assert.Contains("check_values: all agree", o);
        }
        finally
        {
            if (Directory.Exists(tmp)) Directory.Delete(tmp, recursive: true);
        }
    }

    [SkippableFact]
    public void BadDecksGiveTheCommandLinesCodesAndMessages()
    {
        Skip.If(NativeBuild.Gcc is null, NativeBuild.NoGcc);
        string exe = NativeBuild.CompileC("check_errors");
        string corpus = Path.Combine(BadInputTests.CorpusDirectory(), "decks");
        // output-dir-is-file fails on where the command line writes; the library writes no files.
        // sweep-*.toml are sweep decks, read by `modesolver sweep`, not single runs.
        var decks = Directory.EnumerateFiles(corpus, "*.toml").Where(d => Path.GetFileName(d) != "output-dir-is-file.toml"
                                                                          && !Path.GetFileName(d).StartsWith("sweep-", StringComparison.Ordinal))
            .Order(StringComparer.Ordinal).ToList();
        var (code, o, e) = NativeBuild.Execute(exe, decks);
        Assert.True(code == 0, $"check_errors:\n{o}\n{e}");
        var lines = o.Split('\n').Where(l => l.Split('\t').Length == 3).ToDictionary(l => l.Split('\t')[0], l => l);
        Assert.Equal(decks.Count, lines.Count);
        string tmp = CliRunner.TempDir("native-bad");
        try
        {
            foreach (string deck in decks)
            {
                string[] parts = lines[deck].Split('\t');
                string[] header = File.ReadLines(deck).Take(2).ToArray();
                string[] cli = header.Length > 1 && header[1].StartsWith("# args: ", StringComparison.Ordinal)
                    ? header[1]["# args: ".Length..].Replace("{deck}", deck).Replace("{tmp}", tmp).Split(' ', StringSplitOptions.RemoveEmptyEntries)
                    : ["spectrum", deck, "--quiet", "--out", Path.Combine(tmp, "out")];
                var (cliCode, _, cliErr) = CliRunner.Run(cli);
                Assert.True(int.Parse(parts[1], CultureInfo.InvariantCulture) == cliCode, $"{deck}: library code {parts[1]}, command line {cliCode}");
                Assert.Equal(cliErr.TrimEnd('\r', '\n'), "modesolver: " + parts[2]);
            }
        }
        finally
        {
            if (Directory.Exists(tmp)) Directory.Delete(tmp, recursive: true);
        }
        Assert.Contains("check_errors: all passed", o);
    }

    [SkippableFact]
    public void TheTableCommandAgreesWithTheLibrary()
    {
        Skip.If(NativeBuild.Gcc is null, NativeBuild.NoGcc);
        string exe = NativeBuild.CompileC("check_table_command");
        string cli = Path.Combine(AppContext.BaseDirectory, "ModeSolver.Cli");
        Assert.True(File.Exists(cli), $"the command line's executable is not beside the tests: {cli}");
        var (code, o, e) = NativeBuild.Execute(exe, [Path.Combine(NativeBuild.Repo, "runs", "step-feature.toml"), cli]);
        Assert.True(code == 0, $"check_table_command:\n{o}\n{e}");
        Assert.Contains("(all within 1e-8)", o);
    }

    [SkippableFact]
    public void DifferentRunsOnTwoThreadsAreIndependent()
    {
        Skip.If(NativeBuild.Gcc is null, NativeBuild.NoGcc);
        string exe = NativeBuild.CompileC("check_threads");
        var (code, o, e) = NativeBuild.Execute(exe, [Path.Combine(NativeBuild.Repo, "runs", "plateau-demo.toml"), "alpha", "4", "2"]);
        Assert.True(code == 0, $"check_threads:\n{o}\n{e}");
        Assert.Contains("bit-identical to the runs alone", o);
    }
}
