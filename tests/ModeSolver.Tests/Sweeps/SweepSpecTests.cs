using ModeSolver.Sweeps;
using Tomlyn;
using Tomlyn.Model;

namespace ModeSolver.Tests.Sweeps;

public class SweepSpecTests
{
    [Fact]
    public void LinearAndLogAxesHaveExactEndPointsAndEvenSpacing()
    {
        var lin = SweepAxis.Linear("a", 50, 60, 5);
        Assert.Equal([50.0, 52.5, 55.0, 57.5, 60.0], lin.Values);
        var log = SweepAxis.Log("b", 0.01, 100, 5);
        Assert.Equal(0.01, log.Values[0]);
        Assert.Equal(100.0, log.Values[4]);
        Assert.Equal(1.0, log.Values[2], 14);
        Assert.Equal(0.1, log.Values[1], 15);
        Assert.Equal([7.0], SweepAxis.Linear("c", 7, 9, 1).Values);
    }

    [Fact]
    public void GridOrderIsRowMajorWithTheFirstAxisSlowest()
    {
        var spec = new SweepSpec([SweepAxis.List("a", [1, 2, 3]), SweepAxis.List("b", [10, 20])]);
        Assert.Equal(6, spec.PointCount);
        var pts = spec.Points().Select(p => (p.Index, p["a"], p["b"])).ToArray();
        Assert.Equal([(0L, 1.0, 10.0), (1L, 1.0, 20.0), (2L, 2.0, 10.0), (3L, 2.0, 20.0), (4L, 3.0, 10.0), (5L, 3.0, 20.0)], pts);
        Assert.Equal(["a", "b"], spec.GetPoint(3).Keys);
    }

    [Fact]
    public void ZippedAxesMoveTogetherAsOneDimension()
    {
        var spec = new SweepSpec(
            [SweepAxis.List("w", [0, 0.25, 1]), SweepAxis.List("alpha", [1, 2]), SweepAxis.List("T", [1e9, 1e12, 1e15])],
            zip: [["w", "T"]]);
        Assert.Equal(6, spec.PointCount);
        var p = spec.GetPoint(3); // w dimension index 1, alpha index 1
        Assert.Equal(0.25, p["w"]);
        Assert.Equal(1e12, p["T"]);
        Assert.Equal(2, p["alpha"]);
        Assert.Equal(["w", "alpha", "T"], p.Keys);
        var ex = Assert.Throws<SweepException>(() => new SweepSpec([SweepAxis.List("w", [0, 1]), SweepAxis.List("T", [1, 2, 3])], zip: [["w", "T"]]));
        Assert.Contains("'T'", ex.Message);
    }

    [Fact]
    public void ParsesTheSweepTableOfADeck()
    {
        var deck = SweepTestSupport.Deck + "\n[sweep.extra_never_read_here]\n";
        // The [sweep.x] sub-table is an unknown sweep key: an error naming it.
        var ex = Assert.Throws<SweepException>(() => SweepDeck.ParseSpec(deck, "d.toml"));
        Assert.Contains("sweep.extra_never_read_here", ex.Message);

        var spec = SweepDeck.ParseSpec(SweepTestSupport.Deck, "d.toml");
        Assert.Equal(["param.alpha", "efolds"], spec.Keys);
        Assert.Equal(15, spec.PointCount);
        Assert.Equal(SweepAxisKind.Log, spec.Axes[0].Kind);
        Assert.Equal([50.0, 55, 60], spec.Axes[1].Values);
        Assert.Equal("param.alpha", spec.Families);
        Assert.Equal("efolds", spec.Markers);
        Assert.False(spec.Spectra);

        var zipped = SweepDeck.ParseSpec("""
            [sweep]
            spectra = true
            zip = [["reheat.w", "reheat.T"]]
            [[sweep.axis]]
            key = "reheat.w"
            linear = [0, 1, 3]
            [[sweep.axis]]
            key = "reheat.T"
            values = [1e9, 1e12, 1e15]
            """);
        Assert.Equal(3, zipped.PointCount);
        Assert.True(zipped.Spectra);
        Assert.True(zipped.GetPoint(2).WantSpectrum);
    }

    [Theory]
    [InlineData("[model]\nx = 1\n", "no [sweep] table")]
    [InlineData("[sweep]\nspectra = true\n", "sweep.axis")]
    [InlineData("[sweep]\ncolour = 1\n[[sweep.axis]]\nkey = \"a\"\nvalues = [1]\n", "sweep.colour")]
    [InlineData("[[sweep.axis]]\nvalues = [1]\n", "'key'")]
    [InlineData("[[sweep.axis]]\nkey = \"param.alpha\"\nvalues = [1]\nlog = [1, 2, 3]\n", "'param.alpha'")]
    [InlineData("[[sweep.axis]]\nkey = \"param.alpha\"\n", "exactly one of")]
    [InlineData("[[sweep.axis]]\nkey = \"param.alpha\"\nlog = [0, 1, 3]\n", "log bounds must be positive")]
    [InlineData("[[sweep.axis]]\nkey = \"efolds\"\nlinear = [50, 60, 2.5]\n", "'efolds': 'linear' count")]
    [InlineData("[[sweep.axis]]\nkey = \"efolds\"\nlinear = [50, 60]\n", "'efolds': 'linear' must be [start, stop, count]")]
    [InlineData("[[sweep.axis]]\nkey = \"efolds\"\nvalues = [50, \"x\"]\n", "'efolds': 'values' item 2")]
    [InlineData("[[sweep.axis]]\nkey = \"efolds\"\nvalues = []\n", "'efolds': 'values' must be a non-empty")]
    [InlineData("[[sweep.axis]]\nkey = \"efolds\"\nvalues = [1]\n[[sweep.axis]]\nkey = \"efolds\"\nvalues = [2]\n", "'efolds': key appears twice")]
    [InlineData("[sweep]\nfamilies = \"param.beta\"\n[[sweep.axis]]\nkey = \"efolds\"\nvalues = [1]\n", "sweep.families: 'param.beta'")]
    [InlineData("[sweep]\nzip = [\"efolds\", \"w\"]\n[[sweep.axis]]\nkey = \"efolds\"\nvalues = [1]\n", "sweep.zip: 'w'")]
    [InlineData("[sweep]\nspectra = \"yes\"\n[[sweep.axis]]\nkey = \"efolds\"\nvalues = [1]\n", "sweep.spectra")]
    [InlineData("[sweep\n", "invalid TOML")]
    public void BadSpecsGiveOneLineErrorsNamingTheKey(string deck, string expected)
    {
        var ex = Assert.Throws<SweepException>(() => SweepDeck.ParseSpec(deck, "bad.toml"));
        Assert.Contains(expected, ex.Message);
        Assert.StartsWith("bad.toml", ex.Message);
        Assert.DoesNotContain('\n', ex.Message);
    }

    [Fact]
    public void RemovingTheSweepLeavesTheRestOfTheDeckByteForByte()
    {
        const string deck = "# top\n[model]\nname = \"t\" # keep\n\n[sweep]\nfamilies = \"a\"\n\n[[sweep.axis]]\nkey = \"a\"\nvalues = [1, 2]\n\n[reheat]\nw = 0.0\n";
        string rest = SweepDeck.RemoveSweep(deck);
        Assert.Equal("# top\n[model]\nname = \"t\" # keep\n\n\n\n[reheat]\nw = 0.0\n", rest);
        var table = TomlSerializer.Deserialize<TomlTable>(rest)!;
        Assert.Equal(["model", "reheat"], table.Keys.OrderBy(k => k));
        string noSweep = deck.Replace("sweep", "sweeping");
        Assert.Equal(noSweep, SweepDeck.RemoveSweep(noSweep));

        var parsed = TomlSerializer.Deserialize<TomlTable>(deck)!;
        var without = SweepDeck.WithoutSweep(parsed);
        Assert.False(without.ContainsKey("sweep"));
        Assert.True(without.ContainsKey("model"));
        Assert.True(parsed.ContainsKey("sweep"));
    }

    [Fact]
    public void FingerprintDependsOnTheSpecAndTheRestOfTheDeckButNotOnPlotKeys()
    {
        var spec = SweepDeck.ParseSpec(SweepTestSupport.Deck);
        string rest = SweepDeck.RemoveSweep(SweepTestSupport.Deck);
        string fp = SweepJournal.Fingerprint(spec, rest);
        Assert.Equal(fp, SweepJournal.Fingerprint(SweepDeck.ParseSpec(SweepTestSupport.Deck.Replace("markers = \"efolds\"", "")), rest));
        Assert.NotEqual(fp, SweepJournal.Fingerprint(spec, rest.Replace("w = 0.0", "w = 0.1")));
        Assert.NotEqual(fp, SweepJournal.Fingerprint(SweepDeck.ParseSpec(SweepTestSupport.Deck.Replace("[50, 55, 60]", "[50, 55, 61]")), rest));
    }
}
