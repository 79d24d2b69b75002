using System.Text;
using ModeSolver.Sweeps;

namespace ModeSolver.Tests.Sweeps;

/// <summary>The journal line of a point: the n-field values round-trip, and a line without them (one field, older journals) reads NaN.</summary>
public class SweepRecordTests
{
    [Fact]
    public void MultiFieldValuesRoundTripThroughTheJournalLine()
    {
        var r = new SweepRecord
        {
            Index = 4, Ok = true, Ns = 0.96, R = 0.1, AlphaS = -6e-4, Nt = -0.0125, As = 2.1e-9, NStar = 55, VScale = 1.3,
            BetaIso = 3.4e-5, CosDelta = -0.25, Trs = 0.95, FNlLocal = 0.0076,
        };
        string line = Encoding.UTF8.GetString(r.ToJsonLine());
        foreach (string key in new[] { "\"beta_iso\":", "\"cos_delta\":", "\"T_RS\":", "\"f_NL_local\":" }) Assert.Contains(key, line);
        var back = SweepRecord.FromJson(Encoding.UTF8.GetBytes(line.TrimEnd('\n')));
        Assert.Equal((r.BetaIso, r.CosDelta, r.Trs, r.FNlLocal), (back.BetaIso, back.CosDelta, back.Trs, back.FNlLocal));
        var journal = back.ForJournal(4, keepSpectrum: false).WithoutSpectrum();
        Assert.Equal((r.BetaIso, r.CosDelta, r.Trs, r.FNlLocal), (journal.BetaIso, journal.CosDelta, journal.Trs, journal.FNlLocal));
    }

    [Fact]
    public void OneFieldLineHasNoMultiFieldKeysAndReadsNaN()
    {
        var r = new SweepRecord { Index = 1, Ok = true, Ns = 0.96, R = 0.1, AlphaS = -6e-4, Nt = -0.0125, As = 2.1e-9, NStar = 55, VScale = 1.3 };
        string line = Encoding.UTF8.GetString(r.ToJsonLine());
        Assert.DoesNotContain("beta_iso", line);
        Assert.DoesNotContain("f_NL_local", line);
        var back = SweepRecord.FromJson(Encoding.UTF8.GetBytes(line.TrimEnd('\n')));
        Assert.True(double.IsNaN(back.BetaIso) && double.IsNaN(back.CosDelta) && double.IsNaN(back.Trs) && double.IsNaN(back.FNlLocal));
        Assert.Equal(0.96, back.Ns);
    }
}
