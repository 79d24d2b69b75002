using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

/// <summary>
/// The fused Jordan-frame program (V and K composed symbolically, one generated program) against the Taylor-arithmetic
/// frame map on the inputs' derivatives, which FrameTests checks against closed forms (Bezrukov &amp; Shaposhnikov 2008).
/// </summary>
public class FusedFrameTests
{
    private static void Close(Jet3 expected, Jet3 actual, double tol, string what)
    {
        double[] e = [expected.Value, expected.D1, expected.D2, expected.D3], a = [actual.Value, actual.D1, actual.D2, actual.D3];
        double scale = 0;
        foreach (double x in e) scale = Math.Max(scale, Math.Abs(x));
        for (int i = 0; i < 4; i++)
            Assert.True(Math.Abs(a[i] - e[i]) <= tol * Math.Max(Math.Abs(e[i]), 1e-3 * scale) + 1e-300,
                $"{what} order {i}: expected {e[i]:R}, got {a[i]:R}");
    }

    public static TheoryData<string, string?, string, bool, double> Theories => new()
    {
        { "1 + xi * phi^2", null, "lambda * phi^4 / 4", false, 0.3 },
        { "1 + xi * phi^2", null, "lambda * phi^4 / 4", true, 2.0 },
        { "1 + xi * phi^2", null, "lambda * phi^4 / 4", false, -0.05 },
        { "exp(-phi / 3) + 0.2 * sin(phi)", "1 + phi^2 / 10", "lambda * tanh(phi)^2 * cosh(phi / 4)", false, 0.8 },
        { "sqrt(2 + phi^2) / sqrt(2)", "1 / (1 + xi * phi^2)", "lambda * (1 - exp(-phi))^2 * log(3 + phi^2)", false, 1.3 },
        { "(1 + xi * phi^2)^1.5", null, "lambda * phi^2 * atan(phi) + lambda * asinh(phi)", false, 0.6 },
        { "1 + xi * phi^2 + 0.01 * phi^4", "2 - tanh(phi)", "lambda * phi^4 * 2^phi", true, 0.9 },
    };

    [Theory]
    [MemberData(nameof(Theories))]
    public void FusedProgramMatchesTaylorArithmetic(string omega2, string? kinetic, string potential, bool palatini, double phi)
    {
        var pars = new Dictionary<string, double> { ["xi"] = 50.0, ["lambda"] = 0.1 };
        var w = Formula.Parse(omega2, pars);
        var kj = kinetic is null ? null : Formula.Parse(kinetic, pars);
        var vj = Formula.Parse(potential, pars);
        var fused = JordanFrameTheory.FromFormulas(w, kj, vj, palatini);
        var reference = new JordanFrameTheory(TheoryFactory.Wrap(w), kj is null ? null : TheoryFactory.Wrap(kj), TheoryFactory.Wrap(vj), palatini);
        Assert.True(fused.IsFused);
        foreach (double x in new[] { phi, 0.5 * phi, 1.7 * phi })
        {
            var jets = fused.Jets(x);
            // Two exact-derivative routes to the same numbers: they differ by rounding only.
            Close(reference.ComposedPotential(x), jets.Potential, 1e-11, $"V at {x}");
            Close(reference.ComposedKinetic(x), jets.Kinetic, 1e-11, $"K at {x}");
            Assert.Equal(jets.Potential, fused.Potential(x));
            Assert.Equal(jets.Kinetic, fused.Kinetic(x));
        }
    }

    [Fact]
    public void GeneratedCodeEqualsTheInterpreterBitForBit()
    {
        var pars = new Dictionary<string, double> { ["xi"] = 300.0, ["lambda"] = 0.01 };
        var program = FrameMapProgram.TryCreate(Formula.Parse("1 + xi * phi^2", pars), Formula.Parse("1 + phi^2", pars),
            Formula.Parse("lambda * phi^4 / 4 * exp(-phi)", pars), palatini: false);
        Assert.NotNull(program);
        if (!program.IsGenerated) return; // a runtime without dynamic code: only the interpreter exists
        for (double x = -2; x <= 2; x += 0.173)
            Assert.Equal(program.Interpret(x), program.Evaluate(x));
    }

    [Theory]
    [InlineData("1 + xi * abs(phi)^2")]
    [InlineData("piecewise(phi < 1, 1 + xi * phi^2, 1 + xi)")]
    [InlineData("max(1, xi * phi^2)")]
    public void NonSmoothFormulasKeepTheTaylorPath(string omega2)
    {
        var pars = new Dictionary<string, double> { ["xi"] = 5.0 };
        var theory = JordanFrameTheory.FromFormulas(Formula.Parse(omega2, pars), null, Formula.Parse("phi^4", pars));
        Assert.False(theory.IsFused);
        Assert.True(double.IsFinite(theory.Jets(0.7).Kinetic.D3));
    }

    [Fact]
    public void CatalogueJordanModelsRunFused()
    {
        foreach (string id in new[] { "higgs-like", "higgs-like-palatini" })
        {
            var e = ModelCatalogue.Get(id);
            var spec = new ModelSpec(e.Id, e.Potential, e.Kinetic, e.Coupling, e.Palatini, e.DefaultParameters, e.PhiEnd);
            var theory = Assert.IsType<JordanFrameTheory>(TheoryFactory.Build(spec));
            Assert.True(theory.IsFused, id);
        }
    }
}
