using ModeSolver.Diagnostics;
using ModeSolver.Formulas;
using ModeSolver.Models;
using ModeSolver.Physics;

namespace ModeSolver.Decks;

/// <summary>Turns <see cref="RunInput"/> (deck merged with command line) into validated <see cref="RunSettings"/>.</summary>
public static partial class SettingsResolver
{
    /// <summary>Smallest accepted reheating temperature, GeV: the one limit the matching stage also applies (a few MeV for nucleosynthesis, common practice).</summary>
    public const double MinReheatingTemperatureGeV = Matching.ReheatingHistory.MinimumTemperatureGeV;

    /// <summary>Smallest accepted modes tolerance: below it the mode integration reaches double-precision round-off.</summary>
    public const double MinTolerance = 1e-12;

    /// <summary>Reads, merges and resolves: the deck at <paramref name="deckPath"/> (if any) overridden by <paramref name="overrides"/>.</summary>
    public static RunSettings Load(string? deckPath, RunInput? overrides = null)
    {
        var deck = deckPath is null ? new RunInput() : DeckReader.Read(deckPath);
        return Resolve(overrides is null ? deck : RunInput.Merge(deck, overrides));
    }

    /// <summary>Validates and resolves. Throws <see cref="DeckException"/> with a one-line message naming the key.</summary>
    public static RunSettings Resolve(RunInput input)
    {
        ArgumentNullException.ThrowIfNull(input);
        var warnings = new List<string>();
        string where = input.DeckPath ?? "command line";

        // ---- model ----
        ModelEntry? entry = null;
        if (input.ModelId is { } id)
        {
            entry = ModelCatalogue.Find(id.Value.Trim()) ?? throw id.Error($"names no catalogue model '{id.Value}' (catalogue: {string.Join(", ", ModelCatalogue.AllIds)})");
            if (input.Potential is { } p) throw p.Error($"cannot be given together with {id.Key} = {entry.Id}; choose one model source");
            if (input.Fields is { } fl) throw fl.Error($"cannot be given together with {id.Key} = {entry.Id}: the catalogue model names its fields");
            if (input.Metric is { } mt) throw mt.Error($"cannot be given together with {id.Key} = {entry.Id}: the catalogue model gives its metric");
        }
        else if (input.Potential is null)
        {
            throw new DeckException($"{where}: no model: give model.catalogue or model.potential in the deck, or --model or --potential", "model");
        }

        string potential = input.Potential?.Value ?? entry!.Potential;
        string? kinetic = input.Kinetic?.Value ?? entry?.Kinetic;
        string? coupling = input.Coupling?.Value ?? entry?.Coupling;
        bool palatini = input.Palatini?.Value ?? entry?.Palatini ?? false;
        if (input.Palatini is { Value: true } pal && coupling is null)
            throw pal.Error("needs a coupling Omega^2 (model.coupling or --coupling): the Palatini formulation only applies to a Jordan-frame theory");
        CheckText(input.Potential, "is empty");
        CheckText(input.Kinetic, "is empty");
        CheckText(input.Coupling, "is empty");

        var pars = new Dictionary<string, double>(StringComparer.Ordinal);
        if (entry is not null) foreach (var p in entry.Parameters) pars[p.Name] = p.Value;
        foreach (var (name, v) in input.Parameters)
        {
            if (!double.IsFinite(v.Value)) throw v.Error($"must be finite (got {v.Value})");
            pars[name] = v.Value;
        }

        // ---- fields (several-field models) ----
        if (entry?.Expand is { } expand)
        {
            try
            {
                entry = expand(pars);
            }
            catch (TheoryException e)
            {
                if (input.Parameters.TryGetValue(entry.CountParameter ?? "", out var cp)) throw cp.Error($"does not give a model: {e.Message}");
                throw input.ModelId!.Value.Error($"does not give a model: {e.Message}");
            }
            potential = entry.Potential;
        }
        var fields = ResolveFields(input, entry);
        var metric = ResolveMetric(input, entry, fields);
        string? end = input.End?.Value ?? entry?.End;
        CheckText(input.End, "is empty");
        bool multi = fields is { Count: > 1 };
        string variable = fields is { Count: 1 } one ? one[0] : "phi";
        if (!multi && metric is not null)
        {
            // One field: the 1 x 1 metric is the kinetic function.
            if (kinetic is not null) throw input.Metric!.Value.Error($"cannot be combined with {input.Kinetic?.Key ?? "the catalogue's kinetic function"} for one field: K is the 1 x 1 metric");
            kinetic = metric[0][0];
            metric = null;
        }
        if (multi && input.Kinetic is { } kin)
            throw kin.Error($"is the kinetic function of one field; a model of {fields!.Count} fields gives its kinetic matrix as model.metric (K^J_IJ when a coupling is given)");
        if (multi && input.PhiEnd is { } pe1)
            throw pe1.Error($"ends a one-field model; a model of {fields!.Count} fields ends on a surface: model.end = \"a formula in {string.Join(", ", fields)}\" (inflation ends where it crosses zero)");
        if (!multi && input.End is { } e1)
            throw e1.Error("is an end surface of a several-field model; one field ends at model.phi_end (or where epsilon_1 = 1)");

        // Every formula must parse with these parameters; report the key whose formula fails.
        var formulas = new List<(string Text, Located<string>? Source, string Role)>
        {
            (potential, input.Potential, "potential"),
        };
        if (kinetic is not null) formulas.Add((kinetic, input.Kinetic ?? input.Metric, "kinetic"));
        if (coupling is not null) formulas.Add((coupling, input.Coupling, "coupling"));
        if (metric is not null)
            foreach (var row in metric)
                foreach (string entryText in row) formulas.Add((entryText, input.Metric, "metric"));
        if (end is not null) formulas.Add((end, input.End, "end"));
        var referenced = new HashSet<string>(StringComparer.Ordinal);
        if (entry?.CountParameter is string countParameter) referenced.Add(countParameter);
        foreach (var (text, source, role) in formulas)
        {
            try
            {
                if (multi) _ = Formula.Compile(text, fields!, pars);
                else _ = Formula.Parse(text, pars, variable);
                foreach (string nm in Formula.ReferencedNames(text, variable))
                    if (fields is null || !fields.Contains(nm)) referenced.Add(nm);
            }
            catch (FormulaException e)
            {
                string inFields = multi ? $" (fields: {string.Join(", ", fields!)})" : "";
                if (source is { } s) throw s.Error($"is not a valid formula{(role == "metric" ? $" in its entry \"{text}\"" : "")}: {e.Message}{inFields}");
                throw input.ModelId!.Value.Error($"has a {role} formula that does not work with these parameters: {e.Message}");
            }
        }
        foreach (var (name, v) in input.Parameters)
        {
            if (referenced.Contains(name)) continue;
            // On the command line a name no formula uses is a mistake (a typo would silently run with the default).
            if (v.File is null)
                throw v.Error($"names a parameter no formula of the model uses (they use: {(referenced.Count == 0 ? "none" : string.Join(", ", referenced.Order(StringComparer.Ordinal)))})");
            warnings.Add($"{Where(v)}{v.Key} is not used by the model's formulas");
        }

        double? phiEnd = Check("model.phi_end", input.PhiEnd) ?? entry?.PhiEnd;
        var model = new ModelSpec(entry?.Id, potential, kinetic, coupling, palatini, pars, phiEnd) { Fields = fields, Metric = metric, End = end };

        // ---- start ----
        var phi0Values = input.PerFieldValues(SettingsSchema.Get("start.phi0"));
        var dphi0Values = input.PerFieldValues(SettingsSchema.Get("start.dphi0"));
        InitialConditions initial;
        if (multi) initial = ResolveFieldStart(input, entry, fields!, phi0Values, dphi0Values, where);
        else initial = ResolveStart(input, entry, model, OneValue(phi0Values, variable), OneValue(dphi0Values, variable), where);

        // ---- pivot and reheating ----
        double kPivot = Check("pivot.k", input.KPivot)!.Value;
        double? efolds = null;
        if (input.Efolds is { } ef)
        {
            efolds = Check("pivot.efolds", ef);
            var clash = input.ReheatTemperature ?? input.ReheatEfolds ?? input.ReheatW;
            if (clash is { } c) throw c.Error($"cannot be combined with {ef.Key}: N_* is either given or computed from reheating");
        }
        double dof = Check("reheating.dof", input.ReheatDof)!.Value;
        ReheatingSpec reheating;
        if (input.ReheatTemperature is { } t && input.ReheatEfolds is { } n)
            throw n.Error($"cannot be combined with {t.Key}: give the reheating temperature or its duration, not both");
        double w = 0.0;
        if (input.ReheatW is { } ww)
        {
            w = Check("reheating.w", ww)!.Value;
        }
        if (input.ReheatTemperature is { } temp)
        {
            reheating = new ReheatingSpec(ReheatingKind.Temperature, w, Check("reheating.temperature_gev", temp), null, dof);
        }
        else if (input.ReheatEfolds is { } nr)
        {
            reheating = new ReheatingSpec(ReheatingKind.Efolds, w, null, Check("reheating.efolds", nr), dof);
        }
        else
        {
            if (input.ReheatW is { } lone)
                throw lone.Error("needs the end of reheating too: a temperature (reheating.temperature_gev or --reheat-T) or a duration (reheating.efolds)");
            reheating = ReheatingSpec.Instantaneous with { Dof = dof };
        }
        var pivot = new PivotSpec(kPivot, efolds, reheating);

        // ---- amplitude ----
        AmplitudeSpec amplitude = AmplitudeSpec.Default;
        if (input.Amplitude is { } a)
        {
            if (a.Value is double av && !(av > 0 && av < 1)) throw a.Error($"must be a positive number below 1, or \"none\" (got {av})");
            if (a.Value is double tiny && tiny < Matching.PivotLimits.MinScalarAmplitude)
                throw a.Error($"= {tiny:G3} is below {Matching.PivotLimits.MinScalarAmplitude:G1}, outside the double-precision range of the spectra");
            amplitude = new AmplitudeSpec(a.Value);
        }
        CheckReachableFromReheating(input, efolds is null, amplitude.ScalarAmplitude, kPivot, dof);
        if (input.SolveFor is { } sf)
        {
            string name = sf.Value.Trim();
            if (amplitude.ScalarAmplitude is null) throw sf.Error("needs a target A_s (normalisation.a_s is \"none\")");
            if (!referenced.Contains(name) || !pars.ContainsKey(name))
                throw sf.Error($"names '{name}', which is not a parameter of the model's formulas (they use: {(referenced.Count == 0 ? "none" : string.Join(", ", referenced.Order(StringComparer.Ordinal)))})");
            if (!(pars[name] > 0)) throw sf.Error($"needs {name} > 0 as its starting value (got {pars[name]}); the solve keeps the parameter's sign");
            amplitude = amplitude with { SolveFor = name };
        }

        // ---- k range ----
        double kMin = Check("modes.k_min", input.KMin)!.Value;
        double kMax = Check("modes.k_max", input.KMax)!.Value;
        long count = (long)Check("modes.count", input.KCount?.WithKey())!.Value;
        if (kMin > kMax)
        {
            var blame = input.KMin ?? input.KMax!.Value;
            throw blame.Error($"gives k_min = {kMin} above k_max = {kMax}");
        }
        if (count == 1 && kMin != kMax)
            throw (input.KCount!.Value).Error($"= 1 needs k_min = k_max (got {kMin} and {kMax})");
        if (count > 1 && kMin == kMax)
            throw (input.KMin ?? input.KMax ?? input.KCount!.Value.WithKey()).Error($"gives k_min = k_max = {kMin} with {count} wavenumbers");
        double tol = Check("modes.tolerance", input.Tolerance)!.Value;
        var kRange = new KRangeSpec(kMin, kMax, (int)count, tol) { KMinIsDefault = input.KMin is null };

        // ---- output ----
        string dir = OutputSpec.Default.Directory;
        if (input.OutDir is { } od)
        {
            if (string.IsNullOrWhiteSpace(od.Value)) throw od.Error("is empty");
            if (od.Value.IndexOfAny(Path.GetInvalidPathChars()) >= 0) throw od.Error($"is not a valid path (\"{od.Value}\")");
            dir = od.Value;
        }
        IReadOnlyList<string> formats = OutputSpec.Default.Formats;
        if (input.Formats is { } fm)
        {
            var list = new List<string>();
            foreach (string f in fm.Value)
            {
                string norm = f.Trim().ToLowerInvariant();
                if (!OutputSpec.KnownFormats.Contains(norm))
                    throw fm.Error($"has an unknown format '{f}' (valid: {string.Join(", ", OutputSpec.KnownFormats)})");
                if (!list.Contains(norm)) list.Add(norm);
            }
            if (list.Count == 0) throw fm.Error($"is empty (valid: {string.Join(", ", OutputSpec.KnownFormats)})");
            formats = list;
        }
        double? tableH = Check("output.table_h", input.TableH);
        var output = new OutputSpec(dir, formats) { TableH = tableH };

        var settings = new RunSettings(model, initial, pivot, amplitude, kRange, output)
        {
            Title = input.Title?.Value ?? "",
            DeckPath = input.DeckPath,
            Warnings = warnings,
            Flags = FlagSettingsFor(input),
            Observables = ObservablesKeys.Resolve(input.ObservableValues),
            // Every number of the schema checked (the ones above were checked where they are used, so this pass adds
            // no new message for them) and kept for the stage that reads it.
            Values = SettingValues.From(input),
            BispectrumTriangles = input.GetValue(SettingsSchema.Get("bispectrum.triangles")) is Located<IReadOnlyList<string>> tl ? TriangleList.Canonical(tl) : null,
            Freeze = FreezeList(input, model),
        };
        if (multi) CheckFieldTheory(settings, input, entry, phi0Values);
        else CheckTheory(settings, input, entry, OneValue(phi0Values, variable));
        return settings;
    }

    // The one-field start: phi0 (or a start in e-folds before the end), dphi0.
    private static InitialConditions ResolveStart(RunInput input, ModelEntry? entry, ModelSpec model, Located<double>? phi0Given, Located<double>? dphi0Given, string where)
    {
        double phi0;
        double? startEfolds = null;
        if (input.StartEfolds is { } se)
        {
            if (phi0Given is { } both) throw both.Error($"cannot be combined with {se.Key}: start at a field value or a number of e-folds before the end, not both");
            if (dphi0Given is { } dv) throw dv.Error($"cannot be combined with {se.Key}: a start given in e-folds is on the slow-roll attractor");
            startEfolds = Check("start.efolds", se);
            phi0 = StartGuess(model, se, entry);
        }
        else if (phi0Given is { } ph)
        {
            phi0 = Check("start.phi0", ph)!.Value;
        }
        else if (entry?.DefaultStartEfolds is double catalogueStart && dphi0Given is null)
        {
            startEfolds = catalogueStart;
            phi0 = StartGuess(model, new Located<double>(catalogueStart, $"start.efolds (catalogue default for {entry.Id})"), entry);
        }
        else if (entry is not null) phi0 = entry.DefaultPhi0;
        else throw new DeckException($"{where}: start.phi0 or start.efolds (or --phi0 or --start-efolds) is required when the model is given by formulas", "start.phi0");
        return new InitialConditions(phi0, Check("start.dphi0", dphi0Given)) { StartEfolds = startEfolds };
    }

    /// <summary>
    /// With N_* from reheating, an A_s or a k_pivot that no model can reach (<see cref="Matching.PivotLimits"/>) is refused
    /// here instead of failing inside the matching.
    /// </summary>
    private static void CheckReachableFromReheating(RunInput input, bool fromReheating, double? scalarAmplitude, double kPivot, double dof)
    {
        if (!fromReheating || scalarAmplitude is not double target) return;
        double minAs = Matching.PivotLimits.MinScalarAmplitudeFromReheating(dof);
        if (target < minAs)
        {
            var key = input.Amplitude!.Value;
            throw key.Error($"= {target:G3} is below {minAs:G2}, the smallest A_s of any inflation that ends above T_reh = {Matching.ReheatingHistory.MinimumTemperatureGeV} GeV (N_* from reheating; give N_* with pivot.efolds or --efolds to go lower)");
        }
        double maxK = Matching.PivotLimits.MaxPivotFromReheating(target, dof);
        if (kPivot > maxK)
        {
            var key = input.KPivot!.Value;
            throw key.Error($"= {kPivot:G3} 1/Mpc is above {maxK:G2} 1/Mpc, the largest scale that can leave the horizon during inflation with A_s = {target:G4} and T_reh >= {Matching.ReheatingHistory.MinimumTemperatureGeV} GeV (N_* from reheating; give N_* with pivot.efolds or --efolds to go higher)");
        }
    }

    /// <summary>The theory must be valid at phi0 with V &gt; 0 there, and phi_end must lie ahead in the roll direction.</summary>
    private static void CheckTheory(RunSettings settings, RunInput input, ModelEntry? entry, Located<double>? phi0Given)
    {
        var phi0Key = phi0Given ?? new Located<double>(settings.Initial.Phi0, entry is null ? "start.phi0" : $"start.phi0 (catalogue default for {entry.Id})");
        IValidatedTheory theory;
        try
        {
            theory = TheoryFactory.Build(settings.Model);
        }
        catch (FormulaException e)
        {
            throw new DeckException(DeckErrors.OneLine($"model: {e.Message}"), "model");
        }
        if (theory.InvalidReason(settings.Initial.Phi0) is { } reason)
            throw phi0Key.Error($"= {settings.Initial.Phi0:G6} is outside the theory's valid region: {reason} there");
        var v = theory.Potential(settings.Initial.Phi0);
        if (!(v.Value > 0)) throw phi0Key.Error($"= {settings.Initial.Phi0:G6} gives V = {v.Value:G6}; inflation needs V > 0");
        if (v.Value < Matching.PivotLimits.MinPotential)
            throw phi0Key.Error($"= {settings.Initial.Phi0:G6} gives V = {v.Value:G3} (reduced Planck units), below {Matching.PivotLimits.MinPotential:G1}: too close to the double-precision underflow; scale the potential up (the A_s normalisation rescales V anyway)");
        if (settings.Model.PhiEnd is double end)
        {
            double dir = -Math.Sign(v.D1);
            var endKey = input.PhiEnd ?? new Located<double>(end, $"model.phi_end (catalogue default for {entry?.Id})");
            if (dir == 0 && settings.Initial.DPhi0 is double d0) dir = Math.Sign(d0);
            if (dir != 0 && (end - settings.Initial.Phi0) * dir <= 0)
                throw endKey.Error($"= {end:G6} is not ahead of phi0 = {settings.Initial.Phi0:G6} in the roll direction (the field {(dir > 0 ? "increases" : "decreases")})");
        }
    }

    /// <summary>The [flags] table over the defaults; every threshold must be a finite positive number.</summary>
    private static FlagSettings FlagSettingsFor(RunInput input)
    {
        var f = FlagSettings.Default;
        foreach (var (key, v) in input.FlagValues)
        {
            if (SettingsSchema.Find("flags." + key) is { Family: SettingFamily.Flag } def) SettingsSchema.Checked(def, v);
            f = key switch
            {
                "spectrum_threshold" => f with { SpectrumThreshold = v.Value },
                "pivot_fraction" => f with { PivotFraction = v.Value },
                "sigma_n_s" => f with { SigmaNs = v.Value },
                "sigma_r" => f with { SigmaR = v.Value },
                "sigma_alpha_s" => f with { SigmaAlphaS = v.Value },
                "sigma_n_t" => f with { SigmaNt = v.Value },
                "epsilon_1_limit" => f with { Epsilon1Limit = v.Value },
                "epsilon_2_limit" => f with { Epsilon2Limit = v.Value },
                _ => throw v.Error($"is not a flag threshold (valid: {string.Join(", ", DeckReader.FlagKeys)})"),
            };
        }
        if (input.FlagReference is { } r)
        {
            f = f with
            {
                Reference = r.Value.Trim().ToLowerInvariant() switch
                {
                    "first_order" => SlowRollReference.FirstOrder,
                    "second_order" => SlowRollReference.SecondOrder,
                    "potential" => SlowRollReference.Potential,
                    _ => throw r.Error($"must be first_order, second_order or potential (got '{r.Value}')"),
                },
            };
        }
        return f;
    }

    /// <summary>The slow-roll first guess of phi0 for a start <paramref name="efolds"/> before the end (a one-line error when there is none).</summary>
    private static double StartGuess(ModelSpec model, Located<double> efolds, ModelEntry? entry)
    {
        IValidatedTheory theory;
        try
        {
            theory = TheoryFactory.Build(model, entry?.DefaultPhi0 ?? double.NaN);
        }
        catch (FormulaException e)
        {
            throw new DeckException(DeckErrors.OneLine($"model: {e.Message}"), "model");
        }
        double reference = entry?.DefaultPhi0 ?? double.NaN;
        try
        {
            return SlowRollStart.FieldBeforeEnd(theory, efolds.Value, model.PhiEnd, reference);
        }
        catch (PhysicsException e)
        {
            throw efolds.Error($"= {efolds.Value:G6}: {e.Message}");
        }
    }

    private static Located<double> WithKey(this Located<long> v) => new(v.Value, v.Key, v.File, v.Line);

    private static void CheckText(Located<string>? s, string problem)
    {
        if (s is { } v && string.IsNullOrWhiteSpace(v.Value)) throw v.Error(problem);
    }

    // The value (or the schema's default when absent) checked by the setting's validator in the schema.
    private static double? Check(string path, Located<double>? v) => SettingsSchema.Checked(SettingsSchema.Get(path), v);

    private static string Where<T>(Located<T> v) => v.File is null ? "" : v.Line is int l ? $"{v.File}:{l}: " : $"{v.File}: ";
}
