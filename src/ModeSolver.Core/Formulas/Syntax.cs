using System.Globalization;

namespace ModeSolver.Formulas;

/// <summary>Kinds of syntax-tree nodes.</summary>
internal enum NodeKind
{
    Number, Constant, Parameter, Variable, Negate,
    Add, Subtract, Multiply, Divide, Power,
    Function, Condition, Piecewise,
}

/// <summary>Built-in functions.</summary>
internal enum Func
{
    Exp, Log, Log10, Sqrt, Sin, Cos, Tan, Sinh, Cosh, Tanh,
    Asin, Acos, Atan, Asinh, Acosh, Atanh, Abs, Step, Min, Max,
}

/// <summary>Comparison operators of piecewise conditions.</summary>
internal enum Relation { Less, LessEqual, Greater, GreaterEqual }

/// <summary>An immutable syntax-tree node.</summary>
internal sealed class Node
{
    public Node(NodeKind kind, int column, Node[] children)
    {
        Kind = kind;
        Column = column;
        Children = children;
        int depth = 0;
        foreach (var c in children) depth = Math.Max(depth, c.Depth);
        Depth = depth + 1;
    }

    public NodeKind Kind { get; }
    /// <summary>1-based column where the node starts (or its operator).</summary>
    public int Column { get; }
    public Node[] Children { get; }
    public int Depth { get; }
    /// <summary>Number value, or the parameter's / constant's value.</summary>
    public double Value { get; init; }
    /// <summary>Name of a parameter, constant or variable.</summary>
    public string Name { get; init; } = "";
    public Func Function { get; init; }
    public Relation Relation { get; init; }
    /// <summary>Index of a variable among the formula's variables (its register).</summary>
    public int Index { get; init; }

    public bool DependsOnVariable
    {
        get
        {
            if (Kind == NodeKind.Variable) return true;
            foreach (var c in Children) if (c.DependsOnVariable) return true;
            return false;
        }
    }
}

/// <summary>Names of the built-in functions and constants.</summary>
internal static class Builtins
{
    public static readonly IReadOnlyDictionary<string, Func> Functions = new Dictionary<string, Func>(StringComparer.Ordinal)
    {
        ["exp"] = Func.Exp, ["log"] = Func.Log, ["ln"] = Func.Log, ["log10"] = Func.Log10, ["sqrt"] = Func.Sqrt,
        ["sin"] = Func.Sin, ["cos"] = Func.Cos, ["tan"] = Func.Tan,
        ["sinh"] = Func.Sinh, ["cosh"] = Func.Cosh, ["tanh"] = Func.Tanh,
        ["asin"] = Func.Asin, ["acos"] = Func.Acos, ["atan"] = Func.Atan,
        ["asinh"] = Func.Asinh, ["acosh"] = Func.Acosh, ["atanh"] = Func.Atanh,
        ["abs"] = Func.Abs, ["step"] = Func.Step, ["min"] = Func.Min, ["max"] = Func.Max,
    };

    public const string PiecewiseName = "piecewise";

    public static string NameOf(Func f) => f switch
    {
        Func.Exp => "exp", Func.Log => "log", Func.Log10 => "log10", Func.Sqrt => "sqrt",
        Func.Sin => "sin", Func.Cos => "cos", Func.Tan => "tan",
        Func.Sinh => "sinh", Func.Cosh => "cosh", Func.Tanh => "tanh",
        Func.Asin => "asin", Func.Acos => "acos", Func.Atan => "atan",
        Func.Asinh => "asinh", Func.Acosh => "acosh", Func.Atanh => "atanh",
        Func.Abs => "abs", Func.Step => "step", Func.Min => "min", Func.Max => "max",
        _ => throw new ArgumentOutOfRangeException(nameof(f)),
    };

    public static int Arity(Func f) => f is Func.Min or Func.Max ? 2 : 1;

    public static bool IsConstant(string name) => name is "pi" or "e";

    public static double ConstantValue(string name) => name == "pi" ? Math.PI : Math.E;

    public static bool IsReserved(string name) => IsConstant(name) || Functions.ContainsKey(name) || name == PiecewiseName;

    public static bool IsIdentifier(string name)
    {
        if (string.IsNullOrEmpty(name)) return false;
        if (!(char.IsAsciiLetter(name[0]) || name[0] == '_')) return false;
        foreach (char ch in name) if (!(char.IsAsciiLetterOrDigit(ch) || ch == '_')) return false;
        return true;
    }
}

internal enum TokenKind
{
    Number, Identifier, LeftParen, RightParen, Comma, Plus, Minus, Star, Slash, Caret,
    Less, LessEqual, Greater, GreaterEqual, End,
}

internal readonly record struct Token(TokenKind Kind, int Start, int Length, double Number, string Text);

/// <summary>Turns formula text into tokens. Throws <see cref="FormulaException"/> on a bad character or number.</summary>
internal static class Lexer
{
    public static List<Token> Tokenize(string text)
    {
        var tokens = new List<Token>();
        int i = 0;
        while (true)
        {
            while (i < text.Length && (text[i] is ' ' or '\t' or '\r' or '\n')) i++;
            if (i >= text.Length)
            {
                tokens.Add(new Token(TokenKind.End, text.Length, 0, 0, ""));
                return tokens;
            }
            char c = text[i];
            int start = i;
            if (char.IsAsciiDigit(c) || (c == '.' && i + 1 < text.Length && char.IsAsciiDigit(text[i + 1])))
            {
                while (i < text.Length && char.IsAsciiDigit(text[i])) i++;
                if (i < text.Length && text[i] == '.')
                {
                    i++;
                    while (i < text.Length && char.IsAsciiDigit(text[i])) i++;
                }
                if (i < text.Length && (text[i] is 'e' or 'E'))
                {
                    int j = i + 1;
                    if (j < text.Length && (text[j] is '+' or '-')) j++;
                    if (j < text.Length && char.IsAsciiDigit(text[j]))
                    {
                        i = j;
                        while (i < text.Length && char.IsAsciiDigit(text[i])) i++;
                    }
                    else if (j > i + 1)
                    {
                        throw Parser.Error(text, j + 1, "digits", $"expected digits in the exponent of '{text[start..j]}'");
                    }
                }
                if (i < text.Length && text[i] == '.')
                    throw Parser.Error(text, i + 1, "an operator", $"unexpected '.' after number '{text[start..i]}'");
                string lexeme = text[start..i];
                double value = double.Parse(lexeme, NumberStyles.Float, CultureInfo.InvariantCulture);
                if (double.IsInfinity(value))
                    throw Parser.Error(text, start + 1, "a finite number", $"number '{lexeme}' is out of range");
                tokens.Add(new Token(TokenKind.Number, start, i - start, value, lexeme));
                continue;
            }
            if (char.IsAsciiLetter(c) || c == '_')
            {
                while (i < text.Length && (char.IsAsciiLetterOrDigit(text[i]) || text[i] == '_')) i++;
                tokens.Add(new Token(TokenKind.Identifier, start, i - start, 0, text[start..i]));
                continue;
            }
            TokenKind kind;
            int len = 1;
            switch (c)
            {
                case '(': kind = TokenKind.LeftParen; break;
                case ')': kind = TokenKind.RightParen; break;
                case ',': kind = TokenKind.Comma; break;
                case '+': kind = TokenKind.Plus; break;
                case '-': kind = TokenKind.Minus; break;
                case '*':
                    if (i + 1 < text.Length && text[i + 1] == '*')
                        throw Parser.Error(text, i + 1, "'^'", "'**' is not an operator; write powers with '^'");
                    kind = TokenKind.Star; break;
                case '/': kind = TokenKind.Slash; break;
                case '^': kind = TokenKind.Caret; break;
                case '<':
                    if (i + 1 < text.Length && text[i + 1] == '=') { kind = TokenKind.LessEqual; len = 2; }
                    else kind = TokenKind.Less;
                    break;
                case '>':
                    if (i + 1 < text.Length && text[i + 1] == '=') { kind = TokenKind.GreaterEqual; len = 2; }
                    else kind = TokenKind.Greater;
                    break;
                case '=':
                    throw Parser.Error(text, i + 1, "'<', '<=', '>' or '>='", "'=' is not supported; conditions use <, <=, > or >=");
                default:
                    string shown = char.IsControl(c) ? $"U+{(int)c:X4}" : c.ToString();
                    throw Parser.Error(text, i + 1, "a number, name, operator or parenthesis", $"unexpected character '{shown}'");
            }
            tokens.Add(new Token(kind, start, len, 0, text.Substring(start, len)));
            i += len;
        }
    }
}
