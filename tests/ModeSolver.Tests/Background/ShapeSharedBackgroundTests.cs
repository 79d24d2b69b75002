using ModeSolver.Background;
using ModeSolver.Perturbations;
using ModeSolver.Tests.Perturbations;

namespace ModeSolver.Tests.Background;

/// <summary>
/// The background offers its shape-only cache and its fast horizon-exit lookup through interfaces; later stages use
/// those, never the concrete <see cref="BackgroundSolution"/>.
/// </summary>
public class ShapeSharedBackgroundTests
{
    private static readonly Lazy<BackgroundSolution> Bg = new(() => SpectrumTests.Solve(new Quadratic(1e-10), 17.5));

    [Fact]
    public void RescaledViewsShareOneFrictionScan()
    {
        var bg = Bg.Value;
        var scan = FrictionScan.FromStart(bg);
        Assert.Same(scan, FrictionScan.FromStart(bg.WithVScale(0.25)));
    }

    [Fact]
    public void ABackgroundOfAnotherTypeServesTheScanThroughTheInterface()
    {
        var stand = new StandIn(Bg.Value);
        var scan = FrictionScan.FromStart(stand);
        Assert.Same(scan, FrictionScan.FromStart(stand));
        Assert.Equal(1, stand.Builds);
        // The table is the one built directly on the same shape.
        var direct = FrictionScan.Build(Bg.Value, Bg.Value.NStart);
        foreach (double n in new[] { 1.0, 20.0, 40.0 })
            Assert.Equal(direct.LogGrowthAfter(n), scan.LogGrowthAfter(n));
    }

    [Fact]
    public void TheOneSlotRefusesASecondTableType()
    {
        var stand = new StandIn(Bg.Value);
        stand.ShapeTable(_ => "first");
        var e = Assert.Throws<InvalidOperationException>(() => stand.ShapeTable(_ => new object[1]));
        Assert.Contains("String", e.Message);
    }

    [Fact]
    public void HorizonExitUsesTheLookupOfAnyBackgroundThatOffersOne()
    {
        var bg = Bg.Value;
        double k = Math.Exp(30) * bg.At(30).H;
        var lookup = new Lookup(bg, 12.5);
        Assert.Equal(12.5, HorizonExit.Find(lookup, k));
        // Without the lookup the generic scan finds the same exit as the table.
        var plain = new Plain(bg);
        Assert.Equal(bg.NAtHorizonExit(k), HorizonExit.Find(plain, k), 1e-11);
    }

    private class Plain(IBackground inner) : IBackground
    {
        public double NStart => inner.NStart;
        public double NStop => inner.NStop;
        public double NEnd => inner.NEnd;
        public IReadOnlyList<double> EndCrossings => inner.EndCrossings;
        public IReadOnlyList<double> NonSmoothTimes => inner.NonSmoothTimes;
        public double VScale => inner.VScale;
        public BackgroundPoint At(double n) => inner.At(n);
    }

    private sealed class StandIn(IBackground inner) : Plain(inner), IShapeSharedBackground
    {
        private object? _slot;
        public int Builds { get; private set; }

        public T ShapeTable<T>(Func<IBackground, T> create) where T : class
        {
            if (_slot is null) { Builds++; _slot = create(this); }
            return _slot as T ?? throw new InvalidOperationException($"holds a {_slot.GetType().Name}");
        }
    }

    private sealed class Lookup(IBackground inner, double answer) : Plain(inner), IHorizonExitLookup
    {
        public double NAtHorizonExit(double kBackground) => answer;
    }
}
