using System.CommandLine;
using System.Globalization;
using System.Text;
using ModeSolver.Decks;
using ModeSolver.Models;
using ModeSolver.Output;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// `modesolver frame`: the canonical field chi(phi) = int sqrt(K) dphi of a model and its potential V(chi), written as a
/// text table and two plots (PNG and SVG) into --out DIR, all or nothing (<see cref="OutputTransaction"/>): an error
/// leaves the directory as it was.
/// </summary>
public static class FrameCommand
{
    /// <summary>File names written into the output directory.</summary>
    public static IReadOnlyList<string> OutputFiles { get; } =
        ["frame.txt", "frame-chi.png", "frame-chi.svg", "frame-potential.png", "frame-potential.svg"];

    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var cmd = new Command("frame", "Canonical field chi(phi) and the potential V(chi) of a model: table and plots.")
        {
            TreatUnmatchedTokensAsErrors = false,
        };
        var model = RunOptions.AddModelOptions(cmd);
        var phiMin = RunOptions.Opt("--phi-min", "Smallest field value (default: from 0, phi0 and phi_end).");
        var phiMax = RunOptions.Opt("--phi-max", "Largest field value (default: from 0, phi0 and phi_end).");
        var points = RunOptions.Opt("--points", "Number of field values (default 400).");
        var phiEndOpt = RunOptions.Opt("--phi-end", "Also include this field value in the default range.");
        var outDir = RunOptions.Opt("--out", "Output directory (created if missing; default: frame-out).");
        foreach (var o in new Option[] { phiMin, phiMax, points, phiEndOpt, outDir }) cmd.Options.Add(o);
        cmd.SetAction(parse => CommandErrors.Guard(() =>
        {
            CommandErrors.ThrowOnUnmatched(parse);
            var input = model.Overrides(parse);
            if (RunOptions.Value(parse, phiEndOpt) is string pe) input.PhiEnd = new(RunOptions.ParseNumber(pe, "--phi-end"), "--phi-end");
            if (input.ModelId is null && input.Potential is null)
                throw new DeckException("frame needs a model: --model ID or --potential EXPR", "--model");
            var spec = ResolveModel(input, out double? phi0, out var warnings);
            return CommandErrors.WithWarnings(warnings, Console.Error, () =>
            {
                double? lo = RunOptions.Value(parse, phiMin) is string a ? RunOptions.ParseNumber(a, "--phi-min") : null;
                double? hi = RunOptions.Value(parse, phiMax) is string b ? RunOptions.ParseNumber(b, "--phi-max") : null;
                int n = 400;
                if (RunOptions.Value(parse, points) is string p)
                {
                    if (!int.TryParse(p.Trim(), NumberStyles.Integer, CultureInfo.InvariantCulture, out n) || n < 2 || n > 1_000_000)
                        throw new DeckException($"--points expects a whole number from 2 to 1000000 (got '{p}')", "--points");
                }
                string dir = RunOptions.Value(parse, outDir) ?? "frame-out";
                Write(spec, phi0, lo, hi, n, dir);
                Console.Out.WriteLine(TextSafety.Printable($"wrote {string.Join(", ", OutputFiles)} to {dir}"));
                return 0;
            });
        }));
        return cmd;
    }

    private static ModelSpec ResolveModel(RunInput input, out double? phi0, out IReadOnlyList<string> warnings)
    {
        // The canonical field chi(phi) is a one-field map; a model of several fields has a field-space metric instead.
        var fields = input.Fields?.Value ?? (input.ModelId is { } id ? Models.ModelCatalogue.Find(id.Value.Trim())?.Fields : null);
        if (fields is { Count: > 1 })
            throw new DeckException($"frame maps one field to its canonical field; a model of {fields.Count} fields ({string.Join(", ", fields)}) has a field-space metric instead (see `modesolver background`, which prints its curvature)", "--fields");
        // Reuse the full resolver for model validation (parameters, formulas); a start value is needed by it, so a
        // formula model without --phi0 gets a neutral one here only when the range is given explicitly.
        if (input.Phi0 is null && input.ModelId is null)
        {
            var probe = RunInput.Merge(new RunInput(), input);
            probe.Phi0 = new(0.0, "--phi0");
            var spec = ResolveModelOnly(probe);
            phi0 = null;
            warnings = [];
            return spec;
        }
        var settings = SettingsResolver.Resolve(input);
        phi0 = settings.Initial.Phi0;
        warnings = settings.Warnings;
        return settings.Model;
    }

    private static ModelSpec ResolveModelOnly(RunInput probe)
    {
        try
        {
            return SettingsResolver.Resolve(probe).Model;
        }
        catch (DeckException e) when (e.Key == "--phi0")
        {
            // V(0) <= 0 or theory invalid at 0 is fine for a frame plot over an explicit range: resolve without the check.
            var settingsLess = new ModelSpec(null, probe.Potential!.Value.Value, probe.Kinetic?.Value, probe.Coupling?.Value,
                probe.Palatini?.Value ?? false, probe.Parameters.ToDictionary(p => p.Key, p => p.Value.Value), probe.PhiEnd?.Value);
            return settingsLess;
        }
    }

    /// <summary>Computes the map on the range and writes the table and plots into <paramref name="dir"/>.</summary>
    public static void Write(ModelSpec spec, double? phi0, double? phiMin, double? phiMax, int points, string dir)
    {
        double lo, hi;
        if (phiMin is double a && phiMax is double b) (lo, hi) = (a, b);
        else
        {
            if (phi0 is null)
                throw new DeckException("give --phi-min and --phi-max (or --phi0) for a model given by formulas", "--phi-min");
            double p0 = phi0.Value;
            double dlo = Math.Min(0, Math.Min(p0, spec.PhiEnd ?? p0)), dhi = Math.Max(0, Math.Max(p0, spec.PhiEnd ?? p0));
            lo = phiMin ?? dlo;
            hi = phiMax ?? dhi;
        }
        if (!double.IsFinite(lo) || !double.IsFinite(hi) || !(lo < hi))
            throw new DeckException(FormattableString.Invariant($"the field range [{lo}, {hi}] is empty: --phi-min must be below --phi-max"), "--phi-min");

        var theory = TheoryFactory.Build(spec);
        theory.ValidateRange(lo, hi);
        double reference = lo <= 0 && 0 <= hi ? 0.0 : lo;
        var map = new CanonicalFieldMap(theory, lo, hi, reference);

        var phi = new double[points];
        var chi = new double[points];
        var k = new double[points];
        var v = new double[points];
        for (int i = 0; i < points; i++)
        {
            phi[i] = i == points - 1 ? hi : lo + (hi - lo) * i / (points - 1);
            chi[i] = map.Chi(phi[i]);
            k[i] = theory.Kinetic(phi[i]).Value;
            v[i] = theory.Potential(phi[i]).Value;
        }

        // All or nothing: every file is staged under a temporary name and renamed into place at the end; on any failure
        // the temporaries (and a directory this run created) are removed, so the directory is left as it was.
        string table = Table(spec, reference, phi, chi, k, v);
        string subject = ModeSolver.Output.PlotScales.Subject(null, spec.CatalogueId, spec.Potential);
        var chiPlot = MakePlot(phi, chi, "phi (Jordan/input field, M_pl)", "chi (canonical field, M_pl)", $"{subject}: canonical field chi(phi)");
        var vPlot = MakePlot(chi, v, "chi (canonical field, M_pl)", "V (Einstein frame, M_pl^4, unnormalised)", $"{subject}: potential against the canonical field");
        using var tx = new OutputTransaction(dir);
        tx.Stage(OutputFiles[0], p => File.WriteAllText(p, table));
        tx.Stage(OutputFiles[1], p => chiPlot.SavePng(p, 900, 560));
        tx.Stage(OutputFiles[2], p => chiPlot.SaveSvg(p, 900, 560));
        tx.Stage(OutputFiles[3], p => vPlot.SavePng(p, 900, 560));
        tx.Stage(OutputFiles[4], p => vPlot.SaveSvg(p, 900, 560));
        tx.Commit();
    }

    private static string Table(ModelSpec spec, double reference, double[] phi, double[] chi, double[] k, double[] v)
    {
        var c = CultureInfo.InvariantCulture;
        var sb = new StringBuilder();
        sb.AppendLine("# modesolver frame: canonical field chi(phi) = int sqrt(K) dphi and the Einstein-frame potential");
        sb.AppendLine("# model: " + spec.Describe());
        sb.AppendLine(string.Create(c, $"# chi = 0 at phi = {reference:G6}; units: reduced Planck (M_pl = 1); V unnormalised (as given)"));
        sb.AppendLine("# columns: phi [M_pl]  chi [M_pl]  K(phi) [1]  V [M_pl^4]");
        for (int i = 0; i < phi.Length; i++)
            sb.AppendLine(string.Create(c, $"{phi[i],24:R} {chi[i],24:R} {k[i],24:R} {v[i],24:R}"));
        return sb.ToString();
    }

    private static ScottPlot.Plot MakePlot(double[] x, double[] y, string xLabel, string yLabel, string title)
    {
        var plot = new ScottPlot.Plot();
        plot.FigureBackground.Color = ScottPlot.Color.FromHex("#fbfaf6");
        plot.DataBackground.Color = ScottPlot.Color.FromHex("#ffffff");
        plot.Grid.MajorLineColor = ScottPlot.Color.FromHex("#e4e0d6");
        var line = plot.Add.ScatterLine(x, y);
        line.Color = ScottPlot.Color.FromHex("#2d6a4f");
        line.LineWidth = 2.5f;
        plot.Title(title);
        plot.XLabel(xLabel);
        plot.YLabel(yLabel);
        return plot;
    }
}
