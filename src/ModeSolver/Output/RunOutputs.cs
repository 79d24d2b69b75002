using ModeSolver.Report;
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

    /// <summary>induced-gw.png: Omega_GW h^2 against f.</summary>
    public static OutputFile InducedGwPng { get; } = new("induced-gw.png", (r, p) => ObservablesPlots.SaveInducedGw(r, p, PlotFormat.Png));

    /// <summary>induced-gw.svg.</summary>
    public static OutputFile InducedGwSvg { get; } = new("induced-gw.svg", (r, p) => ObservablesPlots.SaveInducedGw(r, p, PlotFormat.Svg));

    /// <summary>black-holes.png: f_PBH against M.</summary>
    public static OutputFile PbhPng { get; } = new("black-holes.png", (r, p) => ObservablesPlots.SavePbh(r, p, PlotFormat.Png));

    /// <summary>black-holes.svg.</summary>
    public static OutputFile PbhSvg { get; } = new("black-holes.svg", (r, p) => ObservablesPlots.SavePbh(r, p, PlotFormat.Svg));

    /// <summary>fnl.png: P_s(k) above the equilateral f_NL(k).</summary>
    public static OutputFile FnlPng { get; } = new("fnl.png", (r, p) => BispectrumPlots.SaveCurve(r, p, PlotFormat.Png));

    /// <summary>fnl.svg.</summary>
    public static OutputFile FnlSvg { get; } = new("fnl.svg", (r, p) => BispectrumPlots.SaveCurve(r, p, PlotFormat.Svg));

    /// <summary>fnl-shape.png: f_NL over (k2/k1, k3/k1).</summary>
    public static OutputFile FnlShapePng { get; } = new("fnl-shape.png", (r, p) => BispectrumPlots.SaveShape(r, p, PlotFormat.Png));

    /// <summary>fnl-shape.svg.</summary>
    public static OutputFile FnlShapeSvg { get; } = new("fnl-shape.svg", (r, p) => BispectrumPlots.SaveShape(r, p, PlotFormat.Svg));

    /// <summary>The bispectrum plots a run with this request writes (none without a bispectrum; the shape only with a grid).</summary>
    public static IReadOnlyList<OutputFile> BispectrumFiles(Bispectrum.BispectrumRequest? request)
    {
        var list = new List<OutputFile>();
        if (request is null) return list;
        list.AddRange([FnlPng, FnlSvg]);
        if (request.ShapeGrid > 0) list.AddRange([FnlShapePng, FnlShapeSvg]);
        return list;
    }

    /// <summary>trajectory.png: the two-field trajectory over contours of ln V.</summary>
    public static OutputFile TrajectoryPng { get; } = new("trajectory.png", (r, p) => MultiFieldPlots.SaveTrajectory(r, p, PlotFormat.Png));

    /// <summary>trajectory.svg.</summary>
    public static OutputFile TrajectorySvg { get; } = new("trajectory.svg", (r, p) => MultiFieldPlots.SaveTrajectory(r, p, PlotFormat.Svg));

    /// <summary>turn-rate.png: eta_perp and m_s^2/H^2 against N.</summary>
    public static OutputFile TurnRatePng { get; } = new("turn-rate.png", (r, p) => MultiFieldPlots.SaveKinematics(r, p, PlotFormat.Png));

    /// <summary>turn-rate.svg.</summary>
    public static OutputFile TurnRateSvg { get; } = new("turn-rate.svg", (r, p) => MultiFieldPlots.SaveKinematics(r, p, PlotFormat.Svg));

    /// <summary>The n-field plots of a run with this many fields: none for one field, the field-space plot for two, the turn-rate plot for two or more.</summary>
    public static IReadOnlyList<OutputFile> FieldPlots(int fieldCount)
    {
        var list = new List<OutputFile>();
        if (fieldCount == 2) list.AddRange([TrajectoryPng, TrajectorySvg]);
        if (fieldCount >= 2) list.AddRange([TurnRatePng, TurnRateSvg]);
        return list;
    }

    /// <summary>The observables' plots a run with these settings writes (none unless induced GWs or black holes are on).</summary>
    public static IReadOnlyList<OutputFile> ObservablePlots(Observables.ObservablesSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var list = new List<OutputFile>();
        if (settings.InducedGw) list.AddRange([InducedGwPng, InducedGwSvg]);
        if (settings.Pbh) list.AddRange([PbhPng, PbhSvg]);
        return list;
    }

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

    /// <summary>
    /// Where <c>--table PATH</c> goes, checked before a long run (touches nothing): a character device or named pipe is
    /// written to directly (true); a missing path or a regular file (or a link to one) is written all-or-nothing
    /// (false); anything else (a directory, socket, block device, dangling link) is refused with an
    /// <see cref="OutputException"/>.
    /// </summary>
    public static bool PrecheckTable(string path)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(path);
        string full = Path.GetFullPath(path);
        var kind = FileKinds.Of(full);
        if (FileKinds.IsStreamed(kind)) return true;
        if (kind == FileKind.Directory)
            throw new OutputException($"--table {path} is a directory; give a file path, or '-' for standard output");
        OutputTransaction.Precheck(Path.GetDirectoryName(full)!, [Path.GetFileName(full)]);
        return false;
    }

    /// <summary>
    /// Writes only the primordial table to <paramref name="path"/>: streamed into a character device or named pipe
    /// (nothing is created, renamed or deleted there), else all-or-nothing through <see cref="OutputTransaction"/>.
    /// Throws <see cref="OutputException"/> with a one-line message on failure.
    /// </summary>
    /// <returns>The path written.</returns>
    public static string WriteTable(RunReport report, string path)
    {
        ArgumentNullException.ThrowIfNull(report);
        RunReportChecks.Validate(report);
        string full = Path.GetFullPath(path);
        if (!PrecheckTable(full))
        {
            using var tx = new OutputTransaction(Path.GetDirectoryName(full)!);
            tx.Stage(Path.GetFileName(full), p => PrimordialTableWriter.Write(report, p));
            return tx.Commit()[0];
        }
        try
        {
            using var stream = new FileStream(full, FileMode.Open, FileAccess.Write, FileShare.ReadWrite, 1 << 16);
            using var writer = new StreamWriter(stream, new System.Text.UTF8Encoding(false)) { NewLine = "\n" };
            PrimordialTableWriter.Write(report, writer);
            writer.Flush();
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new OutputException($"cannot write the table to {full} ({FileKinds.Describe(FileKinds.Of(full))}): {OutputTransaction.Reason(e)}", e);
        }
        return full;
    }
}
