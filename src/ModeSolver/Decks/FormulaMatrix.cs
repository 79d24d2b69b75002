using System.Text;

namespace ModeSolver.Decks;

/// <summary>
/// The text form of a matrix of formulas (the field-space metric of a several-field model): rows separated by ';',
/// entries by ',', both only outside parentheses (so <c>min(a, b)</c> stays one entry), e.g. <c>1, 0; 0, exp(2*b*phi)</c>.
/// A deck's array of arrays of strings is kept in this form; the command line gives it directly.
/// </summary>
public static class FormulaMatrix
{
    /// <summary>The text form of <paramref name="rows"/>.</summary>
    public static string Format(IReadOnlyList<IReadOnlyList<string>> rows)
    {
        ArgumentNullException.ThrowIfNull(rows);
        var sb = new StringBuilder();
        for (int i = 0; i < rows.Count; i++)
        {
            if (i > 0) sb.Append("; ");
            sb.Append(string.Join(", ", rows[i]));
        }
        return sb.ToString();
    }

    /// <summary>The rows of the text form (entries trimmed; an empty entry stays empty so that the resolver can name it).</summary>
    public static IReadOnlyList<IReadOnlyList<string>> Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var rows = new List<IReadOnlyList<string>>();
        var row = new List<string>();
        var entry = new StringBuilder();
        int depth = 0;
        foreach (char c in text)
        {
            if (c == '(') depth++;
            else if (c == ')') depth--;
            if (depth == 0 && (c == ',' || c == ';'))
            {
                row.Add(entry.ToString().Trim());
                entry.Clear();
                if (c == ';')
                {
                    rows.Add(row);
                    row = [];
                }
                continue;
            }
            entry.Append(c);
        }
        row.Add(entry.ToString().Trim());
        rows.Add(row);
        return rows;
    }
}
