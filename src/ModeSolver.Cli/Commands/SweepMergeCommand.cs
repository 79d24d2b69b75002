using System.CommandLine;
using ModeSolver.Output;
using ModeSolver.Sweeps;

namespace ModeSolver.Cli.Commands;

/// <summary><c>modesolver sweep-merge DIR... --out DIR</c>: merges the shard outputs of one sweep into the files of an unsharded run.</summary>
public static class SweepMergeCommand
{
    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var dirs = new Argument<DirectoryInfo[]>("shards") { Description = "Output directories of the shards I/N (all N of them)", Arity = ArgumentArity.OneOrMore };
        var output = new Option<DirectoryInfo>("--out", "-o") { Description = "Directory for the merged files", Required = true };
        var logR = new Option<bool>("--log-r") { Description = "Plot r on a logarithmic axis" };
        var command = new Command("sweep-merge", "Merge the shard outputs of a sweep (sweep --shard I/N) into one set of files") { dirs, output, logR };
        command.SetAction(parseResult => CommandErrors.Guard(() =>
        {
            try
            {
                var outDir = parseResult.GetValue(output)!.FullName;
                var (spec, summary) = SweepMerge.Merge(parseResult.GetValue(dirs)!.Select(d => d.FullName).ToArray(), outDir);
                string deckCopy = Path.Combine(outDir, SweepFiles.Deck);
                string? subject = PipelineSweepEvaluator.SubjectOfDeckText(File.ReadAllText(deckCopy), deckCopy);
                SweepDensityPlot.Write(outDir, spec, SweepResults.Open(outDir).Records, new SweepPlotOptions { LogR = parseResult.GetValue(logR) || spec.LogR, Subject = subject });
                Console.WriteLine(TextSafety.Printable($"sweep-merge: {summary.Done} points ({summary.Failed} failed) -> {outDir}"));
                return 0;
            }
            catch (Exception e) when (e is ModeSolver.Physics.ModeSolverException or IOException or UnauthorizedAccessException)
            {
                Console.Error.WriteLine("modesolver: " + TextSafety.Printable(e.Message));
                return e is ModeSolver.Physics.ModeSolverException m ? m.ExitCode : CommandErrors.UserError;
            }
        }));
        return command;
    }
}
