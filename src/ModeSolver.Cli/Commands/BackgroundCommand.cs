using System.CommandLine;
using System.Globalization;
using ModeSolver.Decks;
using ModeSolver.Output;
using ModeSolver.Pipeline;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// `modesolver background [DECK] [options]`: the background, pivot matching and normalisation only. Prints N_total, the
/// end of inflation, N_*, phi_*, H_*, V_*^(1/4), the exact pivot values from one mode, and the slow-roll predictions.
/// Writes no files.
/// </summary>
public static class BackgroundCommand
{
    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var cmd = new Command("background", "Solve the background and the pivot matching only, and print N_total, N_*, phi_*, H_*, V_*^(1/4) and the slow-roll predictions.")
        {
            TreatUnmatchedTokensAsErrors = false,
        };
        var options = RunOptions.Add(cmd, spectrum: false);
        var quiet = new Option<bool>("--quiet") { Description = "No progress on stderr." };
        var check = new Option<bool>("--check") { Description = "Only validate the deck and options, print the resolved settings, and stop." };
        cmd.Options.Add(check);
        cmd.Options.Add(quiet);
        cmd.SetAction(parse => CommandErrors.Guard(() =>
        {
            RefuseSpectrumOptions(parse);
            var settings = options.Resolve(parse);
            if (parse.GetValue(check)) return SpectrumCommand.Check(settings, Console.Out, Console.Error, spectrum: false);
            bool progress = !parse.GetValue(quiet) && !Console.IsErrorRedirected;
            return Execute(settings, Console.Out, Console.Error, progress);
        }));
        return cmd;
    }

    /// <summary>An option only `spectrum` uses (output directory, k range, formats) is an error here, not silently ignored.</summary>
    private static void RefuseSpectrumOptions(ParseResult parse)
    {
        foreach (var token in parse.Tokens)
        {
            string name = token.Value.Split('=', 2)[0];
            if (RunOptions.SpectrumOnlyOptions.Contains(name))
                throw new DeckException($"background computes no spectrum and writes no files: {name} does not apply (use `modesolver spectrum`)", name);
        }
    }

    /// <summary>Runs the background and matching stages and prints the results; returns the exit code.</summary>
    public static int Execute(RunSettings settings, TextWriter output, TextWriter error, bool progress = false)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(error);
        return CommandErrors.WithWarnings(settings.Warnings, error, () => Print(settings, output, error, progress));
    }

    private static int Print(RunSettings settings, TextWriter output, TextWriter error, bool progress)
    {
        if (settings.Model.IsMultiField) return FieldBackgroundPrinter.Print(settings, output, error, progress);
        var options = new PipelineOptions { Stage = progress ? stage => error.WriteLine($"modesolver: {stage} ...") : null };
        var run = SpectrumPipeline.RunPivot(settings, options);
        settings = run.Settings;
        var p = run.Pivot;
        var bg = p.Background;
        var inv = CultureInfo.InvariantCulture;
        void Line(string name, string value) => output.WriteLine(string.Format(inv, "  {0,-26} {1}", name, value));
        output.WriteLine(TextSafety.Printable(settings.Model.Describe()));
        Line("N_total", string.Format(inv, "{0:F4}", p.NTotal));
        Line("end of inflation", bg.EndedAtPhiEnd
            ? string.Format(inv, "phi_end = {0:G8} (set by hand)", settings.Model.PhiEnd)
            : string.Format(inv, "epsilon_1 = 1 at phi = {0:G10} (crossings at N = {1})", bg.At(bg.NEnd).Phi,
                string.Join(", ", bg.EndCrossings.Select(n => (n - bg.NStart).ToString("F4", inv)))));
        Line("k_pivot [1/Mpc]", p.KPivot.ToString("G6", inv));
        Line("N_*", string.Format(inv, "{0:F6}{1}", p.NStar, settings.Pivot.Efolds is null ? string.Format(inv, "  (from reheating: N_reh = {0:F3})", p.NReh) : "  (given)"));
        Line("phi_*", p.PhiStar.ToString("G10", inv));
        Line("H_* [M_pl] / [GeV]", string.Format(inv, "{0:G6} / {1:G6}", p.HStar, p.HStarGeV));
        Line("V_*^(1/4) [GeV]", p.VStarQuarterGeV.ToString("G6", inv));
        if (settings.Initial.StartEfolds is double ne)
            Line("phi0", string.Format(inv, "{0:G10}  (solved: starts {1:G6} e-folds before the end)", settings.Initial.Phi0, ne));
        if (settings.Amplitude.SolveFor is string solved)
            Line(solved, string.Format(inv, "{0:G10}  (solved for A_s; V not rescaled)", settings.Model.Parameters[solved]));
        else
            Line("V scale", string.Format(inv, "{0:G8}  (amplitude from {1}, {2} iterations)", p.VScale, p.AmplitudeName, p.Iterations));
        var normalised = NormalisedParameters.Apply(settings.Model, p.VScale);
        if (!ReferenceEquals(normalised, settings.Model.Parameters))
            Line("parameters (normalised)", string.Join(", ", normalised.OrderBy(kv => kv.Key, StringComparer.Ordinal).Select(kv => string.Format(inv, "{0} = {1:G8}", kv.Key, kv.Value))));
        if (NormalisedParameters.LambdaOverXiSquared(settings.Model, normalised) is double lx)
            Line("lambda/xi^2", lx.ToString("G8", inv));
        var derived = SpectrumPipeline.Derive(settings, p, null, settings.KRange);
        if (double.IsFinite(derived.TRehGeV))
            Line("T_reh [GeV]", string.Format(inv, "{0:G6}  ({1})", derived.TRehGeV, derived.TRehDerived ? "derived" : "given"));
        Line("rho_end^(1/4) [GeV]", derived.RhoEndQuarterGeV.ToString("G6", inv));
        Line("r at 0.002/Mpc", double.IsFinite(derived.R002) ? string.Format(inv, "{0:G6}  (one exact mode)", derived.R002) : derived.R002Source);
        Line("k served [1/Mpc]", string.Format(inv, "[{0:G4}, {1:G4}]", p.KMinMpc, p.KMaxMpc));
        output.WriteLine();
        output.WriteLine(string.Format(inv, "  {0,-22} {1,14} {2,14} {3,14} {4,14} {5,14}", "", "A_s", "n_s", "r", "alpha_s", "n_t"));
        var e = run.Exact;
        output.WriteLine(string.Format(inv, "  {0,-22} {1,14:G7} {2,14:F7} {3,14:G6} {4,14:G5} {5,14:G6}", "exact (one mode)", e.Ps, e.Ns, e.R, e.AlphaS, e.Nt));
        foreach (var sr in new[] { run.SlowRoll.SecondOrder, run.SlowRoll.FirstOrder, run.SlowRoll.Potential })
            output.WriteLine(string.Format(inv, "  {0,-22} {1,14:G7} {2,14:F7} {3,14:G6} {4,14:G5} {5,14:G6}", "slow roll, " + sr.Order, sr.Ps, sr.Ns, sr.R, sr.AlphaS, sr.Nt));
        if (bg.ContinuationStop is string stop) output.WriteLine("  note: " + TextSafety.Printable(stop));
        if (bg.ContinuationNote is string stopped) error.WriteLine("modesolver: warning: " + TextSafety.Printable(stopped));
        return 0;
    }
}
