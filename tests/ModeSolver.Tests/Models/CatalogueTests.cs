using ModeSolver.Decks;
using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

public class CatalogueTests
{
    public static TheoryData<string> Ids()
    {
        var d = new TheoryData<string>();
        foreach (string id in ModelCatalogue.Ids) d.Add(id);
        return d;
    }

    private static IValidatedTheory Build(ModelEntry e) =>
        TheoryFactory.Build(new ModelSpec(e.Id, e.Potential, e.Kinetic, e.Coupling, e.Palatini, e.DefaultParameters, e.PhiEnd));

    [Theory]
    [MemberData(nameof(Ids))]
    public void EntryBuildsAndIsFiniteAtItsStart(string id)
    {
        var e = ModelCatalogue.Get(id);
        var theory = Build(e);
        var v = theory.Potential(e.DefaultPhi0);
        var k = theory.Kinetic(e.DefaultPhi0);
        foreach (double x in new[] { v.Value, v.D1, v.D2, v.D3, k.Value, k.D1, k.D2, k.D3 })
            Assert.True(double.IsFinite(x), $"{id}: non-finite jet at phi0 = {e.DefaultPhi0}");
        Assert.True(v.Value > 0, $"{id}: V(phi0) = {v.Value}");
        Assert.True(k.Value > 0, $"{id}: K(phi0) = {k.Value}");
        Assert.Null(theory.InvalidReason(e.DefaultPhi0));
        Assert.False(string.IsNullOrWhiteSpace(e.Source));
        Assert.All(e.Parameters, p => Assert.False(string.IsNullOrWhiteSpace(p.Meaning)));
    }

    [Theory]
    [MemberData(nameof(Ids))]
    public void EntryRollsInItsStatedDirection(string id)
    {
        // The field rolls down the potential: sign(dphi/dt) = -sign(V_phi) since K > 0 (physics.md section 2).
        var e = ModelCatalogue.Get(id);
        double d1 = Build(e).Potential(e.DefaultPhi0).D1;
        Assert.NotEqual(0.0, d1);
        var actual = d1 > 0 ? RollDirection.Decreasing : RollDirection.Increasing;
        Assert.Equal(e.Roll, actual);
    }

    [Theory]
    [MemberData(nameof(Ids))]
    public void SlowRollEstimateGivesMoreThanSixtyEfolds(string id)
    {
        // Slow-roll e-folds N = int V / V_chi dchi = int K V / |V_phi| dphi (physics.md section 4c), from phi0 in the roll
        // direction until eps_V = (V_phi / V)^2 / (2K) = 1 or, for models that never end by themselves, phi_end.
        var e = ModelCatalogue.Get(id);
        var theory = Build(e);
        double dir = e.Roll == RollDirection.Decreasing ? -1 : 1;
        double span = Math.Max(Math.Abs(e.DefaultPhi0), e.PhiEnd is double pe ? Math.Abs(pe - e.DefaultPhi0) : 0.1);
        double h = 1e-4 * Math.Max(span, 0.1); // midpoint rule; ample for a lower bound of 60
        double phi = e.DefaultPhi0, n = 0;
        bool ended = false;
        for (int i = 0; i < 2_000_000; i++)
        {
            double mid = phi + 0.5 * dir * h;
            var v = theory.Potential(mid);
            double k = theory.Kinetic(mid).Value;
            double epsV = v.D1 * v.D1 / (v.Value * v.Value) / (2 * k);
            if (epsV >= 1) { ended = true; break; }
            if (e.PhiEnd is double end && (mid - end) * dir >= 0) { ended = true; break; }
            n += k * v.Value / Math.Abs(v.D1) * h;
            phi += dir * h;
            if (n > 1000) break;
        }
        Assert.True(ended || n > 1000, $"{id}: the estimate did not reach the end of inflation");
        Assert.True(n > 60, $"{id}: slow-roll estimate N = {n:F1} from phi0 = {e.DefaultPhi0}");
        Assert.True(n < 200, $"{id}: N = {n:F1}: the default start is needlessly far out");
    }

    [Fact]
    public void ModelsThatNeverEndHaveAPhiEnd()
    {
        // exponential: eps_1 = lambda^2/2 < 1 for ever (Lucchin & Matarrese 1985); broken-linear: eps tiny (Starobinsky 1992).
        Assert.NotNull(ModelCatalogue.Get("exponential").PhiEnd);
        Assert.NotNull(ModelCatalogue.Get("broken-linear").PhiEnd);
        Assert.Null(ModelCatalogue.Get("starobinsky").PhiEnd);
    }

    [Fact]
    public void BrokenLinearKinkIsANonSmoothPoint()
    {
        // physics.md section 4b: V_phi jumps at the kink; the theory must report it so the integrators can stop there.
        var theory = Build(ModelCatalogue.Get("broken-linear"));
        Assert.Contains(0.0, theory.NonSmoothPoints);
        Assert.Equal(2e-3, theory.Potential(1e-6).D1, 12);
        Assert.Equal(2e-4, theory.Potential(-1e-6).D1, 12);
    }

    [Fact]
    public void IdsArePlainWordsAndUnique()
    {
        var ids = ModelCatalogue.Ids.ToList();
        Assert.Equal(ids.Count, ids.Distinct(StringComparer.OrdinalIgnoreCase).Count());
        Assert.All(ids, id => Assert.Matches("^[a-z][a-z-]*$", id));
    }
}
