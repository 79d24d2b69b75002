using CsCheck;
using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Tests.Reliability;

/// <summary>
/// Fuzzing beyond the formula stage's own property tests (which draw from the formula alphabet): single-character
/// edits of real model formulas, any characters at all (control, non-ASCII), deep nesting; and the same texts through
/// the settings resolver, where every failure must be a one-line <see cref="DeckException"/> (exit code 2).
/// </summary>
public class FormulaFuzzTests
{
    private static readonly string[] Seeds = ModelCatalogue.All.Select(e => e.Potential)
        .Concat(ModelCatalogue.All.Where(e => e.Coupling is not null).Select(e => e.Coupling!))
        .Concat(ModelCatalogue.All.Where(e => e.Kinetic is not null).Select(e => e.Kinetic!))
        .ToArray();

    private static readonly Dictionary<string, double> Parameters = ModelCatalogue.All
        .SelectMany(e => e.Parameters).GroupBy(p => p.Name).ToDictionary(g => g.Key, g => g.First().Value);

    private const string Alphabet = "phi0123456789.eE+-*/^(),<>= abcdfgklmnorstuvwxyz_\t$#[]{}\"'\\;:!?&|~%@é∞²";

    /// <summary>A catalogue formula with 1-3 characters deleted, inserted or replaced.</summary>
    private static readonly Gen<string> Mutated =
        Gen.Select(Gen.Int[0, Seeds.Length - 1], Gen.Select(Gen.Int[0, 2], Gen.Int[0, 10_000], Gen.Char[Alphabet]).Array[1, 3], (i, edits) =>
        {
            var s = new System.Text.StringBuilder(Seeds[i]);
            foreach (var (kind, at, c) in edits)
            {
                int pos = s.Length == 0 ? 0 : at % (s.Length + 1);
                switch (kind)
                {
                    case 0 when pos < s.Length: s.Remove(pos, 1); break;
                    case 1: s.Insert(pos, c); break;
                    default: if (pos < s.Length) s[pos] = c; else s.Append(c); break;
                }
            }
            return s.ToString();
        });

    /// <summary>Any characters at all, control and non-ASCII included.</summary>
    private static readonly Gen<string> AnyText = Gen.Char.Array[0, 30].Select(a => new string(a));

    private static void CheckFormula(string text)
    {
        try
        {
            var f = Formula.Parse(text, Parameters);
            f.Evaluate(0.7);
        }
        catch (FormulaException ex)
        {
            Assert.DoesNotContain('\n', ex.Message);
            Assert.DoesNotContain('\r', ex.Message);
            Assert.InRange(ex.Column, 0, text.Length + 1);
            if (ex.Column > 0) Assert.Contains($"column {ex.Column}", ex.Message);
        }
    }

    [Fact]
    public void MutatedCatalogueFormulasOnlyEverThrowFormulaException() => Mutated.Sample(CheckFormula, iter: 3000);

    [Fact]
    public void ArbitraryTextOnlyEverThrowsFormulaException() => AnyText.Sample(CheckFormula, iter: 2000);

    [Theory]
    [InlineData(150)]
    [InlineData(5000)]
    public void DeepNestingIsAnErrorNotACrash(int depth)
    {
        string text = new string('(', depth) + "phi" + new string(')', depth);
        if (depth <= 150) Assert.Equal(0.5, Formula.Parse(text).Value(0.5));
        else
        {
            var ex = Assert.Throws<FormulaException>(() => Formula.Parse(text));
            Assert.DoesNotContain('\n', ex.Message);
        }
    }

    [Fact]
    public void MutatedPotentialsThroughTheResolverFailAsOneLineDeckErrors()
    {
        Mutated.Sample(text =>
        {
            var input = new RunInput { Potential = new Located<string>(text, "--potential"), Phi0 = new Located<double>(0.7, "--phi0") };
            foreach (var (name, value) in Parameters) input.Parameters[name] = new Located<double>(value, "--param " + name);
            try
            {
                SettingsResolver.Resolve(input);
            }
            catch (DeckException ex)
            {
                Assert.DoesNotContain('\n', ex.Message);
                Assert.StartsWith("--", ex.Message);
            }
        }, iter: 400);
    }
}
