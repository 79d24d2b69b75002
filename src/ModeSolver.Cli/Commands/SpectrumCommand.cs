using System.CommandLine;
using ModeSolver.Cli.Output;
using ModeSolver.Decks;
using ModeSolver.Output;
using ModeSolver.Pipeline;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// `modesolver spectrum [DECK] [options]`: the whole pipeline. Prints a summary table (exact against slow roll) and
/// writes summary.json, run.h5, primordial.dat and the plots into the output directory, all or nothing.
/// `--table -` writes only the primordial table to stdout, for a Boltzmann code that calls modesolver.
/// </summary>
public static class SpectrumCommand
{
    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var cmd = new Command("spectrum", "Compute the exact scalar and tensor spectra of a model (from a deck and/or options) and write the results.")
        {
            TreatUnmatchedTokensAsErrors = false,
        };
        var options = RunOptions.Add(cmd);
        var table = RunOptions.Opt("--table", "Write only the primordial table (k, P_s, P_t) to this path; '-' for stdout (nothing else is written).");
        var quiet = new Option<bool>("--quiet") { Description = "No progress on stderr." };
        var threads = RunOptions.Opt("--threads", "Worker threads for the modes (default: all cores).");
        var check = new Option<bool>("--check") { Description = "Only validate the deck and options, print the resolved settings, and stop." };
        cmd.Options.Add(check);
        cmd.Options.Add(table);
        cmd.Options.Add(quiet);
        cmd.Options.Add(threads);
        cmd.SetAction(parse => CommandErrors.Guard(() =>
        {
            var settings = options.Resolve(parse);
            if (parse.GetValue(check)) return Check(settings, Console.Out, Console.Error);
            var run = new SpectrumInvocation(
                TablePath: RunOptions.Value(parse, table),
                Quiet: parse.GetValue(quiet),
                Threads: ParseThreads(RunOptions.Value(parse, threads)));
            return Execute(settings, run, Console.Out, Console.Error);
        }));
        return cmd;
    }

    /// <summary>Command-line choices of one spectrum run that are not physics settings.</summary>
    /// <param name="TablePath">Only the table, to this path or "-" for stdout; null for the full output set.</param>
    /// <param name="Quiet">Suppress progress on stderr.</param>
    /// <param name="Threads">Worker threads (0: all cores).</param>
    public sealed record SpectrumInvocation(string? TablePath = null, bool Quiet = false, int Threads = 0);

    /// <summary>Runs the pipeline on validated settings, prints and writes the results; returns the exit code.</summary>
    public static int Execute(RunSettings settings, SpectrumInvocation run, TextWriter output, TextWriter error)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(error);
        return CommandErrors.WithWarnings(settings.Warnings, error, () => RunAndWrite(settings, run, output, error));
    }

    private static int RunAndWrite(RunSettings settings, SpectrumInvocation run, TextWriter output, TextWriter error)
    {
        bool tableOnly = run.TablePath is not null;
        bool progress = !run.Quiet && !Console.IsErrorRedirected && ReferenceEquals(error, Console.Error);

        var pipelineOptions = new PipelineOptions
        {
            Threads = run.Threads,
            Stage = progress ? stage => error.WriteLine($"modesolver: {stage} ...") : null,
        };
        var files = tableOnly ? [] : OutputFiles(settings);
        if (!tableOnly) OutputTransaction.Precheck(settings.Output.Directory, files.Select(f => f.FileName));
        else if (run.TablePath != "-")
        {
            if (string.IsNullOrWhiteSpace(run.TablePath) || Path.GetFileName(run.TablePath).Length == 0 || Directory.Exists(run.TablePath))
                throw new DeckException($"--table expects a file path or '-' (got '{run.TablePath}', which names a directory)", "--table");
            RunOutputs.PrecheckTable(run.TablePath!);
        }
        var report = SpectrumPipeline.Run(settings, pipelineOptions);

        if (tableOnly)
        {
            if (run.TablePath == "-")
            {
                PrimordialTableWriter.Write(report, output);
                output.Flush();
            }
            else RunOutputs.WriteTable(report, run.TablePath!);
            return 0;
        }

        var written = RunOutputs.WriteAll(report, settings.Output.Directory, files);

        bool plain = !ReferenceEquals(output, Console.Out) || Console.IsOutputRedirected;
        SummaryPrinter.Print(report, output, plain);
        output.WriteLine();
        output.WriteLine(TextSafety.Printable($"Wrote {written.Count} files to {settings.Output.Directory}: {string.Join(", ", written.Select(Path.GetFileName))}"));
        return 0;
    }

    private static List<OutputFile> OutputFiles(RunSettings settings)
    {
        var formats = settings.Output.Formats;
        var files = new List<OutputFile>();
        if (formats.Contains("json")) files.Add(RunOutputs.Json);
        if (formats.Contains("hdf5")) files.Add(RunOutputs.Hdf5);
        if (formats.Contains("table")) files.Add(RunOutputs.Table);
        if (formats.Contains("plots"))
        {
            files.Add(RunOutputs.SpectraPng); files.Add(RunOutputs.SpectraSvg);
            files.Add(RunOutputs.BackgroundPng); files.Add(RunOutputs.BackgroundSvg);
            files.AddRange(RunOutputs.FieldPlots(settings.Model.FieldCount));
            files.AddRange(RunOutputs.ObservablePlots(settings.Observables));
            files.AddRange(RunOutputs.BispectrumFiles(Pipeline.SpectrumPipeline.BispectrumRequestFor(settings)));
        }
        return files;
    }

    /// <summary>
    /// --check: builds the theory (checking it is valid at phi0), prints warnings to <paramref name="error"/> and the
    /// resolved settings to <paramref name="output"/>; runs nothing. Returns 0.
    /// </summary>
    public static int Check(RunSettings settings, TextWriter output, TextWriter error, bool spectrum = true)
    {
        ArgumentNullException.ThrowIfNull(settings);
        if (settings.Model.IsMultiField)
        {
            // The several-field theory was built and checked at the start by the resolver; its valid region is bounded by surfaces.
            var fields = TheoryFactory.BuildFields(settings.Model);
            foreach (string w in settings.Warnings) error.WriteLine("modesolver: warning: " + TextSafety.Printable(w));
            output.WriteLine(TextSafety.Printable(settings.Summary(spectrum)));
            if (fields.Boundaries.Count > 0)
                output.WriteLine("The valid region is bounded by: " + string.Join("; ", fields.Boundaries.Select(b => b.Name)) + ".");
            return 0;
        }
        var theory = TheoryFactory.Build(settings);
        foreach (string w in settings.Warnings) error.WriteLine("modesolver: warning: " + TextSafety.Printable(w));
        output.WriteLine(TextSafety.Printable(settings.Summary(spectrum)));
        var (lo, hi) = theory.ValidRange;
        if (double.IsFinite(lo) || double.IsFinite(hi))
            output.WriteLine(FormattableString.Invariant($"The theory is valid for {Bound(lo)} < phi < {Bound(hi)}."));
        return 0;
    }

    private static string Bound(double x) =>
        double.IsPositiveInfinity(x) ? "inf" : double.IsNegativeInfinity(x) ? "-inf" : x.ToString("G6", System.Globalization.CultureInfo.InvariantCulture);

    /// <summary>Parses --threads.</summary>
    internal static int ParseThreads(string? text)
    {
        if (text is null) return 0;
        if (int.TryParse(text.Trim(), System.Globalization.NumberStyles.Integer, System.Globalization.CultureInfo.InvariantCulture, out int n) && n >= 1 && n <= 4096)
            return n;
        throw new DeckException($"--threads expects a whole number from 1 to 4096 (got '{text}')", "--threads");
    }
}
