using System.Collections.Concurrent;
using System.Diagnostics;
using ModeSolver.Cluster;

namespace ModeSolver.Sweeps;

/// <summary>Settings of one sweep run.</summary>
public sealed class SweepRunOptions
{
    /// <summary>The output directory (created if needed).</summary>
    public required string OutputDirectory { get; init; }
    /// <summary>Worker threads per process; null means every core.</summary>
    public int? Threads { get; init; }
    /// <summary>Which points this run computes (default: all).</summary>
    public ShardSpec Shard { get; init; } = ShardSpec.All;
    /// <summary>Discard an existing journal and start over.</summary>
    public bool Restart { get; init; }
    /// <summary>How often the CSV and HDF5 snapshots are rewritten while the sweep runs.</summary>
    public TimeSpan SnapshotInterval { get; init; } = TimeSpan.FromSeconds(5);
    /// <summary>Progress callback (called from worker threads, one call at a time, at most every <see cref="ProgressInterval"/>, and once at the end).</summary>
    public Action<SweepProgress>? Progress { get; init; }
    /// <summary>Called on rank 0 after the final CSV and HDF5 files are written, while the directory is still locked (e.g. to draw the plot).</summary>
    public Action? AfterOutputs { get; init; }
    /// <summary>Minimum time between progress calls.</summary>
    public TimeSpan ProgressInterval { get; init; } = TimeSpan.FromMilliseconds(200);
}

/// <summary>Progress of a sweep. Under MPI, rank 0 reports its own share of the points.</summary>
/// <param name="Total">Points this process is responsible for (including those finished before a resume).</param>
/// <param name="Done">Points finished so far (including those read back from the journal).</param>
/// <param name="Failed">Finished points that failed.</param>
/// <param name="DoneThisRun">Points finished by this run.</param>
/// <param name="PointsPerSecond">Rate of this run.</param>
/// <param name="Elapsed">Time since this run started.</param>
/// <param name="Remaining">Estimated time left, null before the first point.</param>
public sealed record SweepProgress(long Total, long Done, long Failed, long DoneThisRun, double PointsPerSecond, TimeSpan Elapsed, TimeSpan? Remaining);

/// <summary>The outcome of a sweep run.</summary>
/// <param name="Total">Points of the sweep (or of the shard).</param>
/// <param name="Done">Points finished (all runs together).</param>
/// <param name="Failed">Finished points that failed.</param>
/// <param name="Resumed">Points found finished in the journal at the start.</param>
/// <param name="Completed">True when every point is finished (false after a cancellation).</param>
/// <param name="OutputDirectory">Where the files are.</param>
public sealed record SweepSummary(long Total, long Done, long Failed, long Resumed, bool Completed, string OutputDirectory);

/// <summary>
/// A programmer error inside a sweep (an exception that is neither physics nor bad input): the sweep stops, the
/// finished points stay in the journal, and the command exits with code 1. The message names the point.
/// </summary>
public sealed class SweepInternalException : Physics.ModeSolverException
{
    /// <summary>Creates the error.</summary>
    public SweepInternalException(string message, Exception? inner = null) : base(message, inner) { }

    /// <inheritdoc/>
    public override int ExitCode => Physics.ExitCodes.Internal;
}

/// <summary>
/// Runs a sweep on every core, streaming finished points to the journal, rewriting the CSV and HDF5 snapshots
/// periodically and at the end (sorted by index, so the final files do not depend on the finishing order), and
/// resuming from the journal. Memory does not grow with the number of points beyond one bit per point: the grid is
/// enumerated on demand, results live in the journal, and the outputs are streamed from an on-disk index of it.
/// Under MPI the points are dealt to the ranks in blocks of <see cref="BlockSize"/> consecutive positions, round robin
/// (no messages while the points run); each rank other than 0 journals to its own file, folded in by rank 0 at the end.
/// </summary>
public static class SweepRunner
{
    /// <summary>Consecutive positions of a shard that go to one MPI rank.</summary>
    public const int BlockSize = 64;

    /// <summary>Runs the sweep in this process.</summary>
    /// <param name="spec">The sweep.</param>
    /// <param name="deckText">The whole deck text (copied to the output directory; its non-sweep part enters the fingerprint).</param>
    /// <param name="evaluator">Computes the points.</param>
    /// <param name="options">Output directory, threads, shard, restart, progress.</param>
    /// <param name="ct">Cancels the run; finished points stay in the journal and a later run resumes.</param>
    public static SweepSummary Run(SweepSpec spec, string deckText, ISweepEvaluator evaluator, SweepRunOptions options, CancellationToken ct = default)
        => Run(spec, deckText, evaluator, options, new SerialMessagePassing(), ct);

    /// <summary>Runs the sweep over the ranks of <paramref name="comm"/> (all ranks call this; rank 0 takes the directory lock and writes the outputs).</summary>
    /// <exception cref="SweepException">bad input: the directory is locked, the journal is damaged or from another deck.</exception>
    /// <exception cref="SweepInternalException">a programmer error at a point (the sweep stopped).</exception>
    public static SweepSummary Run(SweepSpec spec, string deckText, ISweepEvaluator evaluator, SweepRunOptions options, IMessagePassing comm, CancellationToken ct = default)
    {
        string dir = options.OutputDirectory;
        string fingerprint = SweepJournal.Fingerprint(spec, SweepDeck.RemoveSweep(deckText));
        var header = new SweepJournalHeader(fingerprint, spec.PointCount, options.Shard);
        long total = ShardCount(spec.PointCount, options.Shard);
        SweepLock? dirLock = null;
        SweepJournal? journal = null;
        SweepIndex? index = null;
        try
        {
            long resumed = 0;
            string error = "";
            if (comm.Rank == 0)
            {
                try
                {
                    Directory.CreateDirectory(dir);
                    dirLock = SweepLock.Acquire(dir);
                    SweepOutputs.RemoveLeftovers(dir);
                    if (options.Restart) DeleteOutputs(dir);
                    index = new SweepIndex(total, options.Shard, SweepOutputs.TemporaryName(Path.Combine(dir, ".index")), (_, offset, length) => ReadJournalLine(journal!, offset, length));
                    string jpath = Path.Combine(dir, SweepFiles.Journal);
                    journal = SweepJournal.Open(jpath, header, options.Restart, (r, offset, line) =>
                    {
                        if (!options.Shard.Contains(r.Index))
                            throw new SweepException($"{jpath}: point {r.Index} does not belong to shard {options.Shard}");
                        index.Add(r, 0, offset, line.Length);
                    });
                    FoldRankJournals(dir, header, journal, index);
                    resumed = index.Done.Count;
                    SweepOutputs.WriteAtomically(Path.Combine(dir, SweepFiles.Deck), p => File.WriteAllText(p, deckText));
                }
                catch (Exception e) when (e is SweepException or IOException or UnauthorizedAccessException)
                {
                    error = e is SweepException ? e.Message : $"{dir}: {SweepDeck.OneLine(e.Message)}";
                }
            }
            if (comm.Size > 1) error = comm.BroadcastString(error, 0);
            if (error.Length > 0) throw new SweepException(error);
            PointSet done = index?.Done ?? new PointSet(total);
            if (comm.Size > 1)
            {
                // One bit per position: the only data sent before the points run.
                var bits = comm.BroadcastBytes(comm.Rank == 0 ? done.ToBytes() : null, 0);
                if (comm.Rank != 0) done = PointSet.FromBytes(bits, total);
            }

            string? rankJournalPath = null;
            if (comm.Rank != 0)
            {
                Directory.CreateDirectory(dir);
                rankJournalPath = Path.Combine(dir, RankJournalName(comm.Rank));
                journal = SweepJournal.CreateHeld(rankJournalPath, header);
            }

            var work = new RankWork(total, comm.Rank, comm.Size, done);
            string internalError = "";
            Exception? bug = null;
            using (var snapshots = comm.Rank == 0 ? new SnapshotLoop(options.SnapshotInterval, () => WriteOutputs(dir, spec, fingerprint, index!)) : null)
            {
                var progress = new ProgressTracker(options.Progress, options.ProgressInterval,
                    comm.Rank == 0 ? (comm.Size == 1 ? total : resumed + work.Pending) : work.Pending,
                    comm.Rank == 0 ? resumed : 0, comm.Rank == 0 ? index!.Failed : 0);
                try
                {
                    RunPoints(spec, evaluator, work, journal!, index, options.Threads, progress, ct);
                }
                catch (SweepInternalException e)
                {
                    bug = e;
                    internalError = e.Message;
                }
                progress.Report(force: true);
            }

            bool completed;
            if (comm.Size > 1)
            {
                // Every rank closes its journal, then rank 0 folds them in from the shared filesystem (no data in messages).
                if (comm.Rank != 0)
                {
                    journal!.Dispose();
                    journal = null;
                }
                var errors = comm.GatherStrings(internalError, 0);
                internalError = comm.BroadcastString(comm.Rank == 0 ? errors!.FirstOrDefault(x => x.Length > 0) ?? "" : null, 0);
                if (comm.Rank == 0)
                {
                    try { FoldRankJournals(dir, header, journal!, index!); }
                    catch (Exception e) when (e is SweepException or IOException) { error = e is SweepException ? e.Message : $"{dir}: {SweepDeck.OneLine(e.Message)}"; }
                }
                error = comm.BroadcastString(error, 0);
                if (error.Length > 0) throw new SweepException(error);
                completed = comm.BroadcastString(comm.Rank == 0 && index!.Done.Count == total ? "1" : "0", 0) == "1";
            }
            else completed = index!.Done.Count == total;

            if (comm.Rank == 0)
            {
                journal!.FlushToDisk();
                WriteOutputs(dir, spec, fingerprint, index!);
                options.AfterOutputs?.Invoke();
            }
            if (internalError.Length > 0) throw bug ?? new SweepInternalException(internalError);
            if (comm.Rank != 0) return new SweepSummary(total, 0, 0, 0, completed, dir);
            return new SweepSummary(total, index!.Done.Count, index.Failed, resumed, completed, dir);
        }
        finally
        {
            index?.Dispose();
            journal?.Dispose();
            dirLock?.Dispose();
        }
    }

    /// <summary>
    /// True for the errors that make a point fail (physics that cannot be computed, settings that are invalid for
    /// this point); anything else is a programmer error and stops the sweep.
    /// </summary>
    public static bool IsPointFailure(Exception e) =>
        e is Physics.ModeSolverException { ExitCode: Physics.ExitCodes.Input or Physics.ExitCodes.Physics };

    /// <summary>
    /// Evaluates one point, turning physics and input errors into failed results; returns null when cancelled.
    /// </summary>
    /// <exception cref="SweepInternalException">the evaluator threw anything else (a bug).</exception>
    public static SweepRecord? EvaluatePoint(SweepSpec spec, ISweepEvaluator evaluator, long index, CancellationToken ct)
    {
        var point = spec.GetPoint(index);
        SweepRecord result;
        try
        {
            result = evaluator.Evaluate(point, ct) ?? throw new SweepInternalException($"sweep point {point}: the evaluator returned no result");
        }
        catch (OperationCanceledException) when (ct.IsCancellationRequested)
        {
            return null;
        }
        catch (Exception e) when (IsPointFailure(e))
        {
            result = SweepRecord.Failure(index, e.Message);
        }
        catch (Exception e) when (e is not SweepInternalException)
        {
            throw new SweepInternalException($"internal error at sweep point {point} ({e.GetType().Name}): {SweepDeck.OneLine(e.Message)}", e);
        }
        // Store exactly what a resumed run would read back from the journal.
        var line = result.ForJournal(index, spec.Spectra).ToJsonLine();
        return SweepRecord.FromJson(line.AsSpan(0, line.Length - 1));
    }

    private static void RunPoints(SweepSpec spec, ISweepEvaluator evaluator, RankWork work, SweepJournal journal,
        SweepIndex? index, int? threads, ProgressTracker progress, CancellationToken ct)
    {
        if (work.Pending == 0) return;
        int n = threads is > 0 ? threads.Value : Environment.ProcessorCount;
        using var stop = CancellationTokenSource.CreateLinkedTokenSource(ct);
        Exception? first = null;
        var workers = new Thread[n];
        for (int t = 0; t < n; t++)
        {
            // Each thread takes the next position of this rank (one at a time: points differ a lot in cost).
            workers[t] = new Thread(() =>
            {
                try
                {
                    while (!stop.IsCancellationRequested && work.TryNext(out long position))
                    {
                        long pointIndex = journal.Header.Shard.Index + position * journal.Header.Shard.Count;
                        var rec = EvaluatePoint(spec, evaluator, pointIndex, stop.Token);
                        if (rec is null) return;
                        var line = rec.ToJsonLine();
                        long offset = journal.AppendLine(line);
                        index?.Add(rec, 0, offset, line.Length - 1);
                        progress.PointDone(rec.Ok);
                    }
                }
                catch (Exception e)
                {
                    Interlocked.CompareExchange(ref first, e, null);
                    stop.Cancel();
                }
            }) { IsBackground = true, Name = "sweep-worker" };
            workers[t].Start();
        }
        foreach (var w in workers) w.Join();
        if (first is not null) System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(first).Throw();
    }

    /// <summary>
    /// The positions one rank runs: blocks of <see cref="BlockSize"/> consecutive positions dealt round robin over
    /// the ranks, finished ones skipped; threads take them one at a time through an atomic cursor.
    /// </summary>
    private sealed class RankWork
    {
        private readonly long _total;
        private readonly int _rank, _size;
        private readonly PointSet _done;
        private long _cursor = -1;

        public RankWork(long total, int rank, int size, PointSet done)
        {
            _total = total;
            _rank = rank;
            _size = size;
            _done = done;
            for (long k = 0; Owned(k, out long p); k++)
                if (!done.Contains(p)) Pending++;
        }

        public long Pending { get; }

        public bool TryNext(out long position)
        {
            while (true)
            {
                long k = Interlocked.Increment(ref _cursor);
                if (!Owned(k, out position)) return false;
                if (!_done.Contains(position)) return true;
            }
        }

        private bool Owned(long k, out long position)
        {
            long block = k / BlockSize * _size + _rank;
            position = block * BlockSize + k % BlockSize;
            return position < _total;
        }
    }

    private static byte[] ReadJournalLine(SweepJournal journal, long offset, int length)
    {
        var bytes = new byte[length];
        journal.ReadLine(offset, bytes);
        return bytes;
    }

    private static void WriteOutputs(string dir, SweepSpec spec, string fingerprint, SweepIndex index)
    {
        lock (index)
        {
            // A frozen copy of the finished set: points finishing while the files are written go to the next snapshot.
            var (frozen, failed) = index.Freeze();
            SweepOutputs.Write(dir, spec, fingerprint, () => index.Records(frozen), frozen.Count, failed);
        }
    }

    internal static string RankJournalName(int rank) => $"journal.rank{rank}.jsonl";

    private static void FoldRankJournals(string dir, SweepJournalHeader header, SweepJournal journal, SweepIndex index)
    {
        foreach (var path in Directory.GetFiles(dir, "journal.rank*.jsonl").Order(StringComparer.Ordinal))
        {
            if (!FileKind.IsRegularFile(path)) continue;
            try
            {
                var h = SweepJournal.ReadHeader(path);
                if (h is null || h.Fingerprint != header.Fingerprint || h.Shard != header.Shard || h.PointCount != header.PointCount)
                {
                    File.Delete(path); // cut before its header was written, or left by another sweep's run in this directory
                    continue;
                }
                SweepJournal.Scan(path, (r, _, line) =>
                {
                    if (index.Done.Contains(index.PositionOf(r.Index))) return;
                    var bytes = new byte[line.Length + 1];
                    line.CopyTo(bytes);
                    bytes[^1] = (byte)'\n';
                    long offset = journal.AppendLine(bytes);
                    index.Add(r, 0, offset, line.Length);
                }, out _);
            }
            catch (IOException e) when (e is not FileNotFoundException)
            {
                throw new SweepException($"{path}: still being written by another process (a rank of an earlier run that has not ended yet?); wait a moment and run again ({SweepDeck.OneLine(e.Message)})");
            }
            journal.FlushToDisk();
            File.Delete(path);
        }
    }
    private static void DeleteOutputs(string dir)
    {
        foreach (var name in new[] { SweepFiles.Journal, SweepFiles.Csv, SweepFiles.Hdf5, SweepFiles.PlotPng, SweepFiles.PlotSvg })
        {
            var p = Path.Combine(dir, name);
            if (FileKind.IsRegularFile(p)) File.Delete(p);
        }
        foreach (var p in Directory.GetFiles(dir, "journal.rank*.jsonl"))
            if (FileKind.IsRegularFile(p)) File.Delete(p);
    }

    /// <summary>The number of points of shard <paramref name="s"/> in a sweep of <paramref name="n"/> points.</summary>
    public static long ShardCount(long n, ShardSpec s) => n <= s.Index ? 0 : (n - 1 - s.Index) / s.Count + 1;

    /// <summary>
    /// Rewrites the snapshots every <c>interval</c>, but never spends more than about a tenth of the time on them: after
    /// a snapshot that took t, the next waits at least 10 t (the files grow with the sweep).
    /// </summary>
    private sealed class SnapshotLoop : IDisposable
    {
        private readonly CancellationTokenSource _stop = new();
        private readonly Task _task;

        public SnapshotLoop(TimeSpan interval, Action write)
        {
            _task = Task.Run(async () =>
            {
                var wait = interval;
                try
                {
                    while (true)
                    {
                        await Task.Delay(wait, _stop.Token).ConfigureAwait(false);
                        var clock = Stopwatch.StartNew();
                        write();
                        wait = TimeSpan.FromTicks(Math.Max(interval.Ticks, 10 * clock.Elapsed.Ticks));
                    }
                }
                catch (OperationCanceledException) { }
            });
        }

        public void Dispose()
        {
            _stop.Cancel();
            _task.GetAwaiter().GetResult();
            _stop.Dispose();
        }
    }

    private sealed class ProgressTracker(Action<SweepProgress>? callback, TimeSpan interval, long total, long doneBefore, long failedBefore)
    {
        private readonly object _gate = new();
        private readonly Stopwatch _clock = Stopwatch.StartNew();
        private long _doneRun, _failed = failedBefore;
        private TimeSpan? _last;

        public void PointDone(bool ok)
        {
            Interlocked.Increment(ref _doneRun);
            if (!ok) Interlocked.Increment(ref _failed);
            if (callback is not null) Report(force: false);
        }

        public void Report(bool force)
        {
            if (callback is null) return;
            lock (_gate)
            {
                var now = _clock.Elapsed;
                if (!force && _last is { } last && now - last < interval) return;
                _last = now;
                long run = Interlocked.Read(ref _doneRun);
                double rate = now.TotalSeconds > 0 ? run / now.TotalSeconds : 0;
                long done = doneBefore + run;
                TimeSpan? left = rate > 0 ? TimeSpan.FromSeconds(Math.Max(0, total - done) / rate) : null;
                callback(new SweepProgress(total, done, Interlocked.Read(ref _failed), run, rate, now, left));
            }
        }
    }
}
