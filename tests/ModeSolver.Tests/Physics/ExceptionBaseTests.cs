using System.Reflection;
using ModeSolver.Decks;
using ModeSolver.Formulas;
using ModeSolver.Integrators;
using ModeSolver.Models;
using ModeSolver.Output;
using ModeSolver.Physics;
using ModeSolver.Sweeps;
using ModeSolver.Tests.Sweeps;

namespace ModeSolver.Tests.Physics;

/// <summary>One exception base with the exit code on it; the sweep's point failures decided by that code alone.</summary>
public class ExceptionBaseTests
{
    public static TheoryData<string> LibraryAssemblies => new() { "ModeSolver.Core", "ModeSolver", "ModeSolver.Cli" };

    [Theory]
    [MemberData(nameof(LibraryAssemblies))]
    public void EveryExceptionTypeOfTheLibraryDerivesFromTheBase(string assemblyName)
    {
        var assembly = Assembly.Load(assemblyName);
        var exceptions = assembly.GetTypes()
            .Where(t => typeof(Exception).IsAssignableFrom(t) && !t.IsAbstract && !IsPrivateHelper(t))
            .ToList();
        var outside = exceptions.Where(t => !typeof(ModeSolverException).IsAssignableFrom(t)).Select(t => t.FullName).ToList();
        Assert.True(outside.Count == 0, $"{assemblyName}: exception types outside ModeSolverException: {string.Join(", ", outside)}");
    }

    [Fact]
    public void TheCoreAndIoAssembliesDeclareTheExpectedExceptions()
    {
        // Guards the reflection test above against passing on an empty list.
        var names = new[] { typeof(PhysicsException), typeof(DeckException) }.SelectMany(t => t.Assembly.GetTypes())
            .Where(t => typeof(ModeSolverException).IsAssignableFrom(t) && !t.IsAbstract).Select(t => t.Name).ToHashSet();
        foreach (var expected in new[] { "PhysicsException", "IntegrationException", "FormulaException", "TheoryException",
                     "DeckException", "OutputException", "SweepException", "SweepInternalException", "MessagePassingException" })
            Assert.Contains(expected, names);
    }

    [Fact]
    public void EachExceptionCarriesItsExitCode()
    {
        Assert.Equal(3, new PhysicsException("x").ExitCode);
        Assert.Equal(3, new IntegrationException(IntegrationFailure.NonFiniteState, 1.5, [], "x").ExitCode);
        Assert.Equal(2, new DeckException("x").ExitCode);
        Assert.Equal(2, new FormulaException("phi+", 5, "a value", "x").ExitCode);
        Assert.Equal(2, new TheoryException("x").ExitCode);
        Assert.Equal(2, new OutputException("x").ExitCode);
        Assert.Equal(2, new SweepException("x").ExitCode);
        Assert.Equal(2, new ModeSolver.Cluster.MessagePassingException("x").ExitCode);
        Assert.Equal(1, new SweepInternalException("x").ExitCode);
        Assert.Equal(1, ExitCodes.Of(new ArgumentException("x")));
        Assert.Equal(1, ExitCodes.Of(new KeyNotFoundException("x")));
        Assert.Equal(3, ExitCodes.Of(new PhysicsException("x")));
    }

    [Fact]
    public void IntegrationFailureSaysWhereItStopped()
    {
        var e = new IntegrationException(IntegrationFailure.StepSizeUnderflow, 12.25, [], "step size underflow");
        Assert.Equal("the integration could not go on at t = 12.25: step size underflow", e.UserMessage);
        Assert.Equal("x", new PhysicsException("x").UserMessage);
    }

    [Fact]
    public void AnUnknownCatalogueModelIsAnInputError()
    {
        var e = Assert.Throws<TheoryException>(() => ModelCatalogue.Get("no-such-model"));
        Assert.Equal(ExitCodes.Input, e.ExitCode);
        Assert.Contains("unknown model 'no-such-model'", e.Message);
    }

    private static readonly SweepSpec Spec = SweepDeck.ParseSpec(SweepTestSupport.Deck);

    [Fact]
    public void AnArgumentExceptionInsideAPointIsABugThatStopsTheSweep()
    {
        var ex = Assert.Throws<SweepInternalException>(() =>
            SweepRunner.EvaluatePoint(Spec, new ThrowingEvaluator(() => new ArgumentException("bad argument")), 0, default));
        Assert.Equal(ExitCodes.Internal, ex.ExitCode);
        Assert.Contains("ArgumentException", ex.Message);
    }

    public static TheoryData<string> PointFailures => new() { "physics", "integration", "deck", "formula", "theory", "sweep" };

    [Theory]
    [MemberData(nameof(PointFailures))]
    public void PhysicsAndInputErrorsInsideAPointAreFailedPoints(string kind)
    {
        Func<Exception> make = kind switch
        {
            "physics" => () => new PhysicsException("inflation never ends"),
            "integration" => () => new IntegrationException(IntegrationFailure.NonFiniteState, 3, [], "inflation never ends"),
            "deck" => () => new DeckException("inflation never ends"),
            "formula" => () => new FormulaException("phi", 0, "", "inflation never ends"),
            "theory" => () => new TheoryException("inflation never ends"),
            _ => () => new SweepException("inflation never ends"),
        };
        var record = SweepRunner.EvaluatePoint(Spec, new ThrowingEvaluator(make), 0, default);
        Assert.NotNull(record);
        Assert.False(record!.Ok);
        Assert.Contains("inflation never ends", record.Message);
    }

    private sealed class ThrowingEvaluator(Func<Exception> make) : ISweepEvaluator
    {
        public SweepRecord Evaluate(SweepPoint point, CancellationToken ct) => throw make();
    }

    private static bool IsPrivateHelper(Type t) => t.IsNestedPrivate;
}
