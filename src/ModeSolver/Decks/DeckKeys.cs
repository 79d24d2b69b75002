using System.Text;
using Tomlyn.Syntax;

namespace ModeSolver.Decks;

/// <summary>
/// TOML's "define once" rules checked on the syntax tree by comparing the keys themselves (ordinal strings, never
/// their hashes): a key defined twice, a table header given twice, a header for a table that dotted keys already made,
/// dotted keys extending a table a header made, a table where a value is, an array of tables mixed with a plain table
/// or value. Duplicate keys inside inline tables are checked the same way.
/// </summary>
internal static class DeckKeys
{
    private enum Def { ImplicitTable, HeaderTable, DottedTable, Value, TableArray }

    private sealed class Scope
    {
        public Dictionary<string, (Def Kind, int Line, int Count)> Defined { get; } = new(StringComparer.Ordinal);
    }

    /// <summary>Throws a one-line <see cref="DeckException"/> at the first key or table that is defined again.</summary>
    public static void Check(DocumentSyntax doc, string sourceName)
    {
        ArgumentNullException.ThrowIfNull(doc);
        var scope = new Scope();
        foreach (var kv in doc.KeyValues) KeyValue(scope, "", kv, sourceName);
        foreach (var table in doc.Tables)
        {
            string current = Header(scope, table, sourceName);
            foreach (var kv in table.Items) KeyValue(scope, current, kv, sourceName);
        }
    }

    private static string Header(Scope scope, TableSyntaxBase table, string file)
    {
        if (table.Name is null) return "";
        var segments = Segments(table.Name);
        int line = Line(table);
        string path = "";
        for (int i = 0; i < segments.Count - 1; i++) path = Descend(scope, path, segments[i], line, file);
        string full = path + Encode(segments[^1]);
        bool array = table is TableArraySyntax;
        string shown = Show(full);
        if (!scope.Defined.TryGetValue(full, out var d))
        {
            scope.Defined[full] = (array ? Def.TableArray : Def.HeaderTable, line, 1);
            return array ? Element(full, 1) : full;
        }
        if (array)
        {
            if (d.Kind != Def.TableArray) throw Twice(file, line, $"[[{shown}]] is an array of tables, but {shown} is already {What(d.Kind)}", d.Line);
            scope.Defined[full] = d with { Count = d.Count + 1 };
            return Element(full, d.Count + 1);
        }
        if (d.Kind != Def.ImplicitTable)
            throw Twice(file, line, d.Kind == Def.HeaderTable ? $"the table [{shown}] is defined twice" : $"the table [{shown}] is already {What(d.Kind)}", d.Line);
        scope.Defined[full] = (Def.HeaderTable, line, 1);
        return full;
    }

    private static void KeyValue(Scope scope, string table, KeyValueSyntax kv, string file)
    {
        if (kv.Key is null) return;
        var segments = Segments(kv.Key);
        int line = Line(kv);
        string path = table;
        for (int i = 0; i < segments.Count - 1; i++)
        {
            string p = path + Encode(segments[i]);
            if (!scope.Defined.TryGetValue(p, out var d)) scope.Defined[p] = (Def.DottedTable, line, 1);
            else if (d.Kind != Def.DottedTable)
                throw Twice(file, line, $"the key {Show(p)} is already {What(d.Kind)} and cannot be extended by dotted keys", d.Line);
            path = p;
        }
        string full = path + Encode(segments[^1]);
        if (scope.Defined.TryGetValue(full, out var old))
            throw Twice(file, line, $"the key {Show(full)} is defined twice", old.Line);
        scope.Defined[full] = (Def.Value, line, 1);
        Value(kv.Value, file);
    }

    private static void Value(ValueSyntax? value, string file)
    {
        switch (value)
        {
            case InlineTableSyntax inline:
                var scope = new Scope();
                foreach (var item in inline.Items)
                    if (item.KeyValue is { } kv) KeyValue(scope, "", kv, file);
                break;
            case ArraySyntax array:
                foreach (var item in array.Items) Value(item.Value, file);
                break;
        }
    }

    private static string Descend(Scope scope, string path, string segment, int line, string file)
    {
        string p = path + Encode(segment);
        if (!scope.Defined.TryGetValue(p, out var d))
        {
            scope.Defined[p] = (Def.ImplicitTable, line, 1);
            return p;
        }
        return d.Kind switch
        {
            Def.TableArray => Element(p, d.Count),
            Def.Value => throw Twice(file, line, $"the key {Show(p)} is a value, not a table", d.Line),
            _ => p,
        };
    }

    private static List<string> Segments(KeySyntax key)
    {
        var list = new List<string> { Text(key.Key) };
        foreach (var dot in key.DotKeys) list.Add(Text(dot.Key));
        return list;
    }

    private static string Text(BareKeyOrStringValueSyntax? key) => key switch
    {
        BareKeySyntax b => b.Key?.Text ?? "",
        StringValueSyntax s => s.Value ?? "",
        _ => "",
    };

    // Segments are length-prefixed so that no key text can imitate a separator.
    private static string Encode(string segment) => segment.Length.ToString(System.Globalization.CultureInfo.InvariantCulture) + ":" + segment;

    private static string Element(string path, int index) => path + "[" + index.ToString(System.Globalization.CultureInfo.InvariantCulture) + "]";

    private static string Show(string encoded)
    {
        var sb = new StringBuilder();
        int i = 0;
        while (i < encoded.Length)
        {
            if (encoded[i] == '[') { i = encoded.IndexOf(']', i) + 1; continue; } // an array element: shown by its name
            int colon = encoded.IndexOf(':', i);
            int n = int.Parse(encoded.AsSpan(i, colon - i), System.Globalization.CultureInfo.InvariantCulture);
            if (sb.Length > 0) sb.Append('.');
            sb.Append(encoded, colon + 1, n);
            i = colon + 1 + n;
        }
        return sb.ToString();
    }

    private static string What(Def kind) => kind switch
    {
        Def.ImplicitTable => "a table (made by a header below it)",
        Def.HeaderTable => "a table with its own header",
        Def.DottedTable => "a table made by dotted keys",
        Def.Value => "a value",
        _ => "an array of tables",
    };

    private static DeckException Twice(string file, int line, string problem, int firstLine) =>
        new(DeckErrors.OneLine($"{file}:{line}: {problem} (first on line {firstLine})"), null, file, line);

    private static int Line(SyntaxNode node) => node.Span.Start.Line + 1;
}
