namespace ModeSolver.Sweeps;

/// <summary>Merges the output directories of the shards I/N of one sweep into the files an unsharded run writes.</summary>
public static class SweepMerge
{
    /// <summary>
    /// Reads every shard directory (journal and deck copy), checks they come from the same deck and sweep, that they
    /// are the shards 0..N-1 of one N, each exactly once and each complete, then writes journal, deck copy, CSV and
    /// HDF5 into <paramref name="outputDirectory"/>, streamed (memory does not grow with the number of points). The
    /// output directory may not be one of the shards, nor hold another sweep; it is locked while the files are written.
    /// </summary>
    public static (SweepSpec Spec, SweepSummary Summary) Merge(IReadOnlyList<string> shardDirectories, string outputDirectory)
    {
        if (shardDirectories.Count == 0) throw new SweepException("sweep-merge: no shard directories given");
        string outFull = Canonical(outputDirectory);
        foreach (var dir in shardDirectories)
            if (Canonical(dir) == outFull)
                throw new SweepException($"sweep-merge: --out {outputDirectory} is one of the shards; merge into a new directory");
        string? deckText = null, fingerprint = null;
        long pointCount = -1;
        int shardCount = -1;
        var seenShards = new Dictionary<int, string>();
        var journals = new List<string>();
        foreach (var dir in shardDirectories)
        {
            string jpath = Path.Combine(dir, SweepFiles.Journal), dpath = Path.Combine(dir, SweepFiles.Deck);
            if (!File.Exists(jpath)) throw new SweepException($"{dir}: no {SweepFiles.Journal} (not a sweep output directory)");
            if (!File.Exists(dpath)) throw new SweepException($"{dir}: no {SweepFiles.Deck} (not a sweep output directory)");
            var h = SweepJournal.ReadHeader(jpath) ?? throw new SweepException($"{jpath}: empty journal");
            if (fingerprint is null)
            {
                deckText = SweepDeck.ReadText(dpath);
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
            journals.Add(jpath);
        }
        if (seenShards.Count != shardCount)
        {
            var missing = Enumerable.Range(0, shardCount).Where(i => !seenShards.ContainsKey(i)).Select(i => $"{i}/{shardCount}");
            throw new SweepException($"sweep-merge: missing shard(s) {string.Join(", ", missing)}");
        }
        var spec = SweepDeck.ParseSpec(deckText!, Path.Combine(shardDirectories[0], SweepFiles.Deck));
        if (SweepJournal.Fingerprint(spec, SweepDeck.RemoveSweep(deckText!)) != fingerprint)
            throw new SweepException($"{Path.Combine(shardDirectories[0], SweepFiles.Deck)}: does not match its journal's fingerprint (edited after the run?)");
        RefuseOtherSweep(outputDirectory, fingerprint!);

        Directory.CreateDirectory(outputDirectory);
        using var dirLock = SweepLock.Acquire(outputDirectory);
        SweepOutputs.RemoveLeftovers(outputDirectory);
        var handles = journals.Select(j => new FileStream(j, FileMode.Open, FileAccess.Read, FileShare.Read, 1)).ToArray();
        try
        {
            using var index = new SweepIndex(pointCount, ShardSpec.All, SweepOutputs.TemporaryName(Path.Combine(outputDirectory, ".index")), (file, offset, length) =>
            {
                var bytes = new byte[length];
                RandomAccess.Read(handles[file].SafeFileHandle, bytes, offset);
                return bytes;
            });
            for (int f = 0; f < journals.Count; f++)
            {
                string jpath = journals[f], dir = shardDirectories[f];
                var shard = SweepJournal.ReadHeader(jpath)!.Shard;
                long count = 0;
                SweepJournal.Scan(jpath, (r, offset, line) =>
                {
                    if (!shard.Contains(r.Index)) throw new SweepException($"{jpath}: point {r.Index} does not belong to shard {shard}");
                    index.Add(r, f, offset, line.Length);
                    count++;
                }, out _);
                long expected = SweepRunner.ShardCount(pointCount, shard);
                if (count != expected)
                    throw new SweepException($"{dir}: shard {shard} is incomplete ({count} of {expected} points); run it again to finish it");
            }
            SweepOutputs.WriteAtomically(Path.Combine(outputDirectory, SweepFiles.Deck), p => File.WriteAllText(p, deckText));
            SweepOutputs.WriteAtomically(Path.Combine(outputDirectory, SweepFiles.Journal), p =>
            {
                using var fs = new FileStream(p, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16);
                fs.Write(new SweepJournalHeader(fingerprint!, pointCount, ShardSpec.All).ToJsonLine());
                foreach (var r in index.Records()) fs.Write(r.ToJsonLine());
                fs.Flush(true);
            });
            SweepOutputs.Write(outputDirectory, spec, fingerprint!, () => index.Records(), index.Done.Count, index.Failed);
            var summary = new SweepSummary(pointCount, index.Done.Count, index.Failed, index.Done.Count, true, outputDirectory);
            return (spec, summary);
        }
        finally
        {
            foreach (var h in handles) h.Dispose();
        }
    }

    /// <summary>An output directory that already holds a sweep may only be replaced by the same sweep (a repeated merge).</summary>
    private static void RefuseOtherSweep(string outputDirectory, string fingerprint)
    {
        string jpath = Path.Combine(outputDirectory, SweepFiles.Journal);
        if (!File.Exists(jpath)) return;
        var h = SweepJournal.ReadHeader(jpath);
        if (h is null || h.Fingerprint != fingerprint || h.Shard != ShardSpec.All)
            throw new SweepException($"sweep-merge: --out {outputDirectory} holds another sweep ({(h is null ? "an unreadable journal" : h.Shard == ShardSpec.All ? "a different deck" : $"shard {h.Shard}")}); merge into a new directory");
    }

    private static string Canonical(string dir)
    {
        var info = new DirectoryInfo(Path.GetFullPath(dir));
        string full = (info.Exists ? info.ResolveLinkTarget(true)?.FullName : null) ?? info.FullName;
        return Path.TrimEndingDirectorySeparator(full);
    }
}
