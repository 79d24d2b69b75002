using ModeSolver.Physics;

namespace ModeSolver.Formulas;

/// <summary>
/// A formula could not be parsed or resolved. <see cref="Exception.Message"/> is one line, e.g.
/// <c>formula error at column 7: expected ')' after 'sin(phi'</c>; <see cref="Pointer"/> gives the text with a caret under the column.
/// </summary>
public sealed class FormulaException : ModeSolverException
{
    /// <summary>Creates the exception.</summary>
    /// <param name="text">The formula text.</param>
    /// <param name="column">1-based column of the problem, or 0 when it concerns no single position.</param>
    /// <param name="expected">What was expected there (may be empty).</param>
    /// <param name="message">The one-line message.</param>
    public FormulaException(string text, int column, string expected, string message) : base(message)
    {
        Text = text;
        Column = column;
        Expected = expected;
    }

    /// <inheritdoc/>
    public override int ExitCode => ExitCodes.Input;

    /// <summary>The formula text.</summary>
    public string Text { get; }

    /// <summary>1-based column of the problem (0 when the problem has no single position).</summary>
    public int Column { get; }

    /// <summary>What the parser expected at <see cref="Column"/> (empty when not applicable).</summary>
    public string Expected { get; }

    /// <summary>
    /// Two lines: the formula (a window of it when long) and a caret under <see cref="Column"/>.
    /// When <see cref="Column"/> is 0 only the text line is given.
    /// </summary>
    public string Pointer
    {
        get
        {
            const int Window = 72;
            string flat = Flatten(Text);
            if (Column <= 0) return flat.Length <= Window ? flat : flat[..Window] + "...";
            int col0 = Math.Min(Column - 1, flat.Length);
            int start = 0;
            string prefix = "";
            if (flat.Length > Window && col0 > Window / 2)
            {
                start = Math.Min(col0 - Window / 2, Math.Max(0, flat.Length - Window));
                prefix = "...";
            }
            int end = Math.Min(flat.Length, start + Window);
            string suffix = end < flat.Length ? "..." : "";
            string line = prefix + flat[start..end] + suffix;
            return line + "\n" + new string(' ', prefix.Length + col0 - start) + "^";
        }
    }

    private static string Flatten(string s)
    {
        var chars = s.ToCharArray();
        for (int i = 0; i < chars.Length; i++)
            if (char.IsControl(chars[i])) chars[i] = ' ';
        return new string(chars);
    }
}
