namespace ModeSolver.Formulas;

/// <summary>
/// The switching arguments of a formula in several variables: for every abs(x) and step(x) the argument x, for every
/// min(a, b), max(a, b) and piecewise condition a &lt; b the difference a - b, as formula text with the parameters'
/// values written in (so the text parses with the variables alone). Their zero sets are the surfaces where the formula
/// may fail to be smooth (the n-field form of <see cref="Formula.NonSmoothPoints"/>). Only arguments that depend on a
/// variable are listed, each once.
/// </summary>
public static class SwitchingArguments
{
    /// <summary>The switching arguments of <paramref name="text"/> in <paramref name="variables"/>; throws <see cref="FormulaException"/> as <see cref="Formula.Compile"/>.</summary>
    public static IReadOnlyList<string> Of(string text, IReadOnlyList<string> variables, IReadOnlyDictionary<string, double>? parameters = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(variables);
        var (root, _, _) = Formula.Resolve(text, variables, parameters);
        var found = new List<string>();
        Walk(root, found);
        return found;
    }

    private static void Walk(Node node, List<string> found)
    {
        foreach (var c in node.Children) Walk(c, found);
        Node? g = null;
        if (node.Kind == NodeKind.Function && node.Function is Func.Abs or Func.Step)
            g = node.Children[0];
        else if ((node.Kind == NodeKind.Function && node.Function is Func.Min or Func.Max) || node.Kind == NodeKind.Condition)
            g = new Node(NodeKind.Subtract, node.Column, [node.Children[0], node.Children[1]]);
        if (g is null || !g.DependsOnVariable) return;
        string printed = Printer.Print(g, inlineParameters: true);
        if (!found.Contains(printed)) found.Add(printed);
    }
}
