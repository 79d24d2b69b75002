namespace ModeSolver.Formulas;

/// <summary>
/// Recursive-descent parser. Grammar (lowest precedence first):
/// <code>
/// expr    := term (('+' | '-') term)*
/// term    := unary (('*' | '/') unary)*
/// unary   := ('-' | '+') unary | power
/// power   := primary ('^' unary)?            (right-associative; -x^2 = -(x^2), 2^-1 allowed)
/// primary := number | name | name '(' args ')' | '(' expr ')'
/// piecewise(cond, value, cond, value, ..., else), cond := expr ('&lt;' | '&lt;=' | '&gt;' | '&gt;=') expr
/// </code>
/// </summary>
internal sealed class Parser
{
    public const int MaxLength = 10_000;
    public const int MaxNesting = 200;
    public const int MaxTreeDepth = 1_000;

    private readonly string _text;
    private readonly List<Token> _tokens;
    private readonly IReadOnlyList<string> _variables;
    private readonly IReadOnlyDictionary<string, double>? _parameters;
    private readonly bool _resolve;
    private int _pos;
    private int _nesting;

    /// <summary>Names other than the variable, constants and functions, in order of first use, with the column of first use.</summary>
    public List<(string Name, int Column)> Names { get; } = new();

    private Parser(string text, IReadOnlyList<string> variables, IReadOnlyDictionary<string, double>? parameters, bool resolve)
    {
        _text = text;
        _variables = variables;
        _parameters = parameters;
        _resolve = resolve;
        if (text.Length > MaxLength)
            throw Error(text, MaxLength + 1, "a shorter formula", $"formula is {text.Length} characters long (limit {MaxLength})");
        _tokens = Lexer.Tokenize(text);
    }

    /// <summary>Parses the text; names that are neither the variable, a constant nor a parameter are collected in <see cref="Names"/> as Parameter nodes with value NaN.</summary>
    public static (Node Root, List<(string Name, int Column)> Names) ParseTree(
        string text, string variable, IReadOnlyDictionary<string, double>? parameters)
        => ParseTree(text, [variable], parameters);

    /// <summary>As <see cref="ParseTree(string, string, IReadOnlyDictionary{string, double})"/> with several variables (variable i is register i).</summary>
    public static (Node Root, List<(string Name, int Column)> Names) ParseTree(
        string text, IReadOnlyList<string> variables, IReadOnlyDictionary<string, double>? parameters)
    {
        var p = new Parser(text, variables, parameters, resolve: true);
        var root = p.ParseAll();
        return (root, p.Names);
    }

    /// <summary>Parses only to collect names (no parameters needed).</summary>
    public static List<(string Name, int Column)> CollectNames(string text, string variable) => CollectNames(text, [variable]);

    /// <summary>Parses only to collect names other than the <paramref name="variables"/>.</summary>
    public static List<(string Name, int Column)> CollectNames(string text, IReadOnlyList<string> variables)
    {
        var p = new Parser(text, variables, null, resolve: false);
        p.ParseAll();
        return p.Names;
    }

    internal static FormulaException Error(string text, int column, string expected, string what)
        => new(text, column, expected, $"formula error at column {column}: {what}");

    private Node ParseAll()
    {
        if (_tokens[0].Kind == TokenKind.End)
            throw Error(_text, 1, "an expression", "formula is empty");
        var node = ParseExpression();
        var t = Peek;
        if (t.Kind != TokenKind.End)
        {
            if (IsRelation(t.Kind))
                throw Error(_text, t.Start + 1, "an operator or the end of the formula",
                    $"comparison '{t.Text}' is only allowed as a condition inside piecewise(...)");
            if (t.Kind == TokenKind.RightParen)
                throw Error(_text, t.Start + 1, "an operator or the end of the formula", $"unmatched ')' after '{Before(t.Start)}'");
            throw Error(_text, t.Start + 1, "an operator or the end of the formula",
                $"expected an operator or the end of the formula after '{Before(t.Start)}', found '{t.Text}'");
        }
        return node;
    }

    private Token Peek => _tokens[_pos];

    private Token Next() => _tokens[_pos++];

    private string Before(int index)
    {
        string s = _text[..Math.Min(index, _text.Length)].TrimEnd();
        return s.Length <= 30 ? s : "..." + s[^30..];
    }

    private static bool IsRelation(TokenKind k) => k is TokenKind.Less or TokenKind.LessEqual or TokenKind.Greater or TokenKind.GreaterEqual;

    private void Enter(int column)
    {
        if (++_nesting > MaxNesting)
            throw Error(_text, column, "less nesting", $"formula nested too deeply (limit {MaxNesting} levels)");
    }

    private Node Make(NodeKind kind, int column, params Node[] children) => Check(new Node(kind, column, children));

    private Node Check(Node node)
    {
        int column = node.Column;
        if (node.Depth > MaxTreeDepth)
            throw Error(_text, column, "fewer chained operations", $"formula has too many chained operations (limit {MaxTreeDepth})");
        return node;
    }

    private Node ParseExpression()
    {
        var left = ParseTerm();
        while (Peek.Kind is TokenKind.Plus or TokenKind.Minus)
        {
            var op = Next();
            var right = ParseTerm();
            left = Make(op.Kind == TokenKind.Plus ? NodeKind.Add : NodeKind.Subtract, op.Start + 1, left, right);
        }
        return left;
    }

    private Node ParseTerm()
    {
        var left = ParseUnary();
        while (Peek.Kind is TokenKind.Star or TokenKind.Slash)
        {
            var op = Next();
            var right = ParseUnary();
            left = Make(op.Kind == TokenKind.Star ? NodeKind.Multiply : NodeKind.Divide, op.Start + 1, left, right);
        }
        return left;
    }

    private Node ParseUnary()
    {
        var t = Peek;
        if (t.Kind is TokenKind.Minus or TokenKind.Plus)
        {
            Next();
            Enter(t.Start + 1);
            var operand = ParseUnary();
            _nesting--;
            return t.Kind == TokenKind.Minus ? Make(NodeKind.Negate, t.Start + 1, operand) : operand;
        }
        return ParsePower();
    }

    private Node ParsePower()
    {
        var baseNode = ParsePrimary();
        if (Peek.Kind == TokenKind.Caret)
        {
            var op = Next();
            Enter(op.Start + 1);
            var exponent = ParseUnary();
            _nesting--;
            return Make(NodeKind.Power, op.Start + 1, baseNode, exponent);
        }
        return baseNode;
    }

    private Node ParsePrimary()
    {
        var t = Next();
        switch (t.Kind)
        {
            case TokenKind.Number:
                return new Node(NodeKind.Number, t.Start + 1, []) { Value = t.Number };
            case TokenKind.LeftParen:
            {
                Enter(t.Start + 1);
                var inner = ParseExpression();
                _nesting--;
                Expect(TokenKind.RightParen, "')'", inner);
                return inner;
            }
            case TokenKind.Identifier:
                return ParseName(t);
            case TokenKind.End:
                throw Error(_text, t.Start + 1, "an operand", _pos == 1 ? "formula is empty"
                    : $"expected an operand after '{Before(t.Start)}', found the end of the formula");
            default:
                throw Error(_text, t.Start + 1, "an operand",
                    _pos == 1 ? $"expected an operand at the start, found '{t.Text}'"
                              : $"expected an operand after '{Before(t.Start)}', found '{t.Text}'");
        }
    }

    private void Expect(TokenKind kind, string what, Node? _)
    {
        var t = Peek;
        if (t.Kind == kind) { Next(); return; }
        string found = t.Kind == TokenKind.End ? "the end of the formula" : $"'{t.Text}'";
        if (IsRelation(t.Kind))
            throw Error(_text, t.Start + 1, what, $"comparison '{t.Text}' is only allowed as a condition inside piecewise(...)");
        throw Error(_text, t.Start + 1, what, $"expected {what} after '{Before(t.Start)}', found {found}");
    }

    private Node ParseName(Token t)
    {
        string name = t.Text;
        int column = t.Start + 1;
        bool call = Peek.Kind == TokenKind.LeftParen;
        if (name == Builtins.PiecewiseName)
        {
            if (!call) throw Error(_text, column + name.Length, "'('", $"expected '(' after '{name}'");
            return ParsePiecewise(column);
        }
        if (Builtins.Functions.TryGetValue(name, out var f))
        {
            if (!call) throw Error(_text, column + name.Length, "'('", $"expected '(' after function name '{name}'");
            var args = ParseArguments(column, name, conditionsAllowed: false);
            int arity = Builtins.Arity(f);
            if (args.Count != arity)
                throw Error(_text, column, $"{arity} argument(s)",
                    $"function '{name}' takes {arity} argument{(arity == 1 ? "" : "s")}, got {args.Count}");
            return Check(new Node(NodeKind.Function, column, args.ToArray()) { Function = f });
        }
        if (call)
            throw Error(_text, column, "a known function",
                $"unknown function '{name}' (functions: {string.Join(", ", Builtins.Functions.Keys)}, piecewise)");
        for (int i = 0; i < _variables.Count; i++)
            if (name == _variables[i])
                return new Node(NodeKind.Variable, column, []) { Name = name, Index = i };
        if (Builtins.IsConstant(name))
            return new Node(NodeKind.Constant, column, []) { Name = name, Value = Builtins.ConstantValue(name) };
        if (!Names.Exists(n => n.Name == name)) Names.Add((name, column));
        double value = double.NaN;
        if (_resolve && _parameters != null && _parameters.TryGetValue(name, out var v)) value = v;
        return new Node(NodeKind.Parameter, column, []) { Name = name, Value = value };
    }

    private List<Node> ParseArguments(int column, string name, bool conditionsAllowed)
    {
        var open = Next(); // '('
        Enter(open.Start + 1);
        var args = new List<Node>();
        if (Peek.Kind == TokenKind.RightParen)
            throw Error(_text, Peek.Start + 1, "an argument", $"expected an argument after '{Before(Peek.Start)}'");
        while (true)
        {
            var arg = ParseExpression();
            if (IsRelation(Peek.Kind))
            {
                var rel = Next();
                if (!conditionsAllowed)
                    throw Error(_text, rel.Start + 1, "',' or ')'",
                        $"comparison '{rel.Text}' is only allowed as a condition inside piecewise(...)");
                var right = ParseExpression();
                var relation = rel.Kind switch
                {
                    TokenKind.Less => Relation.Less,
                    TokenKind.LessEqual => Relation.LessEqual,
                    TokenKind.Greater => Relation.Greater,
                    _ => Relation.GreaterEqual,
                };
                arg = Check(new Node(NodeKind.Condition, arg.Column, [arg, right]) { Relation = relation });
                if (IsRelation(Peek.Kind))
                    throw Error(_text, Peek.Start + 1, "',' or ')'", "chained comparisons are not supported; use one comparison per condition");
            }
            args.Add(arg);
            var t = Peek;
            if (t.Kind == TokenKind.Comma) { Next(); continue; }
            if (t.Kind == TokenKind.RightParen) { Next(); break; }
            string found = t.Kind == TokenKind.End ? "the end of the formula" : $"'{t.Text}'";
            throw Error(_text, t.Start + 1, "')'", $"expected ')' after '{Before(t.Start)}', found {found}");
        }
        _nesting--;
        return args;
    }

    private Node ParsePiecewise(int column)
    {
        var args = ParseArguments(column, Builtins.PiecewiseName, conditionsAllowed: true);
        if (args.Count < 3 || args.Count % 2 == 0)
            throw Error(_text, column, "piecewise(condition, value, ..., otherwise)",
                $"piecewise takes pairs of condition and value followed by one otherwise-value (an odd count of at least 3 arguments), got {args.Count}");
        for (int i = 0; i < args.Count; i++)
        {
            bool shouldBeCondition = i % 2 == 0 && i < args.Count - 1;
            bool isCondition = args[i].Kind == NodeKind.Condition;
            if (shouldBeCondition && !isCondition)
                throw Error(_text, args[i].Column, "a condition such as 'phi > 1'",
                    $"piecewise argument {i + 1} must be a condition (a < b, a <= b, a > b or a >= b)");
            if (!shouldBeCondition && isCondition)
                throw Error(_text, args[i].Column, "a value",
                    $"piecewise argument {i + 1} must be a value, not a condition");
        }
        return Make(NodeKind.Piecewise, column, args.ToArray());
    }
}
