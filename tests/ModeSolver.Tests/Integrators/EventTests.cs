using ModeSolver.Integrators;

namespace ModeSolver.Tests.Integrators;

/// <summary>Event location on problems whose crossing times are known exactly; run for every method.</summary>
public class EventTests
{
    public static TheoryData<string> Methods => new() { "DOP853", "RadauIIA5", "AutoSwitching" };

    internal static IOdeMethod Create(string name) => name switch
    {
        "DOP853" => new DormandPrince853(),
        "RadauIIA5" => new RadauIIA5(),
        "AutoSwitching" => new AutoSwitching(),
        _ => throw new ArgumentException(name),
    };

    // Against exact times the integration error counts too: at tolerances 1e-13 it is below 1e-12 relative for
    // DOP853 and about 1e-11 for the 5th-order RadauIIA5 (observed 5e-12), hence the per-method bound. The location
    // on the dense output itself is checked to 1e-12 by AssertSignChange.
    private static void AssertTime(double expected, double actual, string method = "DOP853")
    {
        double rel = method == "DOP853" ? 1e-12 : 1e-10;
        Assert.True(Math.Abs(actual - expected) <= rel * Math.Abs(expected), $"event at {actual:R}, exact {expected:R}");
    }

    private static void AssertSignChange(OdeSolution sol, int component, double te)
    {
        double before = sol.Evaluate(te - 1e-12 * Math.Abs(te), component), after = sol.Evaluate(te + 1e-12 * Math.Abs(te), component);
        Assert.True(before * after <= 0, $"g = {before:E3} and {after:E3} around the event at {te:R}");
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void LinearCrossingIsExactAndTerminal(string method)
    {
        // y' = 1, y(0) = 0 crosses 0.7 at t = 0.7 exactly.
        var p = new OdeProblem((t, y, f) => f[0] = 1.0, 0.0, new[] { 0.0 }, 2.0);
        var opts = new OdeOptions
        {
            DenseOutput = false,
            Events = new[] { new EventSpec((t, y) => y[0] - 0.7, EventDirection.Rising, Terminal: true, Name: "y=0.7") },
        };
        var sol = Create(method).Solve(p, opts);
        Assert.Equal(OdeStatus.TerminalEvent, sol.Status);
        var ev = Assert.Single(sol.Events);
        Assert.Equal("y=0.7", ev.Name);
        Assert.True(ev.Rising);
        AssertTime(0.7, ev.T);
        Assert.Equal(ev.T, sol.TFinal);
        Assert.True(Math.Abs(sol.FinalState[0] - 0.7) < 1e-13);
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void OscillatorZerosWithDirectionsAndSeveralEventsAtOnce(string method)
    {
        // y1 = cos t, y2 = -sin t: y1 = 0 at pi/2 (falling), 3pi/2 (rising), 5pi/2 (falling); y2 rises through 0 at pi.
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 10.0);
        var opts = new OdeOptions
        {
            RelativeTolerance = 1e-13,
            AbsoluteTolerance = 1e-15,
            Events = new[]
            {
                new EventSpec((t, y) => y[0], EventDirection.Either, Name: "y1"),
                new EventSpec((t, y) => y[1], EventDirection.Rising, Name: "y2 up"),
                new EventSpec((t, y) => t - 6.0, EventDirection.Either, Terminal: true, Name: "stop"),
                new EventSpec((t, y) => y[0], EventDirection.Falling, Name: "y1 down"),
            },
        };
        var sol = Create(method).Solve(p, opts);
        var evs = sol.Events;
        Assert.Equal(OdeStatus.TerminalEvent, sol.Status);
        // time order; the two y1 events at pi/2 come in index order
        Assert.Equal(new[] { "y1", "y1 down", "y2 up", "y1", "stop" }, evs.Select(e => e.Name).ToArray());
        AssertTime(Math.PI / 2, evs[0].T, method);
        AssertSignChange(sol, 0, evs[0].T);
        Assert.False(evs[0].Rising);
        AssertTime(Math.PI / 2, evs[1].T, method);
        AssertTime(Math.PI, evs[2].T, method);
        AssertSignChange(sol, 1, evs[2].T);
        Assert.True(evs[2].Rising);
        AssertTime(3 * Math.PI / 2, evs[3].T, method);
        Assert.True(evs[3].Rising);
        Assert.Equal(2, evs[4].EventIndex);
        AssertTime(6.0, evs[4].T, method);
        Assert.Equal(6.0, sol.TFinal, 12);
        for (int i = 1; i < evs.Count; i++) Assert.True(evs[i].T >= evs[i - 1].T);
        // the state carried with the event is the dense output there
        Assert.True(Math.Abs(evs[2].State[1]) < 1e-9 && Math.Abs(evs[2].State[0] + 1) < 1e-9);
        // after the terminal event nothing more: 5pi/2 = 7.85 is not reported
        Assert.DoesNotContain(evs, e => e.T > 6.0 + 1e-9);
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void NonTerminalEventsAcrossTheWholeRange(string method)
    {
        // zeros of cos t on [0, 20]: pi/2 + n pi, n = 0..5, alternating falling/rising.
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, 20.0);
        var sol = Create(method).Solve(p, new OdeOptions
        {
            RelativeTolerance = 1e-13,
            AbsoluteTolerance = 1e-15,
            DenseOutput = false,
            Events = new[] { new EventSpec((t, y) => y[0]) },
        });
        Assert.Equal(OdeStatus.Completed, sol.Status);
        Assert.Equal(6, sol.Events.Count);
        for (int n = 0; n < 6; n++)
        {
            AssertTime(Math.PI / 2 + n * Math.PI, sol.Events[n].T, method);
            Assert.Equal(n % 2 == 1, sol.Events[n].Rising);
        }
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void BackwardEventsComeInTheDirectionOfIntegration(string method)
    {
        // From 0 down to -10: cos t = 0 at -pi/2, -3pi/2, -5pi/2; going backwards cos falls through -pi/2.
        var p = new OdeProblem(TestProblems.Oscillator, 0.0, new[] { 1.0, 0.0 }, -10.0);
        int observed = 0;
        double tObserved = double.NaN;
        var sol = Create(method).Solve(p, new OdeOptions
        {
            RelativeTolerance = 1e-13,
            AbsoluteTolerance = 1e-15,
            Events = new[]
            {
                new EventSpec((t, y) => y[0], EventDirection.Rising, Name: "rise"),
                new EventSpec((t, y) => y[0] + 0.5, EventDirection.Either, Terminal: true, Name: "terminal"),
            },
            Observer = (t, y) => { observed++; tObserved = t; return false; },
        });
        // cos t + 0.5 = 0 first at t = -2pi/3 going backwards; "rise" (backwards) at -3pi/2 is after it.
        Assert.Equal(OdeStatus.TerminalEvent, sol.Status);
        var ev = Assert.Single(sol.Events);
        AssertTime(-2 * Math.PI / 3, ev.T, method);
        Assert.False(ev.Rising);
        Assert.Equal(ev.T, tObserved); // the observer sees the truncated last step
        Assert.Equal(sol.Statistics.AcceptedSteps, observed);

        var sol2 = Create(method).Solve(p, new OdeOptions
        {
            RelativeTolerance = 1e-13,
            AbsoluteTolerance = 1e-15,
            Events = new[] { new EventSpec((t, y) => y[0], EventDirection.Rising) },
        });
        Assert.Single(sol2.Events);
        double te = sol2.Events[0].T;
        AssertTime(-3 * Math.PI / 2, te, method);
        // located on the dense output: g changes sign within 1e-12 relative of the reported time
        AssertSignChange(sol2, 0, te);
    }
}
