using System.CommandLine;
using System.Globalization;
using System.Text;
using ModeSolver.Models;

namespace ModeSolver.Cli.Commands;

/// <summary>`modesolver models [ID]`: the model catalogue as a table, or one entry in full.</summary>
public static class ModelsCommand
{
    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var id = new Argument<string?>("ID") { Description = "Show this catalogue entry in full.", Arity = ArgumentArity.ZeroOrOne };
        var cmd = new Command("models", "List the built-in models (id, formula, parameters, source), or show one.");
        cmd.Arguments.Add(id);
        cmd.SetAction(parse => CommandErrors.Guard(() =>
        {
            string? which = parse.GetValue(id);
            if (which is null) Console.Out.Write(Table());
            else
            {
                var entry = ModelCatalogue.Find(which)
                    ?? throw new Decks.DeckException($"unknown model '{which}' (catalogue: {string.Join(", ", ModelCatalogue.Ids)})", "ID");
                Console.Out.Write(Detail(entry));
            }
            return 0;
        }));
        return cmd;
    }

    private static string G(double x) => x.ToString("G6", CultureInfo.InvariantCulture);

    /// <summary>The catalogue table: one block of lines per model.</summary>
    public static string Table()
    {
        var rows = new List<string[]>();
        foreach (var e in ModelCatalogue.All.Concat(ModelCatalogue.FieldModels))
        {
            string formula = e.Coupling is null ? "V = " + e.Potential : "V_J = " + e.Potential;
            string count = e.CountParameter is string cp ? $"{cp} ({e.FieldCount})" : e.FieldCount.ToString(CultureInfo.InvariantCulture);
            rows.Add([e.Id, count, formula, string.Join(", ", e.Parameters.Select(p => $"{p.Name}={G(p.Value)}")), e.Source]);
            if (e.Fields is { Count: > 1 } names) rows.Add(["", "", "fields " + string.Join(", ", names), "", ""]);
            if (e.Metric is { } m) rows.Add(["", "", (e.Coupling is null ? "G = " : "K_J = ") + Decks.FormulaMatrix.Format(m), "", ""]);
            if (e.Coupling is not null) rows.Add(["", "", "Omega^2 = " + e.Coupling + (e.Palatini ? "  (Palatini)" : "  (metric)"), "", ""]);
            if (e.Kinetic is not null) rows.Add(["", "", (e.Coupling is null ? "K = " : "K_J = ") + e.Kinetic, "", ""]);
        }
        string[] head = ["id", "fields", "formula", "parameters (defaults)", "source"];
        int[] width = new int[4];
        for (int c = 0; c < 4; c++) width[c] = Math.Max(head[c].Length, rows.Max(r => r[c].Length));
        var sb = new StringBuilder();
        string Line(string[] r) =>
            (r[0].PadRight(width[0]) + "  " + r[1].PadRight(width[1]) + "  " + r[2].PadRight(width[2]) + "  " + r[3].PadRight(width[3]) + "  " + r[4]).TrimEnd();
        sb.AppendLine(Line(head));
        foreach (var r in rows) sb.AppendLine(Line(r));
        sb.AppendLine();
        sb.AppendLine("Reduced Planck units; amplitudes are placeholders (the run normalises to A_s). `modesolver models ID` shows one model in full.");
        return sb.ToString();
    }

    /// <summary>One entry in full.</summary>
    public static string Detail(ModelEntry e)
    {
        var sb = new StringBuilder();
        sb.AppendLine($"{e.Id}: {e.Name}");
        if (e.Coupling is null)
        {
            sb.AppendLine($"  V(phi)       = {e.Potential}");
            if (e.Kinetic is not null) sb.AppendLine($"  K(phi)       = {e.Kinetic}");
        }
        else
        {
            sb.AppendLine($"  V_J(phi)     = {e.Potential}");
            sb.AppendLine($"  Omega^2(phi) = {e.Coupling}");
            if (e.Kinetic is not null) sb.AppendLine($"  K_J(phi)     = {e.Kinetic}");
            sb.AppendLine($"  frame        : Jordan, {(e.Palatini ? "Palatini" : "metric")} formulation");
        }
        if (e.Fields is { Count: > 1 } fields)
        {
            sb.AppendLine($"  fields       = {string.Join(", ", fields)}{(e.CountParameter is string cp ? $" (for {cp} = {e.FieldCount}; {cp} sets the number)" : "")}");
            if (e.Metric is { } m) sb.AppendLine($"  {(e.Coupling is null ? "G_IJ" : "K^J_IJ"),-12} = [{Decks.FormulaMatrix.Format(m)}]");
            if (e.DefaultFields0 is { } f0) sb.AppendLine($"  start (default) = ({string.Join(", ", f0.Select(G))}), on the slow-roll attractor direction");
            if (e.End is string end) sb.AppendLine($"  end          : where {end} = 0");
        }
        sb.AppendLine("  parameters:");
        int w = e.Parameters.Max(p => p.Name.Length);
        foreach (var p in e.Parameters) sb.AppendLine($"    {p.Name.PadRight(w)} = {G(p.Value),-10} {p.Meaning}");
        bool severalFields = e.Fields is { Count: > 1 }; // their start is listed with the fields above
        if (!severalFields && e.DefaultStartEfolds is double ne)
            sb.AppendLine($"  start (default) = {G(ne)} e-folds before the end (start.efolds; phi0 solved for), on the side of phi0 = {G(e.DefaultPhi0)}, rolls towards {(e.Roll == RollDirection.Decreasing ? "smaller" : "larger")} phi");
        else if (!severalFields)
            sb.AppendLine($"  phi0 (default) = {G(e.DefaultPhi0)}, rolls towards {(e.Roll == RollDirection.Decreasing ? "smaller" : "larger")} phi");
        if (e.PhiEnd is double pe) sb.AppendLine($"  phi_end        = {G(pe)} (inflation does not end by itself: ended abruptly there)");
        if (e.Note.Length > 0) sb.AppendLine($"  note: {e.Note}");
        sb.AppendLine($"  source: {e.Source}");
        return sb.ToString();
    }
}
