using ModeSolver.Diagnostics;
using ModeSolver.Output;
using ModeSolver.Results;
using ModeSolver.Tests.Output;

namespace ModeSolver.Tests.Diagnostics;

/// <summary>Adjacent flagged ranges of one kind become one flag; a range where P_s exceeds 1 gives a warning.</summary>
public class FlagMergingTests
{
    // 400 log-spaced k and a slow-roll reference of 1: the exact spectrum is 1 + d(k).
    private static readonly double[] K = SyntheticReport.Log(1e-5, 1.0, 400);

    private static List<Flag> FlagsOf(Func<int, double> deviation, double threshold = 0.01)
    {
        var exact = K.Select((_, i) => 1 + deviation(i)).ToArray();
        var sr = K.Select(_ => 1.0).ToArray();
        return Flags.SpectrumDeviations(K, exact, sr, "P_s", threshold);
    }

    [Fact]
    public void An_oscillation_about_the_limit_gives_one_flag_naming_how_many_ranges_it_merged()
    {
        // Samples 100..299 oscillate between 2.2% and 0.2% with a period of 20 samples (18 degrees a sample): above 1%
        // where cos > -0.198, i.e. phases 0..5 and 15..19 of each period, so 11 ranges (the first and last are half
        // ones) with gaps of 9 samples (more than MergeGapSamples), each gap narrower than the ranges beside it.
        var flags = FlagsOf(i => i is >= 100 and < 300 ? 0.012 + 0.0101 * Math.Cos(2 * Math.PI * (i - 100) / 20.0) : 0);
        var f = Assert.Single(flags);
        Assert.True(f.Message.Contains("(11 adjacent ranges merged)"), f.Message);
        Assert.True(f.Lower < K[101] && f.Upper > K[280], $"{f.Lower} .. {f.Upper}");
    }

    [Fact]
    public void Ranges_a_few_samples_apart_merge_and_distant_ones_stay_apart()
    {
        // Two 5-sample ranges 3 samples apart merge; a third one 100 samples further on stays its own flag.
        var flags = FlagsOf(i => i is >= 50 and < 55 or >= 58 and < 63 or >= 163 and < 168 ? 0.05 : 0);
        Assert.Equal(2, flags.Count);
        Assert.Contains("(2 adjacent ranges merged)", flags[0].Message);
        Assert.DoesNotContain("merged", flags[1].Message);
    }

    [Fact]
    public void A_range_where_slow_roll_fails_is_not_merged_with_one_where_it_only_differs()
    {
        var exact = K.Select(_ => 1.0).ToArray();
        var sr = K.Select((_, i) => i is >= 50 and < 60 ? -1.0 : i is >= 61 and < 70 ? 0.9 : 1.0).ToArray();
        var flags = Flags.SpectrumDeviations(K, exact, sr, "P_s", 0.01);
        Assert.Equal(2, flags.Count);
        Assert.Contains("slow roll fails", flags[0].Message);
        Assert.Contains("differ by up to", flags[1].Message);
    }

    [Fact]
    public void P_s_above_one_gives_a_warning_naming_the_k_range_and_the_peak()
    {
        var ps = K.Select(k => k is > 1e-3 and < 1e-2 ? 5.0 : 2e-9).ToArray();
        var pt = K.Select(_ => 1e-11).ToArray();
        var spectrum = new SpectrumSamples([.. K], [.. ps], [.. pt], [.. pt.Select((p, i) => p / ps[i])],
            [.. K.Select(_ => 0.96)], [.. K.Select(_ => 0.0)], [.. K.Select(_ => 0.0)], [.. K.Select(_ => 1e-6)]);
        string? w = Flags.PerturbativityWarning(spectrum);
        Assert.NotNull(w);
        Assert.StartsWith("P_s exceeds 1 (up to 5.000e+00) for k = 1.0", w);
        Assert.Contains("linear perturbation theory breaks down", w);
        var small = spectrum with { Ps = [.. K.Select(_ => 2e-9)] };
        Assert.Null(Flags.PerturbativityWarning(small));
    }
}
