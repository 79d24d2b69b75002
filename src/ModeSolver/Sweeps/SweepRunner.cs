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
/// Runs a sweep on every core, streaming finished points to the journal, rewriting the CSV and HDF5 snapshots
/// periodically and at the end (sorted by index, so the final files do not depend on the finishing order), and
/// resuming from the journal. Under MPI the pending points are dealt round-robin over the ranks.
/// </summary>
public static class SweepRunner
{
    /// <summary>Runs the sweep in this process.</summary>
    /// <param name="spec">The sweep.</param>
    /// <param name="deckText">The whole deck text (copied to the output directory; its non-sweep part enters the fingerprint).</param>
    /// <param name="evaluator">Computes the points.</param>
    /// <param name="options">Output directory, threads, shard, restart, progress.</param>
    /// <param name="ct">Cancels the run; finished points stay in the journal and a later run resumes.</param>
    public static SweepSummary Run(SweepSpec spec, string deckText, ISweepEvaluator evaluator, SweepRunOptions options, CancellationToken ct = default)
        => Run(spec, deckText, evaluator, options, new SerialMessagePassing(), ct);

    /// <summary>Runs the sweep over the ranks of <paramref name="comm"/> (all ranks call this; rank 0 writes the outputs).</summary>
    public static SweepSummary Run(SweepSpec spec, string deckText, ISweepEvaluator evaluator, SweepRunOptions options, IMessagePassing comm, CancellationToken ct = default)
    {
        string dir = options.OutputDirectory;
        string fingerprint = SweepJournal.Fingerprint(spec, SweepDeck.RemoveSweep(deckText));
        var header = new SweepJournalHeader(fingerprint, spec.PointCount, options.Shard);
        var records = new ConcurrentDictionary<long, SweepRecord>();
        SweepJournal? journal = null;
        long[] pending = [];
        long resumed = 0, total = ShardCount(spec.PointCount, options.Shard);
        string error = "";
        if (comm.Rank == 0)
        {
            try
            {
                Directory.CreateDirectory(dir);
                if (options.Restart) DeleteOutputs(dir);
                journal = SweepJournal.Open(Path.Combine(dir, SweepFiles.Journal), header, options.Restart, out var existing);
                foreach (var r in existing)
                {
                    if (!options.Shard.Contains(r.Index))
                        throw new SweepException($"{journal.Path}: point {r.Index} does not belong to shard {options.Shard}");
                    records[r.Index] = r;
                }
                FoldRankJournals(dir, header, journal, records);
                resumed = records.Count;
                SweepOutputs.WriteAtomically(Path.Combine(dir, SweepFiles.Deck), p => File.WriteAllText(p, deckText));
                var list = new List<long>();
                for (long i = options.Shard.Index; i < spec.PointCount; i += options.Shard.Count)
                    if (!records.ContainsKey(i)) list.Add(i);
                pending = list.ToArray();
            }
            catch (Exception e) when (e is SweepException or IOException or UnauthorizedAccessException)
            {
                error = e is SweepException ? e.Message : $"{dir}: {SweepDeck.OneLine(e.Message)}";
                journal?.Dispose();
                journal = null;
            }
        }
        if (comm.Size > 1)
        {
            error = comm.BroadcastString(error, 0);
            if (error.Length > 0) throw new SweepException(error);
            pending = BytesToLongs(comm.BroadcastBytes(comm.Rank == 0 ? LongsToBytes(pending) : null, 0));
        }
        else if (error.Length > 0) throw new SweepException(error);

        var mine = comm.Size == 1 ? pending : pending.Where((_, j) => j % comm.Size == comm.Rank).ToArray();
        string? rankJournalPath = null;
        if (comm.Rank != 0)
        {
            Directory.CreateDirectory(dir);
            rankJournalPath = Path.Combine(dir, RankJournalName(comm.Rank));
            journal = SweepJournal.Open(rankJournalPath, header, restart: true, out _);
        }

        bool completed;
        var outputsGate = new object();
        using (var snapshots = comm.Rank == 0 ? new SnapshotLoop(options.SnapshotInterval, () => WriteOutputs(dir, spec, fingerprint, records, outputsGate)) : null)
        {
            var progress = new ProgressTracker(options.Progress, options.ProgressInterval, comm.Rank == 0 ? (comm.Size == 1 ? total : resumed + mine.Length) : mine.Length,
                comm.Rank == 0 ? resumed : 0, comm.Rank == 0 ? records.Values.Count(r => !r.Ok) : 0);
            completed = RunPoints(spec, evaluator, mine, journal!, records, options.Threads, progress, ct);
            progress.Report(force: true);
        }

        if (comm.Size > 1)
        {
            // Gather every rank's finished lines to rank 0, which appends them to the main journal.
            byte[] mineBytes = comm.Rank == 0 ? [] : ConcatLines(records.Values);
            var gathered = comm.GatherBytes(mineBytes, 0);
            if (comm.Rank == 0)
            {
                foreach (var chunk in gathered!)
                    foreach (var line in SplitLines(chunk))
                    {
                        var rec = SweepRecord.FromJson(line);
                        if (records.TryAdd(rec.Index, rec)) journal!.AppendLine([.. line, (byte)'\n']);
                    }
                journal!.FlushToDisk();
            }
            comm.Barrier();
            journal!.Dispose();
            if (rankJournalPath is not null && File.Exists(rankJournalPath)) File.Delete(rankJournalPath);
            bool allDone = comm.Rank == 0 ? records.Count == total : true;
            completed = comm.BroadcastString(allDone ? "1" : "0", 0) == "1";
        }
        else
        {
            journal!.Dispose();
            completed = records.Count == total;
        }

        if (comm.Rank != 0) return new SweepSummary(total, 0, 0, 0, completed, dir);
        WriteOutputs(dir, spec, fingerprint, records, outputsGate);
        long failed = records.Values.Count(r => !r.Ok);
        return new SweepSummary(total, records.Count, failed, resumed, completed, dir);
    }

    /// <summary>Evaluates one point, turning exceptions into failed results; returns null when cancelled.</summary>
    public static SweepRecord? EvaluatePoint(SweepSpec spec, ISweepEvaluator evaluator, long index, CancellationToken ct)
    {
        var point = spec.GetPoint(index);
        SweepPointResult result;
        try
        {
            result = evaluator.Evaluate(point, ct) ?? SweepPointResult.Failed("the evaluator returned no result");
        }
        catch (OperationCanceledException) when (ct.IsCancellationRequested)
        {
            return null;
        }
        catch (Exception e)
        {
            result = SweepPointResult.Failed(e.Message);
        }
        // Store exactly what a resumed run would read back from the journal.
        var line = SweepRecord.FromResult(index, result, spec.Spectra).ToJsonLine();
        return SweepRecord.FromJson(line.AsSpan(0, line.Length - 1));
    }

    private static bool RunPoints(SweepSpec spec, ISweepEvaluator evaluator, long[] work, SweepJournal journal,
        ConcurrentDictionary<long, SweepRecord> records, int? threads, ProgressTracker progress, CancellationToken ct)
    {
        if (work.Length == 0) return true;
        var po = new ParallelOptions { MaxDegreeOfParallelism = threads is > 0 ? threads.Value : Environment.ProcessorCount, CancellationToken = ct };
        try
        {
            // Points can differ a lot in cost, so hand them out one at a time (no chunking).
            System.Threading.Tasks.Parallel.ForEach(System.Collections.Concurrent.Partitioner.Create(work, EnumerablePartitionerOptions.NoBuffering), po, index =>
            {
                var rec = EvaluatePoint(spec, evaluator, index, ct);
                if (rec is null) return;
                journal.Append(rec);
                records[index] = rec;
                progress.PointDone(rec.Ok);
            });
            return true;
        }
        catch (OperationCanceledException) when (ct.IsCancellationRequested)
        {
            return false;
        }
        catch (AggregateException ae) when (ae.InnerExceptions.Count > 0 && ae.InnerExceptions.All(e => e is IOException or UnauthorizedAccessException))
        {
            // A journal write failed (disk full, permissions): surface the first cause as itself.
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(ae.InnerExceptions[0]).Throw();
            throw;
        }
    }

    private static void WriteOutputs(string dir, SweepSpec spec, string fingerprint, ConcurrentDictionary<long, SweepRecord> records, object gate)
    {
        lock (gate)
        {
            var snapshot = records.Values.ToArray();
            if (snapshot.Length > 0) SweepOutputs.Write(dir, spec, fingerprint, snapshot);
        }
    }

    internal static string RankJournalName(int rank) => $"journal.rank{rank}.jsonl";

    private static void FoldRankJournals(string dir, SweepJournalHeader header, SweepJournal journal, ConcurrentDictionary<long, SweepRecord> records)
    {
        foreach (var path in Directory.GetFiles(dir, "journal.rank*.jsonl").Order(StringComparer.Ordinal))
        {
            var (h, recs) = SweepJournal.Read(path, out long valid);
            if (valid > 0 && h.Fingerprint == header.Fingerprint && h.Shard == header.Shard)
                foreach (var r in recs)
                    if (records.TryAdd(r.Index, r)) journal.Append(r);
            journal.FlushToDisk();
            File.Delete(path);
        }
    }

    private static void DeleteOutputs(string dir)
    {
        foreach (var name in new[] { SweepFiles.Journal, SweepFiles.Csv, SweepFiles.Hdf5, SweepFiles.PlotPng, SweepFiles.PlotSvg })
        {
            var p = Path.Combine(dir, name);
            if (File.Exists(p)) File.Delete(p);
        }
        foreach (var p in Directory.GetFiles(dir, "journal.rank*.jsonl")) File.Delete(p);
    }

    private static long ShardCount(long n, ShardSpec s) => n <= s.Index ? 0 : (n - 1 - s.Index) / s.Count + 1;

    private static byte[] LongsToBytes(long[] a)
    {
        var b = new byte[a.Length * sizeof(long)];
        Buffer.BlockCopy(a, 0, b, 0, b.Length);
        return b;
    }

    private static long[] BytesToLongs(byte[] b)
    {
        var a = new long[b.Length / sizeof(long)];
        Buffer.BlockCopy(b, 0, a, 0, b.Length);
        return a;
    }

    private static byte[] ConcatLines(IEnumerable<SweepRecord> recs)
    {
        using var ms = new MemoryStream();
        foreach (var r in recs) ms.Write(r.ToJsonLine());
        return ms.ToArray();
    }

    private static IEnumerable<byte[]> SplitLines(byte[] chunk)
    {
        int pos = 0;
        while (pos < chunk.Length)
        {
            int nl = Array.IndexOf(chunk, (byte)'\n', pos);
            if (nl < 0) nl = chunk.Length;
            if (nl > pos) yield return chunk[pos..nl];
            pos = nl + 1;
        }
    }

    private sealed class SnapshotLoop : IDisposable
    {
        private readonly CancellationTokenSource _stop = new();
        private readonly Task _task;

        public SnapshotLoop(TimeSpan interval, Action write)
        {
            _task = Task.Run(async () =>
            {
                using var timer = new PeriodicTimer(interval);
                try
                {
                    while (await timer.WaitForNextTickAsync(_stop.Token).ConfigureAwait(false)) write();
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
