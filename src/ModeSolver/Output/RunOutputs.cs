namespace ModeSolver.Output;

/// <summary>One output file of a run: its plain file name and a writer that writes the whole file to a given path.</summary>
public sealed record OutputFile(string FileName, Action<RunReport, string> Write);

/// <summary>The standard output files and the all-or-nothing writer.</summary>
public static class RunOutputs
{
    /// <summary>summary.json.</summary>
    public static OutputFile Json { get; } = new(SummaryJsonWriter.FileName, (r, p) => SummaryJsonWriter.Write(r, p));

    /// <summary>run.h5.</summary>
    public static OutputFile Hdf5 { get; } = new(Hdf5Writer.FileName, (r, p) => Hdf5Writer.Write(r, p));

    /// <summary>primordial.dat.</summary>
    public static OutputFile Table { get; } = new(PrimordialTableWriter.FileName, (r, p) => PrimordialTableWriter.Write(r, p));

    /// <summary>spectra.png.</summary>
    public static OutputFile SpectraPng { get; } = new("spectra.png", (r, p) => RunPlots.SaveSpectra(r, p, PlotFormat.Png));

    /// <summary>spectra.svg.</summary>
    public static OutputFile SpectraSvg { get; } = new("spectra.svg", (r, p) => RunPlots.SaveSpectra(r, p, PlotFormat.Svg));

    /// <summary>background.png.</summary>
    public static OutputFile BackgroundPng { get; } = new("background.png", (r, p) => RunPlots.SaveBackground(r, p, PlotFormat.Png));

    /// <summary>background.svg.</summary>
    public static OutputFile BackgroundSvg { get; } = new("background.svg", (r, p) => RunPlots.SaveBackground(r, p, PlotFormat.Svg));

    /// <summary>The standard set; plots and the table can be left out.</summary>
    public static IReadOnlyList<OutputFile> Standard(bool table = true, bool plots = true)
    {
        var list = new List<OutputFile> { Json, Hdf5 };
        if (table) list.Add(Table);
        if (plots) list.AddRange([SpectraPng, SpectraSvg, BackgroundPng, BackgroundSvg]);
        return list;
    }

    /// <summary>
    /// Checks the report (<see cref="RunReportChecks.Validate"/>, <see cref="ArgumentException"/> before anything is
    /// touched), then writes every file into <paramref name="directory"/> all-or-nothing (see
    /// <see cref="OutputTransaction"/>). Throws <see cref="OutputException"/> with a one-line message if anything
    /// fails; the directory is then unchanged.
    /// </summary>
    /// <returns>Final paths of the files written.</returns>
    public static IReadOnlyList<string> WriteAll(RunReport report, string directory, IEnumerable<OutputFile> files)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(files);
        RunReportChecks.Validate(report);
        using var tx = new OutputTransaction(directory);
        foreach (var f in files)
            tx.Stage(f.FileName, path => f.Write(report, path));
        return tx.Commit();
    }
}
