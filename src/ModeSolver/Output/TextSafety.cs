using System.Text;

namespace ModeSolver.Output;

/// <summary>
/// Text from decks and the command line (keys, values, titles, formulas, paths) made safe to echo: every control
/// character (C0, DEL, C1), line or paragraph separator and bidirectional override is shown as <c>U+XXXX</c>, the
/// form formula errors use, so that nothing a deck contains can move the cursor, recolour or rewrite a terminal, or
/// split a message into several lines.
/// </summary>
public static class TextSafety
{
    /// <summary>The text with unsafe characters shown as <c>U+XXXX</c>; line breaks become spaces first when <paramref name="oneLine"/>.</summary>
    public static string Printable(string? text, bool oneLine = true)
    {
        if (string.IsNullOrEmpty(text)) return text ?? "";
        int i = 0;
        while (i < text.Length && !IsUnsafe(text[i])) i++;
        if (i == text.Length) return text;
        var sb = new StringBuilder(text.Length + 16).Append(text, 0, i);
        for (; i < text.Length; i++)
        {
            char c = text[i];
            if (oneLine && c is '\n' or '\r') sb.Append(' ');
            else if (!oneLine && c is '\n') sb.Append(c);
            else if (IsUnsafe(c)) sb.Append("U+").Append(((int)c).ToString("X4", System.Globalization.CultureInfo.InvariantCulture));
            else sb.Append(c);
        }
        return sb.ToString();
    }

    /// <summary>True for characters that are never echoed as they are (a tab is shown as U+0009 too).</summary>
    public static bool IsUnsafe(char c) =>
        char.IsControl(c) || c is '\u2028' or '\u2029' or (>= '\u202A' and <= '\u202E') or (>= '\u2066' and <= '\u2069') or '\u200E' or '\u200F' or '\u061C';
}
