using ModeSolver.Numerics;

namespace ModeSolver.Tests.Numerics;

/// <summary>
/// The one root-finder class on test functions with known roots. Each root value was checked with the reference
/// library mpmath (findroot at 30 digits); the sources of the test functions are named beside each case.
/// </summary>
public class RootsTests
{
    public static TheoryData<string, double, double, double> Problems => new()
    {
        // Alefeld, Potra & Shi, ACM TOMS 21 (1995) 327, "Algorithm 748", test problem 1 (from memory): sin x - x/2 on [pi/2, pi].
        { "sin(x) - x/2", Math.PI / 2, Math.PI, 1.89549426703398094714 },
        // Wallis' cubic x^3 - 2x - 5 = 0, the equation on which Newton's method was first shown (J. Wallis, A Treatise of Algebra, 1685; from memory).
        { "x^3 - 2x - 5", 2, 3, 2.09455148154232659148 },
        // The omega constant W(1): x e^x = 1 (DLMF 4.13, the Lambert W function).
        { "x e^x - 1", 0, 1, 0.56714329040978387300 },
        // The fixed point of cos (cos x = x).
        { "cos(x) - x", 0, 1, 0.73908513321516064166 },
        // e^x = 2: ln 2.
        { "e^x - 2", -10, 10, 0.69314718055994530942 },
    };

    private static double F(string name, double x) => name switch
    {
        "sin(x) - x/2" => Math.Sin(x) - x / 2,
        "x^3 - 2x - 5" => x * x * x - 2 * x - 5,
        "x e^x - 1" => x * Math.Exp(x) - 1,
        "cos(x) - x" => Math.Cos(x) - x,
        "e^x - 2" => Math.Exp(x) - 2,
        _ => throw new ArgumentException(name),
    };

    private static double DF(string name, double x) => name switch
    {
        "sin(x) - x/2" => Math.Cos(x) - 0.5,
        "x^3 - 2x - 5" => 3 * x * x - 2,
        "x e^x - 1" => (1 + x) * Math.Exp(x),
        "cos(x) - x" => -Math.Sin(x) - 1,
        "e^x - 2" => Math.Exp(x),
        _ => throw new ArgumentException(name),
    };

    [Theory]
    [MemberData(nameof(Problems))]
    public void BrentFindsPublishedRootsToTheAskedWidth(string name, double a, double b, double root)
    {
        foreach (double xtol in new[] { 1e-6, 1e-10, 1e-14 })
        {
            int calls = 0;
            double x = Roots.Brent(t => { calls++; return F(name, t); }, a, b, F(name, a), F(name, b), xtol);
            Assert.True(Math.Abs(x - root) <= xtol + 4e-16 * Math.Abs(root), $"{name}: {x:R} vs {root:R} at xtol {xtol}");
            // Superlinear: far fewer evaluations than bisection's log2((b - a)/xtol).
            Assert.True(calls < Math.Log2((b - a) / xtol), $"{name}: {calls} evaluations at xtol {xtol}");
        }
    }

    [Theory]
    [MemberData(nameof(Problems))]
    public void SafeNewtonConvergesToTheSameRoots(string name, double a, double b, double root)
    {
        // SafeNewton wants f(a) < 0 <= f(b): orient the bracket.
        double fa = F(name, a), fb = F(name, b);
        var f = new Analytic(name, fa < 0 ? 1 : -1);
        if (!(fa < 0)) (fa, fb) = (-fa, -fb);
        double x = Roots.SafeNewton(ref f, a, b, fa, fb, 1e-14);
        Assert.True(Math.Abs(x - root) <= 1e-13 * Math.Max(1, Math.Abs(root)), $"{name}: {x:R} vs {root:R}");
    }

    [Fact]
    public void BrentReturnsAnEndpointThatIsARoot()
    {
        Assert.Equal(1.0, Roots.Brent(x => x - 1, 1, 3, 0, 2, 1e-12));
        Assert.Equal(3.0, Roots.Brent(x => x - 3, 1, 3, -2, 0, 1e-12));
    }

    [Fact]
    public void BrentHandlesATripleRootAndAJump()
    {
        // A triple root is flat (f ~ (x-1)^3): the bracket still closes to the asked width.
        double x = Roots.Brent(t => Math.Pow(t - 1, 3), 0, 3, -1, 8, 1e-12);
        Assert.True(Math.Abs(x - 1) <= 1e-12, $"{x:R}");
        // A sign change without a zero (a jump at 0.3): the bracket closes onto the jump.
        double j = Roots.Brent(t => t < 0.3 ? -1.0 : 1.0, 0, 1, -1, 1, 1e-12);
        Assert.True(Math.Abs(j - 0.3) <= 1e-12, $"{j:R}");
    }

    [Fact]
    public void BrentReachesRoundOffWithZeroTolerance()
    {
        double x = Roots.Brent(t => t * t - 2, 1, 2, -1, 2, 0);
        double ulp = Math.BitIncrement(Math.Sqrt(2)) - Math.Sqrt(2);
        Assert.True(Math.Abs(x - Math.Sqrt(2)) <= 3 * ulp, $"{x:R}"); // the round-off term 2e-16 |x| is about 1.3 ulp
    }

    [Fact]
    public void BrentIsOrderIndependent()
    {
        // The bracket may be given with b < a.
        double x = Roots.Brent(t => Math.Cos(t) - t, 1, 0, Math.Cos(1) - 1, 1, 1e-14);
        Assert.True(Math.Abs(x - 0.73908513321516064166) <= 1e-14);
    }

    [Fact]
    public void BisectNeverReturnsAFailingPoint()
    {
        // The boundary of x < sqrt(2) from both sides of the bracket.
        var test = new Below(Math.Sqrt(2));
        var (inside, outside) = Roots.Bisect(ref test, 1, 2, 1e-14);
        Assert.True(inside < Math.Sqrt(2) && outside >= Math.Sqrt(2));
        Assert.True(outside - inside <= 1e-14 * Math.Sqrt(2) * 2);
        var above = new Above(Math.Sqrt(2));
        var (i2, o2) = Roots.Bisect(ref above, 2, 1, 1e-14);
        Assert.True(i2 > Math.Sqrt(2) && o2 <= Math.Sqrt(2));
    }

    [Fact]
    public void BisectFloorKeepsTheToleranceRelativeNearZero()
    {
        var test = new Below(3e-9);
        var (absolute, _) = Roots.Bisect(ref test, 0, 1e-8, 1e-6);
        Assert.Equal(0.0, absolute); // 1e-8 wide is already within 1e-6 * max(1, |x|)
        var (relative, _) = Roots.Bisect(ref test, 0, 1e-8, 1e-6, maxIterations: 200, scaleFloor: 1e-300);
        Assert.True(Math.Abs(relative - 3e-9) <= 1e-6 * 3e-9 * 2, $"{relative:R}");
    }

    [Fact]
    public void BisectStopsAtTheIterationLimit()
    {
        int calls = 0;
        var test = new Counting(() => calls++);
        Roots.Bisect(ref test, 0, 1, 0, maxIterations: 7);
        Assert.Equal(7, calls);
    }

    [Fact]
    public void GeometricBisectionWorksInLnX()
    {
        // The boundary at 1e-3 from a bracket spanning ten decades: the midpoint in ln x.
        var test = new Below(1e-3);
        var (lo, hi) = Roots.BisectGeometric(ref test, 1e-8, 1e2, 1e-13);
        Assert.True(lo < 1e-3 && hi >= 1e-3 && hi / lo - 1 <= 1e-13);
    }

    private readonly struct Analytic(string name, int sign) : IRootFunctionWithDerivative
    {
        public (double Value, double Derivative) Evaluate(double x) => (sign * F(name, x), sign * DF(name, x));
    }

    private readonly struct Below(double edge) : IBoundaryTest
    {
        public bool IsInside(double x) => x < edge;
    }

    private readonly struct Above(double edge) : IBoundaryTest
    {
        public bool IsInside(double x) => x > edge;
    }

    private readonly struct Counting(Action call) : IBoundaryTest
    {
        public bool IsInside(double x) { call(); return x < 0.5; }
    }
}
