namespace ModeSolver.Sweeps;

/// <summary>Merges the output directories of the shards I/N of one sweep into the files an unsharded run writes.</summary>
public static class SweepMerge
{
    /// <summary>
    /// Reads every shard directory (journal and deck copy), checks they come from the same deck and sweep, that they
    /// are the shards 0..N-1 of one N, each exactly once and each complete, then writes journal, deck copy, CSV and
    /// HDF5 into <paramref name="outputDirectory"/>. Returns the spec and records (for plotting).
    /// </summary>
    public static (SweepSpec Spec, IReadOnlyList<SweepRecord> Records, SweepSummary Summary) Merge(IReadOnlyList<string> shardDirectories, string outputDirectory)
    {
        if (shardDirectories.Count == 0) throw new SweepException("sweep-merge: no shard directories given");
        string? deckText = null, fingerprint = null;
        long pointCount = -1;
        int shardCount = -1;
        var seenShards = new Dictionary<int, string>();
        var all = new Dictionary<long, SweepRecord>();
        foreach (var dir in shardDirectories)
        {
            string jpath = Path.Combine(dir, SweepFiles.Journal), dpath = Path.Combine(dir, SweepFiles.Deck);
            if (!File.Exists(jpath)) throw new SweepException($"{dir}: no {SweepFiles.Journal} (not a sweep output directory)");
            if (!File.Exists(dpath)) throw new SweepException($"{dir}: no {SweepFiles.Deck} (not a sweep output directory)");
            var (h, recs) = SweepJournal.Read(jpath, out long valid);
            if (valid == 0) throw new SweepException($"{jpath}: empty journal");
            if (fingerprint is null)
            {
                deckText = File.ReadAllText(dpath);
                fingerprint = h.Fingerprint;
                pointCount = h.PointCount;
                shardCount = h.Shard.Count;
            }
            else if (h.Fingerprint != fingerprint || h.PointCount != pointCount)
                throw new SweepException($"{dir}: comes from a different deck or sweep than {shardDirectories[0]}");
            if (h.Shard.Count != shardCount)
                throw new SweepException($"{dir}: is shard {h.Shard} but {shardDirectories[0]} has {shardCount} shards");
            if (seenShards.TryGetValue(h.Shard.Index, out var other))
                throw new SweepException($"{dir}: shard {h.Shard} was already given ({other})");
            seenShards[h.Shard.Index] = dir;
            long expected = h.PointCount <= h.Shard.Index ? 0 : (h.PointCount - 1 - h.Shard.Index) / h.Shard.Count + 1;
            if (recs.Count != expected)
                throw new SweepException($"{dir}: shard {h.Shard} is incomplete ({recs.Count} of {expected} points); run it again to finish it");
            foreach (var r in recs)
            {
                if (!h.Shard.Contains(r.Index)) throw new SweepException($"{jpath}: point {r.Index} does not belong to shard {h.Shard}");
                all[r.Index] = r;
            }
        }
        if (seenShards.Count != shardCount)
        {
            var missing = Enumerable.Range(0, shardCount).Where(i => !seenShards.ContainsKey(i)).Select(i => $"{i}/{shardCount}");
            throw new SweepException($"sweep-merge: missing shard(s) {string.Join(", ", missing)}");
        }
        var spec = SweepDeck.ParseSpec(deckText!, Path.Combine(shardDirectories[0], SweepFiles.Deck));
        if (SweepJournal.Fingerprint(spec, SweepDeck.RemoveSweep(deckText!)) != fingerprint)
            throw new SweepException($"{Path.Combine(shardDirectories[0], SweepFiles.Deck)}: does not match its journal's fingerprint (edited after the run?)");

        Directory.CreateDirectory(outputDirectory);
        var sorted = all.Values.OrderBy(r => r.Index).ToList();
        SweepOutputs.WriteAtomically(Path.Combine(outputDirectory, SweepFiles.Deck), p => File.WriteAllText(p, deckText));
        SweepOutputs.WriteAtomically(Path.Combine(outputDirectory, SweepFiles.Journal), p =>
        {
            using var fs = new FileStream(p, FileMode.Create, FileAccess.Write);
            fs.Write(new SweepJournalHeader(fingerprint!, pointCount, ShardSpec.All).ToJsonLine());
            foreach (var r in sorted) fs.Write(r.ToJsonLine());
        });
        SweepOutputs.Write(outputDirectory, spec, fingerprint!, sorted);
        var summary = new SweepSummary(pointCount, sorted.Count, sorted.Count(r => !r.Ok), sorted.Count, true, outputDirectory);
        return (spec, sorted, summary);
    }
}
