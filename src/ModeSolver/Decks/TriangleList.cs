using System.Globalization;

namespace ModeSolver.Decks;

/// <summary>
/// The `[bispectrum] triangles` setting: words "k1:k2:k3" (1/Mpc), checked here (positive, finite, closing) and kept in
/// the settings as one canonical text so that equal settings compare equal.
/// </summary>
public static class TriangleList
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>The canonical text of <paramref name="words"/>, or a <see cref="DeckException"/> naming the key and the bad word.</summary>
    public static string Canonical(Located<IReadOnlyList<string>> words)
    {
        var parts = new List<string>();
        foreach (string w in words.Value)
        {
            var (a, b, c) = ParseOne(w) ?? throw words.Error($"has '{w}', which is not a triangle k1:k2:k3 of three positive wavenumbers in 1/Mpc whose largest is at most the sum of the other two");
            parts.Add(string.Create(Inv, $"{a:R}:{b:R}:{c:R}"));
        }
        if (parts.Count == 0) throw words.Error("is empty (give triangles as \"k1:k2:k3\" in 1/Mpc)");
        if (parts.Count > 1000) throw words.Error($"has {parts.Count} triangles (at most 1000)");
        return string.Join(",", parts);
    }

    /// <summary>The triangles of a canonical text (empty for null).</summary>
    public static IReadOnlyList<(double K1, double K2, double K3)> Parse(string? text)
    {
        var list = new List<(double, double, double)>();
        if (string.IsNullOrEmpty(text)) return list;
        foreach (string w in text.Split(','))
            if (ParseOne(w) is { } t) list.Add(t);
        return list;
    }

    private static (double, double, double)? ParseOne(string word)
    {
        var p = word.Split(':', StringSplitOptions.TrimEntries);
        if (p.Length != 3) return null;
        if (!double.TryParse(p[0], NumberStyles.Float, Inv, out double a) || !double.TryParse(p[1], NumberStyles.Float, Inv, out double b)
            || !double.TryParse(p[2], NumberStyles.Float, Inv, out double c)) return null;
        if (!(a > 0 && b > 0 && c > 0) || !double.IsFinite(a + b + c)) return null;
        double max = Math.Max(a, Math.Max(b, c));
        return max <= (a + b + c - max) * (1 + 1e-12) ? (a, b, c) : null;
    }
}
