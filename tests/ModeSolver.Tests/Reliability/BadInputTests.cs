using System.Text.RegularExpressions;
using ModeSolver.Cli;
using Tomlyn;
using Tomlyn.Model;

namespace ModeSolver.Tests.Reliability;

/// <summary>
/// The bad-input corpus (tests/bad-inputs): every broken deck, formula and option set must stop with its expected exit
/// code (2 user error, 3 physics that cannot be computed), exactly one line on stderr starting with "modesolver: " and
/// containing the expected fragment, no stack trace, and no file left behind in the case's scratch directory.
/// Decks carry their expectation in a header line <c># expect: exit=N message="..."</c> and optionally
/// <c># args: ...</c> (default <c>spectrum {deck} --quiet --out {tmp}/out</c>); option sets are the [[case]]
/// entries of options.toml.
/// </summary>
[Collection("ConsoleCapture")]
public class BadInputTests
{
    private const string DefaultDeckArgs = "spectrum {deck} --quiet --out {tmp}/out";

    /// <summary>One corpus case.</summary>
    internal sealed record BadCase(string Name, string[] Args, int Exit, string Message, string? DeckPath);

    private static readonly Lazy<Dictionary<string, BadCase>> All = new(Load);

    /// <summary>The case names, one theory row each (decks/NAME.toml and options/NAME).</summary>
    public static TheoryData<string> CaseNames()
    {
        var data = new TheoryData<string>();
        foreach (string name in All.Value.Keys.Order(StringComparer.Ordinal)) data.Add(name);
        return data;
    }

    [Fact]
    public void CorpusHasAtLeastFortyCasesOfBothCodes()
    {
        var cases = All.Value.Values;
        Assert.True(cases.Count >= 40, $"only {cases.Count} cases");
        Assert.True(cases.Count(c => c.Exit == 3) >= 8, "too few physics (exit 3) cases");
        Assert.True(cases.Count(c => c.Exit == 2) >= 30, "too few user-error (exit 2) cases");
    }

    [Theory]
    [MemberData(nameof(CaseNames))]
    public void FailsWithOneLineAndTheExpectedCode(string name)
    {
        var c = All.Value[name];
        string tmp = Path.Combine(Path.GetTempPath(), "modesolver-bad-" + Guid.NewGuid().ToString("N")[..10]);
        Directory.CreateDirectory(tmp);
        try
        {
            string[] args = c.Args.Select(a => a.Replace("{tmp}", tmp).Replace("{deck}", c.DeckPath ?? "")).ToArray();
            var (code, _, err) = CliRunner.Run(args);
            string[] lines = err.TrimEnd('\r', '\n').Split('\n');
            Assert.True(code == c.Exit, $"exit {code}, expected {c.Exit}; stderr: {err}");
            Assert.True(lines.Length == 1, $"stderr is not one line: {err}");
            Assert.StartsWith("modesolver: ", lines[0]);
            Assert.Contains(c.Message, lines[0]);
            Assert.DoesNotContain("   at ", err);
            Assert.DoesNotContain("internal error", err);
            Assert.Empty(Directory.EnumerateFileSystemEntries(tmp)); // no partial file, no directory left behind
        }
        finally
        {
            Directory.Delete(tmp, recursive: true);
        }
    }

    [Fact]
    public void DebugAddsTheStackTrace()
    {
        var c = All.Value["decks/kinetic-start-too-fast.toml"];
        var (code, _, err) = CliRunner.Run([.. c.Args.Select(a => a.Replace("{deck}", c.DeckPath)), "--debug"]);
        Assert.Equal(3, code);
        Assert.StartsWith("modesolver: epsilon_1 = 4.5 >= 3", err);
        Assert.Contains("PhysicsException", err);
        Assert.Contains("   at ", err);
    }

    private static Dictionary<string, BadCase> Load()
    {
        string root = CorpusDirectory();
        var cases = new Dictionary<string, BadCase>(StringComparer.Ordinal);
        var expect = new Regex("^# expect: exit=(\\d) message=\"((?:[^\"\\\\]|\\\\.)*)\"\\s*$");
        foreach (string path in Directory.EnumerateFiles(Path.Combine(root, "decks"), "*.toml"))
        {
            string[] lines = File.ReadAllLines(path);
            var m = expect.Match(lines.Length > 0 ? lines[0] : "");
            if (!m.Success) throw new InvalidDataException($"{path}: the first line must be # expect: exit=N message=\"...\"");
            string args = lines.Length > 1 && lines[1].StartsWith("# args: ", StringComparison.Ordinal) ? lines[1]["# args: ".Length..] : DefaultDeckArgs;
            string name = "decks/" + Path.GetFileName(path);
            cases.Add(name, new BadCase(name, args.Split(' ', StringSplitOptions.RemoveEmptyEntries), int.Parse(m.Groups[1].Value),
                Regex.Unescape(m.Groups[2].Value), path));
        }
        var table = TomlSerializer.Deserialize<TomlTable>(File.ReadAllText(Path.Combine(root, "options.toml")))!;
        foreach (var item in (System.Collections.IEnumerable)table["case"])
        {
            var t = (TomlTable)item;
            string name = "options/" + (string)t["name"];
            var args = ((System.Collections.IEnumerable)t["args"]).Cast<object>().Select(o => (string)o).ToArray();
            cases.Add(name, new BadCase(name, args, (int)(long)t["exit"], (string)t["message"], null));
        }
        return cases;
    }

    /// <summary>tests/bad-inputs, found upwards from the test assembly.</summary>
    internal static string CorpusDirectory()
    {
        for (var d = new DirectoryInfo(AppContext.BaseDirectory); d is not null; d = d.Parent)
        {
            string candidate = Path.Combine(d.FullName, "tests", "bad-inputs");
            if (Directory.Exists(candidate)) return candidate;
        }
        throw new DirectoryNotFoundException("tests/bad-inputs not found above " + AppContext.BaseDirectory);
    }
}

