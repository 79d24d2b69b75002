using System.CommandLine;
using System.Runtime.InteropServices;
using ModeSolver.Cluster;
using ModeSolver.Output;
using ModeSolver.Physics;
using ModeSolver.Sweeps;
using Spectre.Console;

namespace ModeSolver.Cli.Commands;

/// <summary><c>modesolver sweep DECK</c>: runs a parameter sweep over every core (and over MPI ranks under mpirun), resumable.</summary>
public static class SweepCommand
{
    /// <summary>Exit code when the run was interrupted (common practice for SIGINT).</summary>
    public const int InterruptedExitCode = 130;

    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var deck = new Argument<FileInfo>("deck") { Description = "TOML deck: the run deck plus a [sweep] table" };
        var output = new Option<DirectoryInfo?>("--out", "-o") { Description = "Output directory (default: <deck name>-sweep beside the deck)" };
        var threads = new Option<int?>("--threads", "-j") { Description = "Worker threads per process (default: every core, shared between the MPI ranks of a node)" };
        var shard = new Option<string?>("--shard") { Description = "Run only the points with index % N == I (I/N), e.g. 0/4; merge with sweep-merge" };
        var restart = new Option<bool>("--restart") { Description = "Discard the journal in the output directory and start over" };
        var quiet = new Option<bool>("--quiet", "-q") { Description = "No progress bar" };
        var logR = new Option<bool>("--log-r") { Description = "Plot r on a logarithmic axis" };
        var maxPoints = new Option<long>("--max-points")
        {
            Description = $"Refuse a grid of more points than this (default {SweepSpec.DefaultMaxPoints})",
            DefaultValueFactory = _ => SweepSpec.DefaultMaxPoints,
        };
        var command = new Command("sweep", "Sweep settings over a grid and map the predictions in the (n_s, r) plane (resumable; MPI-aware)")
        {
            deck, output, threads, shard, restart, quiet, logR, maxPoints,
        };
        command.SetAction((parseResult, ct) => Task.FromResult(CommandErrors.Guard(() => Run(
            parseResult.GetValue(deck)!, parseResult.GetValue(output), parseResult.GetValue(threads), parseResult.GetValue(shard),
            parseResult.GetValue(restart), parseResult.GetValue(quiet), parseResult.GetValue(logR), parseResult.GetValue(maxPoints), ct))));
        return command;
    }

    /// <summary>
    /// Builds the physics evaluator for a deck: the run deck (without <c>[sweep]</c>) parsed once, the swept keys
    /// checked (an unknown key is a one-line error listing the valid ones) before any point runs.
    /// </summary>
    public static PipelineSweepEvaluator CreateEvaluator(string deckText, string source) => PipelineSweepEvaluator.FromDeckText(deckText, source);

    private static int Run(FileInfo deckFile, DirectoryInfo? outDir, int? threads, string? shardText, bool restart, bool quiet, bool logR,
        long maxPoints, CancellationToken ct)
    {
        IMessagePassing? comm = null;
        // Ctrl+C (SIGINT) or SIGTERM: stop handing out points, keep the finished ones, write the final snapshot, exit
        // 130. A second signal ends the process at once.
        using var interrupted = CancellationTokenSource.CreateLinkedTokenSource(ct);
        int signals = 0;
        void OnSignal(PosixSignalContext context)
        {
            context.Cancel = Interlocked.Increment(ref signals) == 1;
            interrupted.Cancel();
        }
        using var sigint = PosixSignalRegistration.Create(PosixSignal.SIGINT, OnSignal);
        using var sigterm = PosixSignalRegistration.Create(PosixSignal.SIGTERM, OnSignal);
        ct = interrupted.Token;
        try
        {
            comm = MessagePassing.Create();
            if (!deckFile.Exists) throw new SweepException($"{deckFile.FullName}: deck not found");
            if (threads is < 1) throw new SweepException($"--threads: must be at least 1, got {threads}");
            var shard = shardText is null ? ShardSpec.All : ShardSpec.Parse(shardText);
            string deckText = SweepDeck.ReadText(deckFile.FullName);
            if (maxPoints < 1) throw new SweepException($"--max-points: must be at least 1, got {maxPoints}");
            var spec = SweepDeck.ParseSpec(deckText, deckFile.FullName);
            spec.CheckPointCount(maxPoints, deckFile.FullName);
            string dir = outDir?.FullName ?? Path.Combine(deckFile.DirectoryName ?? ".", Path.GetFileNameWithoutExtension(deckFile.Name) + "-sweep");
            var evaluator = CreateEvaluator(deckText, deckFile.FullName); // the text read once, within the deck limits
            evaluator.ValidateGrid(spec);
            // No progress bar (and so no terminal control codes) under mpirun, whose ranks may sit on a pseudo-terminal.
            bool showProgress = comm.Rank == 0 && !quiet && !Console.IsErrorRedirected && !MessagePassing.LaunchedByMpi;
            var options = new Func<Action<SweepProgress>?, SweepRunOptions>(progress => new SweepRunOptions
            {
                OutputDirectory = dir, Threads = threads ?? DefaultThreads(comm), Shard = shard, Restart = restart, Progress = progress,
                AfterOutputs = () => SweepDensityPlot.Write(dir, spec, SweepResults.Open(dir).Records, new SweepPlotOptions { LogR = logR || spec.LogR, Subject = evaluator.Subject }),
            });
            SweepSummary summary;
            if (showProgress)
            {
                var console = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(Console.Error) });
                SweepSummary? result = null;
                console.Progress()
                    .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn(), new SpinnerColumn())
                    .Start(ctx =>
                    {
                        var task = ctx.AddTask("sweep", maxValue: Math.Max(1, spec.PointCount));
                        result = SweepRunner.Run(spec, deckText, evaluator, options(p =>
                        {
                            task.MaxValue = Math.Max(1, p.Total);
                            task.Value = p.Done;
                            task.Description = $"sweep {p.Done}/{p.Total}, {p.Failed} failed, {p.PointsPerSecond:F1}/s";
                        }), comm, ct);
                    });
                summary = result!;
            }
            else
            {
                summary = SweepRunner.Run(spec, deckText, evaluator, options(null), comm, ct);
            }
            if (comm.Rank != 0) return summary.Completed ? 0 : InterruptedExitCode;
            if (!summary.Completed)
            {
                Console.Error.WriteLine(TextSafety.Printable($"sweep interrupted: {summary.Done} of {summary.Total} points done in {dir}; run the same command again to resume"));
                return InterruptedExitCode;
            }
            Console.WriteLine(TextSafety.Printable($"sweep: {summary.Total} points, {summary.Done - summary.Failed} ok, {summary.Failed} failed ({summary.Resumed} from an earlier run) -> {dir}"));
            return 0;
        }
        catch (SweepInternalException e)
        {
            // A bug, not a failed point: the finished points stay in the journal (and the snapshots), exit 1.
            Console.Error.WriteLine($"modesolver: {SweepDeckMessage(e.Message)}; the sweep stopped (run again with --debug for details)");
            if (CliApp.Debug) Console.Error.WriteLine(e.InnerException?.ToString() ?? e.ToString());
            return CommandErrors.InternalError;
        }
        catch (ModeSolverException e)
        {
            Console.Error.WriteLine($"modesolver: {SweepDeckMessage(e.UserMessage)}");
            return e.ExitCode;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            Console.Error.WriteLine($"modesolver: {SweepDeckMessage(e.Message)}");
            return CommandErrors.UserError;
        }
        finally
        {
            comm?.Dispose();
        }
    }

    private static int DefaultThreads(IMessagePassing comm)
    {
        if (comm.Size == 1) return Environment.ProcessorCount;
        int perNode = int.TryParse(Environment.GetEnvironmentVariable("OMPI_COMM_WORLD_LOCAL_SIZE"), out int n) && n > 0 ? n : 1;
        return Math.Max(1, Environment.ProcessorCount / perNode);
    }

    /// <summary>One line with every control character of the deck or path shown as U+XXXX.</summary>
    private static string SweepDeckMessage(string s) => TextSafety.Printable(s);
}
