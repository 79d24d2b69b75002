namespace ModeSolver.Sweeps;

/// <summary>Reads a sweep output directory back.</summary>
public static class SweepResults
{
    /// <summary>The spec (from the deck copy) and the finished records (from the journal, sorted by index) of an output directory.</summary>
    public static (SweepSpec Spec, IReadOnlyList<SweepRecord> Records) Load(string directory)
    {
        string jpath = Path.Combine(directory, SweepFiles.Journal), dpath = Path.Combine(directory, SweepFiles.Deck);
        if (!File.Exists(jpath) || !File.Exists(dpath)) throw new SweepException($"{directory}: not a sweep output directory (no {SweepFiles.Journal} or {SweepFiles.Deck})");
        var spec = SweepDeck.ParseSpec(SweepDeck.ReadText(dpath), dpath);
        var (_, records) = SweepJournal.Read(jpath, out _);
        records.Sort((a, b) => a.Index.CompareTo(b.Index));
        return (spec, records);
    }

    /// <summary>The spec of an output directory and its records streamed from the journal (file order, each index once), for large sweeps.</summary>
    public static (SweepSpec Spec, Func<IEnumerable<SweepRecord>> Records) Open(string directory)
    {
        string jpath = Path.Combine(directory, SweepFiles.Journal), dpath = Path.Combine(directory, SweepFiles.Deck);
        if (!File.Exists(jpath) || !File.Exists(dpath)) throw new SweepException($"{directory}: not a sweep output directory (no {SweepFiles.Journal} or {SweepFiles.Deck})");
        var spec = SweepDeck.ParseSpec(SweepDeck.ReadText(dpath), dpath);
        return (spec, () => SweepJournal.Records(jpath));
    }
}
