using System.Text.RegularExpressions;

namespace ModeSolver.Tests.Output;

/// <summary>The text elements of an SVG file as plain strings (the renderer indents their content).</summary>
internal static partial class SvgText
{
    public static IReadOnlyList<string> Of(string svg) =>
        [.. TextElement().Matches(svg).Select(m => System.Net.WebUtility.HtmlDecode(m.Groups[1].Value).Trim())];

    [GeneratedRegex(@"<text[^>]*>(.*?)</text>", RegexOptions.Singleline)]
    private static partial Regex TextElement();
}
