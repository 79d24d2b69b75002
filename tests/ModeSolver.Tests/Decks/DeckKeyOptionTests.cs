using System.CommandLine;
using ModeSolver.Cli;
using ModeSolver.Cli.Commands;
using ModeSolver.Decks;

namespace ModeSolver.Tests.Decks;

/// <summary>
/// Every deck key has a command-line option and every run option a deck key, both from the settings schema
/// (<see cref="RunOptions.DeckKeyOptions"/>); each pair is checked to set the same setting of <see cref="RunInput"/>, so
/// an option wired to another setting fails here.
/// </summary>
public class DeckKeyOptionTests
{
    // Options of the run commands that are not deck values (what to do, not what to compute).
    private static readonly string[] CommandOnlyOptions = ["--check", "--table", "--quiet", "--threads", "--help", "-h", "-?", "--debug"];

    private static IEnumerable<string> SchemaKeys() =>
        DeckReader.Schema.SelectMany(s => s.Value.Select(k => s.Key + "." + k)).Prepend("title");

    [Fact]
    public void Every_deck_key_has_an_option_and_every_listed_key_is_a_deck_key()
    {
        var listed = RunOptions.DeckKeyOptions.Select(p => p.DeckKey).ToList();
        Assert.Equal(listed.Count, listed.Distinct().Count());
        Assert.Equal(RunOptions.DeckKeyOptions.Count, RunOptions.DeckKeyOptions.Select(p => p.Option).Distinct().Count());
        foreach (var key in SchemaKeys())
            Assert.True(listed.Contains(key), $"deck key {key} has no command-line option in RunOptions.DeckKeyOptions");
        foreach (var key in listed)
            Assert.True(SchemaKeys().Contains(key), $"RunOptions.DeckKeyOptions names {key}, which is not a deck key");
    }

    [Fact]
    public void Spectrum_and_background_take_every_listed_option_and_no_unlisted_run_option()
    {
        var root = CliApp.BuildRoot();
        var spectrum = root.Subcommands.Single(c => c.Name == "spectrum");
        var background = root.Subcommands.Single(c => c.Name == "background");
        var listed = RunOptions.DeckKeyOptions.Select(p => p.Option).ToHashSet();
        static HashSet<string> Names(Command c) => [.. c.Options.SelectMany(o => o.Aliases.Prepend(o.Name))];
        var sp = Names(spectrum);
        var bg = Names(background);
        foreach (var option in listed)
        {
            Assert.True(sp.Contains(option), $"spectrum lacks {option}");
            if (!RunOptions.SpectrumOnlyOptions.Contains(option)) Assert.True(bg.Contains(option), $"background lacks {option}");
            else Assert.False(bg.Contains(option), $"background should refuse {option}, not list it");
        }
        // Vice versa: an option of spectrum that sets a value must be a deck key too.
        foreach (var o in spectrum.Options)
            Assert.True(listed.Contains(o.Name) || CommandOnlyOptions.Contains(o.Name), $"spectrum option {o.Name} has no deck key in RunOptions.DeckKeyOptions");
    }

    public static TheoryData<string, string> Pairs()
    {
        var data = new TheoryData<string, string>();
        foreach (var (key, option) in RunOptions.DeckKeyOptions) data.Add(key, option);
        return data;
    }

    [Theory]
    [MemberData(nameof(Pairs))]
    public void The_deck_key_and_its_option_set_the_same_field(string deckKey, string option)
    {
        var fromDeck = FieldsSet(DeckInput(deckKey));
        var fromOption = FieldsSet(OptionInput(option));
        Assert.NotEmpty(fromDeck);
        Assert.Equal(fromDeck, fromOption);
    }

    [Fact]
    public void A_deck_with_a_start_in_efolds_solve_for_table_h_and_flags_round_trips_through_the_writer()
    {
        static RunSettings FromText(string text) => SettingsResolver.Resolve(DeckReader.Parse(text, "deck.toml"));
        var s = FromText("""
            [model]
            catalogue = "higgs-like"
            [model.parameters]
            lambda = 0.13
            [start]
            efolds = 68
            [normalisation]
            ln_10_10_a_s = 3.05
            solve_for = "xi"
            [output]
            table_h = 0.7
            [flags]
            sigma_r = 0.01
            reference = "potential"
            """);
        string text = DeckWriter.Write(s);
        var back = FromText(text);
        Assert.Equal(68, back.Initial.StartEfolds);
        Assert.Equal(s.Model with { Parameters = back.Model.Parameters }, back.Model);
        Assert.Equal(s.Initial, back.Initial);
        Assert.Equal(s.Amplitude, back.Amplitude);
        Assert.Equal("xi", back.Amplitude.SolveFor);
        Assert.Equal(0.7, back.Output.TableH);
        Assert.Equal(s.Flags, back.Flags);
        Assert.Equal(0.01, back.Flags.SigmaR);
        Assert.Equal(s.Model.Parameters.OrderBy(p => p.Key), back.Model.Parameters.OrderBy(p => p.Key));
    }

    // The deck holding only deckKey, with the first sample value of a fitting TOML type.
    private static RunInput DeckInput(string deckKey)
    {
        int dot = deckKey.LastIndexOf('.');
        string[] samples = ["3", "1.5", "\"first_order\"", "true", "[\"json\"]", "{ a = 1.5 }"];
        var errors = new List<string>();
        foreach (var value in samples)
        {
            string text = dot < 0 ? $"{deckKey} = {value}\n" : $"[{deckKey[..dot]}]\n{deckKey[(dot + 1)..]} = {value}\n";
            try
            {
                return DeckReader.Parse(text, "probe.toml");
            }
            catch (DeckException e)
            {
                errors.Add(e.Message);
            }
        }
        throw new InvalidOperationException($"no sample value fits deck key {deckKey}: {string.Join(" | ", errors)}");
    }

    // The options of the run commands, only `option` given (a sample value that parses for every kind of option).
    private static RunInput OptionInput(string option)
    {
        var cmd = new Command("probe");
        var o = RunOptions.Add(cmd);
        var opt = cmd.Options.Single(x => x.Name == option);
        string[] args = opt is Option<bool> ? [option] : option == "--param" ? [option, "a=3"] : [option, "3"];
        var parse = cmd.Parse(args);
        Assert.Empty(parse.Errors);
        return o.Overrides(parse);
    }

    // The settings of the schema that hold a value in the input (the parameters by "model.parameters[*]").
    private static SortedSet<string> FieldsSet(RunInput input)
    {
        var set = new SortedSet<string>(StringComparer.Ordinal);
        foreach (var def in SettingsSchema.All)
        {
            if (def.FormOf is not null) continue; // stored under the setting it is a form of
            if (input.GetValue(def) is not null) set.Add(def.Kind == SettingKind.Table ? def.Path + "[*]" : def.Slot);
        }
        return set;
    }
}
