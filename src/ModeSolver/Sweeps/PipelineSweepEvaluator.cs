using System.Globalization;
using ModeSolver.Decks;
using ModeSolver.Diagnostics;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Output;
using ModeSolver.Physics;
using ModeSolver.Pipeline;
using ModeSolver.Results;

namespace ModeSolver.Sweeps;

/// <summary>
/// The physics evaluator of a sweep: the run deck (the sweep deck without its <c>[sweep]</c> table) is parsed once;
/// each point overrides the deck with its swept values (command-line merge rules of <see cref="RunInput.Merge"/>),
/// resolves the settings and runs the pivot stages (<see cref="SpectrumPipeline.RunPivot"/>), or the whole pipeline
/// (<see cref="SpectrumPipeline.Run"/>) when the sweep asks for spectra. Settings or physics that fail for a point
/// (<see cref="DeckException"/>, <see cref="PhysicsException"/>, ...) are returned as a failed point with the one-line
/// reason. Thread-safe (the parsed deck is only read) and deterministic (each point runs single-threaded).
/// </summary>
public sealed class PipelineSweepEvaluator : ISweepEvaluator
{
    /// <summary>The keys a sweep axis may name (<c>param.NAME</c> stands for any model parameter): the settings of <see cref="SettingsSchema"/> with a sweep key.</summary>
    public static IReadOnlyList<string> KnownKeys => SettingsSchema.SweepKeys;

    /// <summary>The key of the axis over catalogue ids (its values are names: <see cref="SweepAxis.Named"/>).</summary>
    public const string ModelKey = "model";

    private const string ParamPrefix = "param.";
    private readonly RunInput _deck;
    private readonly PipelineOptions _options;
    private readonly string _source;
    private readonly IReadOnlyList<string>? _modelIds;

    /// <summary>Builds the evaluator from an already parsed run deck; validates the swept keys first.</summary>
    /// <param name="deck">The run deck (not modified; must not be modified while the evaluator is in use).</param>
    /// <param name="sweptKeys">The swept keys (<see cref="SweepSpec.Keys"/>).</param>
    /// <param name="source">Deck name used in messages.</param>
    /// <param name="flags">Flag thresholds (default: <see cref="FlagSettings.Default"/>).</param>
    /// <exception cref="SweepException">a key the evaluator does not understand, or a parameter the model does not have.</exception>
    public PipelineSweepEvaluator(RunInput deck, IReadOnlyList<string> sweptKeys, string source = "deck", FlagSettings? flags = null)
        : this(deck, sweptKeys, null, source, flags)
    {
    }

    /// <summary>
    /// Builds the evaluator from an already parsed run deck and the sweep's axes (needed for an axis over catalogue
    /// ids, <see cref="ModelKey"/>, whose names the axis holds); validates the swept keys first.
    /// </summary>
    /// <exception cref="SweepException">an unknown key, a parameter the model does not have, an unknown catalogue id.</exception>
    public PipelineSweepEvaluator(RunInput deck, SweepSpec spec, string source = "deck", FlagSettings? flags = null)
        : this(deck, (spec ?? throw new ArgumentNullException(nameof(spec))).Keys, spec.Axes, source, flags)
    {
    }

    private PipelineSweepEvaluator(RunInput deck, IReadOnlyList<string> sweptKeys, IReadOnlyList<SweepAxis>? axes, string source, FlagSettings? flags)
    {
        ArgumentNullException.ThrowIfNull(deck);
        ArgumentNullException.ThrowIfNull(sweptKeys);
        _deck = deck;
        _source = source;
        _options = new PipelineOptions { Threads = 1, Flags = flags };
        ValidateKeys(sweptKeys, source);
        _modelIds = ModelIds(sweptKeys, axes, source);
        CheckParameters(sweptKeys);
    }

    /// <summary>
    /// The catalogue ids of the <see cref="ModelKey"/> axis (null when the model is not swept). Only that axis holds
    /// names, and each must be a catalogue id; the deck must not also write out a potential.
    /// </summary>
    private IReadOnlyList<string>? ModelIds(IReadOnlyList<string> keys, IReadOnlyList<SweepAxis>? axes, string source)
    {
        IReadOnlyList<string>? ids = null;
        for (int i = 0; i < keys.Count; i++)
        {
            var names = axes is not null && i < axes.Count ? axes[i].Labels : null;
            if (keys[i] != ModelKey)
            {
                if (names is not null)
                    throw new SweepException($"{source}: sweep axis '{keys[i]}': 'values' must be numbers (only the axis '{ModelKey}' takes names)");
                continue;
            }
            if (names is null)
                throw new SweepException($"{source}: sweep axis '{ModelKey}': 'values' must be a list of catalogue ids, e.g. [\"t-model\", \"e-model\"]");
            foreach (var id in names)
                if (ModelCatalogue.Find(id) is null)
                    throw new SweepException($"{source}: sweep axis '{ModelKey}': '{id}' is not a catalogue model (see `modesolver models`)");
            if (_deck.Potential is not null)
                throw new SweepException($"{source}: sweep axis '{ModelKey}' sweeps catalogue models, but the deck writes out a potential; remove [model] potential");
            ids = names;
        }
        return ids;
    }

    /// <summary>
    /// Builds the evaluator from a sweep deck's text: parses the <c>[sweep]</c> table for the keys, and the rest as a
    /// run deck (once).
    /// </summary>
    /// <exception cref="SweepException">bad sweep table or unknown swept key.</exception>
    /// <exception cref="DeckException">bad run deck.</exception>
    public static PipelineSweepEvaluator FromDeckText(string deckText, string source)
    {
        var spec = SweepDeck.ParseSpec(deckText, source);
        ValidateKeys(spec.Keys, source);
        var deck = DeckReader.Parse(SweepDeck.BlankSweep(deckText, source), source);
        return new PipelineSweepEvaluator(deck, spec, source);
    }

    /// <summary>Builds the evaluator from the sweep deck at <paramref name="deckPath"/>.</summary>
    public static PipelineSweepEvaluator FromDeck(string deckPath)
    {
        return FromDeckText(SweepDeck.ReadText(deckPath), deckPath);
    }

    /// <summary>
    /// What the sweep is of, for the plot title: the deck's title; else the catalogue model's name (or the swept
    /// catalogue ids); else the written-out potential (shortened).
    /// </summary>
    public string Subject => SubjectOf(_deck, _modelIds);

    /// <summary>The subject (<see cref="Subject"/>) of a sweep deck's text, e.g. the copy kept beside merged shards; null when it cannot be read.</summary>
    public static string? SubjectOfDeckText(string deckText, string source)
    {
        try
        {
            var spec = SweepDeck.ParseSpec(deckText, source);
            var deck = DeckReader.Parse(SweepDeck.BlankSweep(deckText, source), source);
            int m = spec.IndexOf(ModelKey);
            return SubjectOf(deck, m >= 0 ? spec.Axes[m].Labels : null);
        }
        catch (Exception e) when (e is SweepException or DeckException)
        {
            return null;
        }
    }

    private static string SubjectOf(RunInput deck, IReadOnlyList<string>? modelIds)
    {
        if (deck.Title is { } t && !string.IsNullOrWhiteSpace(t.Value)) return t.Value.Trim();
        if (modelIds is not null) return "models " + string.Join(", ", modelIds);
        if (deck.ModelId is { } id) return ModelCatalogue.Find(id.Value.Trim()) is { } e ? $"{e.Name} ({e.Id})" : id.Value.Trim();
        if (deck.Potential is { } v)
        {
            string text = string.Join(' ', v.Value.Split((char[])['\n', '\r', '\t', ' '], StringSplitOptions.RemoveEmptyEntries));
            return "V = " + (text.Length > 60 ? text[..57] + "..." : text);
        }
        return "sweep";
    }

    /// <summary>True when <paramref name="key"/> is a key this evaluator understands.</summary>
    public static bool IsKnownKey(string key) =>
        key.StartsWith(ParamPrefix, StringComparison.Ordinal) ? key.Length > ParamPrefix.Length : key != "param.NAME" && KnownKeys.Contains(key);

    /// <summary>Throws a one-line <see cref="SweepException"/> naming the first unknown key and listing the valid ones.</summary>
    public static void ValidateKeys(IReadOnlyList<string> keys, string source)
    {
        foreach (var key in keys)
            if (!IsKnownKey(key))
                throw new SweepException($"{source}: sweep axis '{key}' is not a key the sweep understands (valid: {string.Join(", ", KnownKeys)})");
    }

    /// <summary>
    /// A swept <c>param.NAME</c> must be a parameter of the deck's model: a catalogue model's parameter, or a name
    /// used by the formulas of a model written out (a name no formula uses would change nothing).
    /// </summary>
    private void CheckParameters(IReadOnlyList<string> keys)
    {
        var names = new List<string>();
        string problem, listed;
        if (_modelIds is not null)
        {
            foreach (var swept in _modelIds)
            {
                var model = ModelCatalogue.Find(swept)!;
                foreach (var key in keys)
                    if (key.StartsWith(ParamPrefix, StringComparison.Ordinal) && !model.Parameters.Any(p => p.Name == key[ParamPrefix.Length..]))
                        throw new SweepException($"{_source}: sweep axis '{key}': model {model.Id} (of the axis '{ModelKey}') has no parameter '{key[ParamPrefix.Length..]}' (its parameters: {string.Join(", ", model.Parameters.Select(p => p.Name))})");
            }
            return;
        }
        if (_deck.ModelId is { } id)
        {
            var entry = ModelCatalogue.Find(id.Value.Trim());
            if (entry is null) return; // the settings check names the unknown model
            problem = $"model {entry.Id} has no parameter";
            listed = "its parameters";
            names.AddRange(entry.Parameters.Select(p => p.Name));
        }
        else if (_deck.Potential is { } potential)
        {
            problem = "the model's formulas use no parameter";
            listed = "they use";
            try
            {
                foreach (var text in new[] { potential.Value, _deck.Kinetic?.Value, _deck.Coupling?.Value })
                    if (text is not null)
                        foreach (var n in Formulas.Formula.ReferencedNames(text))
                            if (!names.Contains(n)) names.Add(n);
            }
            catch (Formulas.FormulaException)
            {
                return; // the settings check reports the formula with its line
            }
        }
        else return;
        foreach (var key in keys)
        {
            if (!key.StartsWith(ParamPrefix, StringComparison.Ordinal)) continue;
            string name = key[ParamPrefix.Length..];
            if (names.Contains(name)) continue;
            throw new SweepException($"{_source}: sweep axis '{key}': {problem} '{name}' ({listed}: {(names.Count == 0 ? "none" : string.Join(", ", names))})");
        }
    }

    /// <summary>The resolved settings of a point: the deck overridden by the point's values.</summary>
    /// <exception cref="DeckException">the combination is invalid (one line).</exception>
    public RunSettings SettingsFor(SweepPoint point)
    {
        ArgumentNullException.ThrowIfNull(point);
        var o = new RunInput();
        for (int i = 0; i < point.Keys.Count; i++)
        {
            string key = point.Keys[i];
            double v = point.Values[i];
            var at = new Located<double>(v, SweptValueName(key, v));
            if (key == ModelKey)
            {
                if (_modelIds is null) throw new SweepException($"sweep key '{ModelKey}' needs the axis' catalogue ids");
                o.ModelId = new Located<string>(_modelIds[(int)v], ModelValueName(key, v));
            }
            else if (key.StartsWith(ParamPrefix, StringComparison.Ordinal)) o.Parameters[key[ParamPrefix.Length..]] = at;
            else if (SettingsSchema.FindSweep(key) is { Kind: SettingKind.NumberOrNone } amount) o.SetValue(amount, new Located<double?>(v, at.Key));
            else if (SettingsSchema.FindSweep(key) is { Kind: SettingKind.Number } number) o.SetValue(number, at);
            else if (SettingsSchema.FindSweep(key) is { Kind: SettingKind.Whole } whole)
                o.SetValue(whole, v == Math.Floor(v) && Math.Abs(v) < 1e15 ? new Located<long>((long)v, at.Key) : throw at.Error("must be a whole number"));
            else throw new SweepException($"sweep key '{key}' is not understood");
        }
        return SettingsResolver.Resolve(RunInput.Merge(_deck, o));
    }

    private static string SweptValueName(string key, double v) => $"sweep value {key} = {v.ToString("R", CultureInfo.InvariantCulture)}";

    private string ModelValueName(string key, double v) =>
        key == ModelKey && _modelIds is not null && v >= 0 && v < _modelIds.Count ? $"sweep value {key} = {_modelIds[(int)v]}" : SweptValueName(key, v);

    /// <inheritdoc />
    public SweepRecord Evaluate(SweepPoint point, CancellationToken ct)
    {
        ct.ThrowIfCancellationRequested();
        try
        {
            var settings = SettingsFor(point);
            ct.ThrowIfCancellationRequested();
            if (point.WantSpectrum)
            {
                var report = SpectrumPipeline.Run(settings, _options);
                var p = report.Pivot;
                var iso = report.Isocurvature?.Pivot;
                return new SweepRecord
                {
                    Index = point.Index, Ok = true,
                    Ns = p.Ns, R = p.R, AlphaS = p.AlphaS, Nt = p.Nt, As = p.As, NStar = p.NStar, VScale = p.VScale,
                    BetaIso = iso?.BetaIso ?? double.NaN, CosDelta = iso?.CosDelta ?? double.NaN, Trs = iso?.Trs ?? double.NaN,
                    FNlLocal = report.MultiField?.DeltaN?.FNL ?? double.NaN,
                    Flags = FlagNames(report.Flags),
                    K = [.. report.Spectrum.K], Ps = [.. report.Spectrum.Ps], Pt = [.. report.Spectrum.Pt],
                };
            }
            // A several-field model runs Core's n-field pivot stages; both give the matching numbers, exact values and slow roll.
            Matching.PivotMatch pivot;
            Spectra.PivotValues exact;
            Estimates.SlowRollSet slowRoll;
            Spectra.FieldIsocurvature? isocurvature = null;
            Results.MultiFieldResults? multiField = null;
            var extraFlags = System.Collections.Immutable.ImmutableArray<Diagnostics.Flag>.Empty;
            if (settings.Model.IsMultiField)
            {
                var stage = FieldPipeline.RunPivot(settings, _options);
                (pivot, exact, slowRoll) = (stage.Match, stage.Exact, stage.SlowRoll);
                isocurvature = stage.Isocurvature;
                // delta N (f_NL_local) and the trajectory flags, from the pivot's exit to the end (no spectrum window here).
                var bg = stage.Background!;
                (multiField, extraFlags) = Runs.MultiFieldStage.Compute(bg.Fields, FieldPipeline.BackgroundSettingsFor(settings), bg.Origin,
                    pivot.NPivot, pivot.VScale, pivot.NPivot, exact.Ps, exact.Errors.As, pivot.KPivot);
            }
            else
            {
                var run = SpectrumPipeline.RunPivot(settings, _options);
                (pivot, exact, slowRoll) = (run.Pivot.Numbers, run.Exact, run.SlowRoll);
            }
            var results = new PivotResults(exact.Ns, exact.AlphaS, exact.R, exact.Nt, exact.Ps, pivot.KPivot, pivot.NStar, pivot.PhiStar,
                pivot.HStar, pivot.VStarQuarterGeV, pivot.VScale, pivot.NTotal, pivot.NReh, exact.ErrorEstimate, double.NaN);
            var sr = slowRoll.SecondOrder;
            var flags = Flags.PivotDeviations(results, sr, "second-order slow roll", _options.Flags ?? settings.Flags);
            flags.AddRange(extraFlags);
            return new SweepRecord
            {
                Index = point.Index, Ok = true,
                Ns = exact.Ns, R = exact.R, AlphaS = exact.AlphaS, Nt = exact.Nt, As = exact.Ps, NStar = pivot.NStar, VScale = pivot.VScale,
                BetaIso = isocurvature?.BetaIso ?? double.NaN, CosDelta = isocurvature?.CosDelta ?? double.NaN, Trs = isocurvature?.Trs ?? double.NaN,
                FNlLocal = multiField?.DeltaN?.FNL ?? double.NaN,
                Flags = FlagNames(flags),
            };
        }
        catch (Exception e) when (SweepRunner.IsPointFailure(e))
        {
            // Only physics and input errors make a failed point; anything else (an ArgumentException included) is a
            // bug and stops the sweep with exit code 1 (SweepRunner).
            return SweepRecord.Failure(point.Index, e.Message);
        }
    }

    /// <summary>
    /// Checks, before any point runs, everything that does not depend on the swept values: the settings of the first
    /// and the last point are resolved and their model built; an input error (deck key, range, formula, model) that
    /// both give with the same message is common to the grid and is thrown as a one-line <see cref="SweepException"/>
    /// (which the CLI reports with exit code 2). An error of only one of them (a swept value out of range) is left to
    /// that point, which fails on its own; physics is never judged here.
    /// </summary>
    public void ValidateGrid(SweepSpec spec)
    {
        ArgumentNullException.ThrowIfNull(spec);
        if (spec.PointCount == 0) return;
        string? first = InputError(spec.GetPoint(0));
        if (first is null) return;
        string? last = spec.PointCount == 1 ? first : InputError(spec.GetPoint(spec.PointCount - 1));
        if (last == first) throw new SweepException($"{first} (at the first and the last point of the sweep alike, so no point was run)");
    }

    private string? InputError(SweepPoint point)
    {
        try
        {
            var settings = SettingsFor(point);
            if (settings.Model.IsMultiField) TheoryFactory.BuildFields(settings.Model);
            else TheoryFactory.Build(settings);
            return null;
        }
        catch (Exception e) when (e is DeckException or Formulas.FormulaException or TheoryException)
        {
            // Without the point's own values, so that one error of the whole grid reads the same at both points.
            string message = SweepDeck.OneLine(e.Message);
            for (int i = 0; i < point.Keys.Count; i++)
                message = message.Replace(SweptValueName(point.Keys[i], point.Values[i]), $"sweep value {point.Keys[i]}", StringComparison.Ordinal)
                    .Replace(ModelValueName(point.Keys[i], point.Values[i]), $"sweep value {point.Keys[i]}", StringComparison.Ordinal);
            return message;
        }
    }

    /// <summary>
    /// Short names of flags for the sweep files: <c>n_s-deviation</c> (pivot, exact vs second-order slow roll),
    /// <c>P_s-spectrum-deviation</c>, <c>epsilon_1-phase</c>, <c>epsilon_2-phase</c>, and the n-field kinds as they are (<c>light-entropic-turn</c>, <c>entropic-instability</c>, <c>delta-n-disagreement</c>); each at most once, in order.
    /// </summary>
    public static IReadOnlyList<string> FlagNames(IEnumerable<Flag> flags)
    {
        var names = new List<string>();
        foreach (var f in flags)
        {
            string q = f.Quantity.Replace("|", "", StringComparison.Ordinal);
            string name = f.Kind switch
            {
                FlagKinds.PivotDeviation => q + "-deviation",
                FlagKinds.SpectrumDeviation => q + "-spectrum-deviation",
                FlagKinds.BackgroundPhase => q + "-phase",
                FlagKinds.LightEntropicTurn or FlagKinds.EntropicInstability or FlagKinds.DeltaNDisagreement => f.Kind,
                _ => q + "-" + f.Kind,
            };
            if (!names.Contains(name)) names.Add(name);
        }
        return names;
    }
}
