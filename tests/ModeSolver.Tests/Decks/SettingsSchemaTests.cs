using System.CommandLine;
using System.Globalization;
using ModeSolver.Cli;
using ModeSolver.Cli.Commands;
using ModeSolver.Decks;
using ModeSolver.Sweeps;

namespace ModeSolver.Tests.Decks;

/// <summary>
/// The settings schema is the one list of settings: these tests enumerate <see cref="SettingsSchema.All"/> and check
/// that every consumer covers every entry (the deck reader, the command line, the sweep keys, the native library's
/// keys, the merge, the outputs' settings list and the docs' key table), so a setting added to the schema that one
/// of them misses fails here.
/// </summary>
public class SettingsSchemaTests
{
    public static TheoryData<string> Paths()
    {
        var data = new TheoryData<string>();
        foreach (var d in SettingsSchema.All) data.Add(d.Path);
        return data;
    }

    [Fact]
    public void Paths_options_and_sweep_keys_are_unique_and_every_entry_is_documented()
    {
        Assert.Equal(SettingsSchema.All.Count, SettingsSchema.All.Select(d => d.Path).Distinct().Count());
        Assert.Equal(SettingsSchema.All.Count, SettingsSchema.All.Select(d => d.Option).Distinct().Count());
        var sweeps = SettingsSchema.All.Where(d => d.Sweep is not null).ToList();
        Assert.Equal(sweeps.Count, sweeps.Select(d => d.Sweep).Distinct().Count());
        Assert.Equal(sweeps.Count, sweeps.Select(d => d.SweepRank).Distinct().Count());
        foreach (var d in SettingsSchema.All)
        {
            Assert.False(string.IsNullOrWhiteSpace(d.Doc), $"{d.Path} has no documentation line");
            Assert.DoesNotContain('\n', d.Doc);
            Assert.StartsWith("--", d.Option);
            foreach (var p in d.ReplacedBy) Assert.NotNull(SettingsSchema.Find(p));
            if (d.FormOf is { } target)
            {
                Assert.NotNull(SettingsSchema.Find(target));
                Assert.NotNull(d.ToTarget);
                Assert.NotNull(d.BothFormsHint);
            }
        }
    }

    [Theory]
    [MemberData(nameof(Paths))]
    public void The_deck_reads_the_setting_into_its_slot_and_lists_it_in_its_section(string path)
    {
        var def = SettingsSchema.Get(path);
        var input = DeckInput(def);
        var stored = def.FormOf is { } target ? SettingsSchema.Get(target) : def;
        Assert.NotNull(input.GetValue(stored));
        Assert.Equal([stored.Kind == SettingKind.Table ? stored.Path + "[*]" : stored.Slot], SlotsSet(input));
        if (def.Section.Length == 0) Assert.Contains(def.Path, SettingsSchema.TopLevelKeys);
        else Assert.Contains(def.Name, DeckReader.Schema[def.Section]);
    }

    [Theory]
    [MemberData(nameof(Paths))]
    public void The_option_sets_the_same_slot_as_the_deck_and_the_commands_take_it(string path)
    {
        var def = SettingsSchema.Get(path);
        var root = CliApp.BuildRoot();
        var spectrum = root.Subcommands.Single(c => c.Name == "spectrum");
        var background = root.Subcommands.Single(c => c.Name == "background");
        Assert.Contains(spectrum.Options, o => o.Name == def.Option);
        Assert.Equal(!def.SpectrumOnly, background.Options.Any(o => o.Name == def.Option));

        var cmd = new Command("probe");
        var options = RunOptions.Add(cmd);
        var option = cmd.Options.Single(o => o.Name == def.Option);
        string[] args = option is Option<bool> ? [def.Option] : [def.Option, CliSample(def)];
        var parse = cmd.Parse(args);
        Assert.Empty(parse.Errors);
        Assert.Equal(SlotsSet(DeckInput(def)), SlotsSet(options.Overrides(parse)));
    }

    [Theory]
    [MemberData(nameof(Paths))]
    public void The_native_keys_take_every_setting_into_the_same_slot_as_the_deck(string path)
    {
        var def = SettingsSchema.Get(path);
        string key = def.Kind == SettingKind.Table ? path + ".NAME" : path;
        Assert.True(RunInputKeys.NumberKeys.Contains(key) || RunInputKeys.TextKeys.Contains(key), $"{key} is not a native key");
        string setKey = def.Kind == SettingKind.Table ? path + ".a" : path;
        var input = RunInputKeys.TakesNumber(def)
            ? RunInputKeys.WithNumber(new RunInput(), setKey, def.Path == "observables.gw_per_decade" || def.Path == "observables.pbh_per_decade" || def.Kind == SettingKind.Whole ? 3 : 0.5)
            : RunInputKeys.WithText(new RunInput(), setKey, TextSample(def));
        Assert.Equal(SlotsSet(DeckInput(def)), SlotsSet(input));
        RunInputKeys.Unset(input, setKey);
        Assert.Empty(SlotsSet(input));
    }

    [Fact]
    public void The_native_number_keys_include_those_an_older_list_lacked()
    {
        // start.efolds, ln_10_10_a_s, table_h and the [flags] thresholds by number; solve_for and the flags' reference by text.
        foreach (var key in new[] { "start.efolds", "normalisation.ln_10_10_a_s", "output.table_h", "flags.sigma_r", "observables.g_star" })
            Assert.Contains(key, RunInputKeys.NumberKeys);
        foreach (var key in new[] { "normalisation.solve_for", "flags.reference", "output.formats", "observables.window" })
            Assert.Contains(key, RunInputKeys.TextKeys);
        var e = Assert.Throws<DeckException>(() => RunInputKeys.WithNumber(new RunInput(), "start.nothing", 1));
        Assert.StartsWith("start.nothing is not a deck key that takes a number here (valid: model.phi_end, model.parameters.NAME, start.phi0", e.Message, StringComparison.Ordinal);
    }

    // A sample value per sweep key, over a base deck (monomial, reheating to 1e9 GeV) where each is valid.
    private static readonly Dictionary<string, (double Value, string ReportKey, string Expected)> SweepSamples = new(StringComparer.Ordinal)
    {
        ["param.NAME"] = (3, "model.parameters.p", "3"),
        ["model"] = (0, "model.catalogue", "starobinsky"),
        ["efolds"] = (55, "pivot.efolds", "55"),
        ["reheat.w"] = (0.25, "reheating.w", "0.25"),
        ["reheat.T"] = (1e10, "reheating.temperature_gev", "10000000000"),
        ["reheat.efolds"] = (5, "reheating.efolds", "5"),
        ["reheat.dof"] = (100, "reheating.dof", "100"),
        ["phi0"] = (16, "start.phi0", "16"),
        ["start.efolds"] = (60, "start.efolds", "60"),
        ["phi_end"] = (1, "model.phi_end", "1"),
        ["k_pivot"] = (0.002, "pivot.k", "0.002"),
        ["amplitude"] = (2.2e-9, "normalisation.a_s", "2.2E-09"),
    };

    [Fact]
    public void Every_sweep_key_is_known_and_a_swept_value_reaches_the_outputs_settings_of_its_setting()
    {
        Assert.Equal(SettingsSchema.SweepKeys, PipelineSweepEvaluator.KnownKeys);
        Assert.Equal(SweepSamples.Keys.Order(StringComparer.Ordinal), SettingsSchema.SweepKeys.Order(StringComparer.Ordinal));
        var deck = DeckReader.Parse("[model]\ncatalogue = \"monomial\"\n[reheating]\ntemperature_gev = 1e9\n", "base.toml");
        foreach (var def in SettingsSchema.All.Where(d => d.Sweep is not null))
        {
            string key = def.Sweep!;
            var (value, reportKey, expected) = SweepSamples[key];
            string axisKey = key == "param.NAME" ? "param.p" : key;
            var axis = key == PipelineSweepEvaluator.ModelKey ? SweepAxis.Named(axisKey, ["starobinsky"]) : SweepAxis.List(axisKey, [value]);
            var spec = new SweepSpec([axis]);
            Assert.True(PipelineSweepEvaluator.IsKnownKey(axisKey), key);
            var settings = new PipelineSweepEvaluator(deck, spec, "base.toml").SettingsFor(spec.GetPoint(0));
            var entries = SettingsSchema.ReportEntries(settings);
            Assert.Contains((reportKey, expected), entries.Select(e => (e.Key, e.Value)));
            Assert.StartsWith(def.Kind == SettingKind.Table ? def.Path + "." : def.Path, reportKey, StringComparison.Ordinal);
        }
    }

    // Settings the outputs do not list on their own, and where the files record them instead.
    private static readonly Dictionary<string, string> RecordedElsewhere = new(StringComparer.Ordinal)
    {
        ["normalisation.ln_10_10_a_s"] = "recorded as normalisation.a_s",
        ["flags.reference"] = "recorded with the flags (ReportSettings.FlagSettings)",
    };

    [Fact]
    public void Every_setting_is_in_the_outputs_settings_list_or_recorded_elsewhere()
    {
        var decks = new[]
        {
            """
            title = "probe"
            [model]
            catalogue = "higgs-like"
            palatini = true
            [start]
            efolds = 68
            [reheating]
            w = 0.1
            temperature_gev = 1e9
            [normalisation]
            solve_for = "xi"
            [output]
            table_h = 0.7
            """,
            """
            [model]
            potential = "V0 * phi^2"
            kinetic = "1"
            phi_end = 1.0
            [model.parameters]
            V0 = 1e-10
            [start]
            phi0 = 17
            dphi0 = -0.1
            [reheating]
            efolds = 5
            w = 0.2
            [bispectrum]
            equilateral = 10
            squeezed_ratio = 0.02
            shape_grid = 5
            flag_threshold = 0.1
            tolerance = 1e-6
            start_depth = 60
            triangles = ["0.05:0.04:0.03"]
            """,
            "[model]\ncatalogue = \"monomial\"\n[pivot]\nefolds = 55\n",
            "[model]\nfields = [\"phi\", \"chi\"]\npotential = \"phi^2 + chi^2\"\nmetric = [[\"1\", \"0\"], [\"0\", \"exp(phi)\"]]\nend = \"chi - 0.1\"\n[start]\nphi0 = [10.0, 1.0]\ndphi0 = [-0.1, 0.0]\n",
            "[model]\ncatalogue = \"double-quadratic\"\n[compare]\nfreeze = [\"chi\"]\n",
        };
        var keys = new HashSet<string>(StringComparer.Ordinal);
        foreach (var text in decks)
            foreach (var e in SettingsSchema.ReportEntries(SettingsResolver.Resolve(DeckReader.Parse(text, "probe.toml")))) keys.Add(e.Key);
        foreach (var def in SettingsSchema.All)
        {
            if (def.Family == SettingFamily.Flag || RecordedElsewhere.ContainsKey(def.Path))
            {
                Assert.False(SettingsSchema.IsReported(def), $"{def.Path} is listed as recorded elsewhere but has a report");
                continue;
            }
            Assert.True(SettingsSchema.IsReported(def), $"{def.Path} is not in the outputs' settings list");
            Assert.True(def.Kind == SettingKind.Table ? keys.Any(k => k.StartsWith(def.Path + ".", StringComparison.Ordinal)) : keys.Contains(def.Path),
                $"{def.Path} did not appear in the settings list of any probe run");
        }
    }

    [Fact]
    public void The_outputs_settings_list_keeps_its_order_and_number_kinds()
    {
        var s = SettingsResolver.Resolve(DeckReader.Parse("title = \"t\"\n[model]\ncatalogue = \"t-model\"\n[reheating]\ntemperature_gev = 1e9\n", "order.toml"));
        var entries = SettingsSchema.ReportEntries(s);
        string[] head =
        [
            "title", "deck", "model.catalogue", "model.potential", "model.parameters.V0", "model.parameters.alpha", "start.phi0", "start.efolds",
            "start.dphi0", "pivot.k", "reheating.kind", "reheating.w", "reheating.temperature_gev", "reheating.dof", "normalisation.a_s",
            "modes.k_min", "modes.k_max", "modes.count", "modes.tolerance", "output.dir", "output.formats", "observables.distance",
        ];
        Assert.Equal(head, entries.Take(head.Length).Select(e => e.Key));
        Assert.Equal(ObservablesKeys.Names.Select(k => "observables." + k), entries.Skip(head.Length - 1).Select(e => e.Key));
        var byKey = entries.ToDictionary(e => e.Key);
        Assert.False(byKey["start.dphi0"].IsNumber); // "attractor"
        Assert.True(byKey["reheating.temperature_gev"].IsNumber);
        Assert.False(byKey["model.potential"].IsNumber);
        Assert.Equal("temperature", byKey["reheating.kind"].Value);
    }

    [Fact]
    public void The_docs_key_table_is_the_schemas()
    {
        string path = Path.Combine(RepoRoot(), "docs", "models-and-decks.md");
        string text = File.ReadAllText(path).ReplaceLineEndings("\n");
        const string Begin = "<!-- settings-table: generated from SettingsSchema.MarkdownTable(); run the tests with MODESOLVER_WRITE_DOCS=1 to rewrite -->\n";
        const string End = "<!-- settings-table end -->";
        int a = text.IndexOf(Begin, StringComparison.Ordinal);
        int b = text.IndexOf(End, StringComparison.Ordinal);
        Assert.True(a >= 0 && b > a, "docs/models-and-decks.md lacks the settings-table markers");
        string table = SettingsSchema.MarkdownTable();
        string current = text[(a + Begin.Length)..b];
        if (current != table && Environment.GetEnvironmentVariable("MODESOLVER_WRITE_DOCS") == "1")
        {
            File.WriteAllText(path, text[..(a + Begin.Length)] + table + text[b..]);
            current = table;
        }
        Assert.Equal(table, current);
    }

    [Fact]
    public void The_sweep_docs_list_every_sweep_key()
    {
        string text = File.ReadAllText(Path.Combine(RepoRoot(), "docs", "sweeps.md"));
        foreach (var key in SettingsSchema.SweepKeys) Assert.Contains($"| `{key}` |", text, StringComparison.Ordinal);
        Assert.Contains($"(valid: {string.Join(", ", SettingsSchema.SweepKeys)})", text, StringComparison.Ordinal);
    }

    [Fact]
    public void A_validated_number_falls_back_to_its_default_and_names_the_key_when_out_of_range()
    {
        var tol = SettingsSchema.Get("modes.tolerance");
        Assert.Equal(1e-6, SettingsSchema.Checked(tol, null));
        Assert.Equal(1e-5, SettingsSchema.Checked(tol, new Located<double>(1e-5, "--tolerance")));
        var e = Assert.Throws<DeckException>(() => SettingsSchema.Checked(tol, new Located<double>(0.5, "modes.tolerance", "d.toml", 7)));
        Assert.Equal("d.toml:7: modes.tolerance must lie in (0, 0.1), at least 1E-12 (the double-precision limit of the modes), e.g. 1e-5 (got 0.5)", e.Message);
        Assert.Null(SettingsSchema.Checked(SettingsSchema.Get("output.table_h"), null));
    }

    public static TheoryData<string> CheckedNumbers()
    {
        var data = new TheoryData<string>();
        foreach (var d in SettingsSchema.All)
            if (SettingValues.HoldsNumber(d) && d.Check is not null) data.Add(d.Path);
        return data;
    }

    [Theory]
    [MemberData(nameof(CheckedNumbers))]
    public void A_deck_value_the_schemas_validator_refuses_stops_the_resolver_with_that_message(string path)
    {
        var def = SettingsSchema.Get(path);
        // The first candidate the validator refuses (TOML spellings).
        var candidates = def.Kind == SettingKind.Whole
            ? new (string Toml, double Value)[] { ("0", 0), ("-1", -1), ("2000000000", 2e9) }
            : [("nan", double.NaN), ("0.0", 0), ("-1.0", -1), ("1e300", 1e300)];
        var (toml, value) = candidates.First(c => def.Check!(c.Value) is not null);
        string problem = def.Check!(value)!;
        string deck = def.Section == "model"
            ? $"[model]\ncatalogue = \"monomial\"\n{def.Name} = {toml}\n"
            : $"[model]\ncatalogue = \"monomial\"\n[{def.Section}]\n{def.Name} = {toml}\n";
        var e = Assert.Throws<DeckException>(() => SettingsResolver.Resolve(DeckReader.Parse(deck, "bad.toml")));
        Assert.Equal($"bad.toml:{(def.Section == "model" ? 3 : 4)}: {def.Path} {problem}", e.Message);
    }

    [Fact]
    public void The_resolved_settings_hold_every_checked_number_with_its_default()
    {
        var s = SettingsResolver.Resolve(DeckReader.Parse("[model]\ncatalogue = \"monomial\"\n", "d.toml"));
        foreach (var d in SettingsSchema.All.Where(SettingValues.HoldsNumber))
            Assert.Equal(d.DefaultValue, s.Values.Number(d.Path));
        Assert.Equal(s.Pivot.KPivot, s.Values.Number("pivot.k"));
        Assert.Equal(s.KRange.Count, s.Values.Number("modes.count"));
        Assert.Equal(s.Pivot.Reheating.Dof, s.Values.Number("reheating.dof"));
    }

    // The deck holding only this setting, with a sample value of its kind.
    private static RunInput DeckInput(SettingDef def)
    {
        string value = def.Kind switch
        {
            SettingKind.Number => "0.5",
            SettingKind.Whole => "3",
            SettingKind.Switch => "true",
            SettingKind.NumberOrNone => "2e-9",
            SettingKind.List => "[\"json\"]",
            SettingKind.Table => "{ a = 1.5 }",
            _ => "\"first_order\"",
        };
        string text = def.Section.Length == 0 ? $"{def.Path} = {value}\n" : $"[{def.Section}]\n{def.Name} = {value}\n";
        return DeckReader.Parse(text, "probe.toml");
    }

    private static string CliSample(SettingDef def) => def.Kind switch
    {
        SettingKind.Table => "a=3",
        SettingKind.Switch => "true",
        SettingKind.Text or SettingKind.List => "first",
        _ => "3",
    };

    private static string TextSample(SettingDef def) => def.Kind switch
    {
        SettingKind.Switch => "true",
        SettingKind.NumberOrNone => "none",
        SettingKind.List => "json,table",
        _ => "first_order",
    };

    // The slots of the input that hold a value (the parameters as "model.parameters[*]").
    private static SortedSet<string> SlotsSet(RunInput input)
    {
        var set = new SortedSet<string>(StringComparer.Ordinal);
        foreach (var def in SettingsSchema.All)
        {
            if (def.FormOf is not null) continue;
            if (input.GetValue(def) is not null) set.Add(def.Kind == SettingKind.Table ? def.Path + "[*]" : def.Slot);
        }
        return set;
    }

    private static string RepoRoot()
    {
        for (var d = new DirectoryInfo(AppContext.BaseDirectory); d is not null; d = d.Parent)
            if (File.Exists(Path.Combine(d.FullName, "docs", "models-and-decks.md"))) return d.FullName;
        throw new DirectoryNotFoundException("docs/models-and-decks.md not found above " + AppContext.BaseDirectory);
    }
}
