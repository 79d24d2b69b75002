using System.Globalization;
using System.Text;

namespace ModeSolver.Formulas;

/// <summary>Prints a syntax tree as canonical text that parses back to the same tree.</summary>
internal static class Printer
{
    // Precedence levels: 1 sum, 2 product, 4 power, 5 atom. A negation (or negative number) counts as level 1
    // so that it is parenthesised everywhere except at the start of a sum: "a*(-b)", "2^(-1)", "-x + y".
    public static string Print(Node node, bool inlineParameters)
    {
        var sb = new StringBuilder();
        Write(sb, node, 0, inlineParameters);
        return sb.ToString();
    }

    public static string FormatNumber(double x) => x.ToString("R", CultureInfo.InvariantCulture);

    private static void Write(StringBuilder sb, Node node, int minLevel, bool inline)
    {
        switch (node.Kind)
        {
            case NodeKind.Number:
                WriteNumber(sb, node.Value, minLevel);
                return;
            case NodeKind.Parameter when inline:
                WriteNumber(sb, node.Value, minLevel);
                return;
            case NodeKind.Parameter:
            case NodeKind.Variable:
            case NodeKind.Constant:
                sb.Append(node.Name);
                return;
            case NodeKind.Negate:
                Wrap(sb, minLevel > 1, () => { sb.Append('-'); Write(sb, node.Children[0], 4, inline); });
                return;
            case NodeKind.Add:
            case NodeKind.Subtract:
                Wrap(sb, minLevel > 1, () =>
                {
                    Write(sb, node.Children[0], 1, inline);
                    sb.Append(node.Kind == NodeKind.Add ? " + " : " - ");
                    Write(sb, node.Children[1], 2, inline);
                });
                return;
            case NodeKind.Multiply:
            case NodeKind.Divide:
                Wrap(sb, minLevel > 2, () =>
                {
                    Write(sb, node.Children[0], 2, inline);
                    sb.Append(node.Kind == NodeKind.Multiply ? '*' : '/');
                    Write(sb, node.Children[1], 3, inline);
                });
                return;
            case NodeKind.Power:
                Wrap(sb, minLevel > 4, () =>
                {
                    Write(sb, node.Children[0], 5, inline);
                    sb.Append('^');
                    Write(sb, node.Children[1], 4, inline);
                });
                return;
            case NodeKind.Function:
                sb.Append(Builtins.NameOf(node.Function)).Append('(');
                WriteList(sb, node.Children, inline);
                sb.Append(')');
                return;
            case NodeKind.Piecewise:
                sb.Append(Builtins.PiecewiseName).Append('(');
                WriteList(sb, node.Children, inline);
                sb.Append(')');
                return;
            case NodeKind.Condition:
                Write(sb, node.Children[0], 1, inline);
                sb.Append(node.Relation switch
                {
                    Relation.Less => " < ",
                    Relation.LessEqual => " <= ",
                    Relation.Greater => " > ",
                    _ => " >= ",
                });
                Write(sb, node.Children[1], 1, inline);
                return;
        }
    }

    private static void WriteList(StringBuilder sb, Node[] items, bool inline)
    {
        for (int i = 0; i < items.Length; i++)
        {
            if (i > 0) sb.Append(", ");
            Write(sb, items[i], 0, inline);
        }
    }

    private static void WriteNumber(StringBuilder sb, double x, int minLevel)
    {
        bool negative = x < 0 || (x == 0 && double.IsNegative(x));
        if (negative && minLevel > 1) sb.Append('(').Append(FormatNumber(x)).Append(')');
        else sb.Append(FormatNumber(x));
    }

    private static void Wrap(StringBuilder sb, bool parens, Action write)
    {
        if (parens) sb.Append('(');
        write();
        if (parens) sb.Append(')');
    }
}
