using ModeSolver.Diagnostics;
using ModeSolver.Output;
using ModeSolver.Results;
using ModeSolver.Tests.Output;

namespace ModeSolver.Tests.Diagnostics;

public class FlagsTests
{
    // The bump 0.03 exp(-x^2/(2 s^2)), x = ln(k/k0), exceeds 0.01 for |x| < s sqrt(2 ln 3) (algebra).
    private static readonly double HalfWidth = SyntheticReport.BumpWidth * Math.Sqrt(2 * Math.Log(3));

    [Fact]
    public void Bump_gives_exactly_one_k_range_with_the_right_bounds()
    {
        var k = SyntheticReport.Log(1e-5, 1.0, 160);
        var sr = k.Select(x => 2e-9 * Math.Pow(x / 0.05, -0.035)).ToArray();
        var exact = sr.Select((p, i) => p * (1 + SyntheticReport.Bump(k[i]))).ToArray();

        var flags = Flags.SpectrumDeviations(k, exact, sr, "P_s", 0.01);

        var f = Assert.Single(flags);
        Assert.Equal(FlagKinds.SpectrumDeviation, f.Kind);
        Assert.Equal("P_s", f.Quantity);
        // Linear interpolation of the crossing: error ~ h^2 f''/(8 f') = 1.8e-3 in ln k for this sampling
        // (h = 0.072), against h/2 = 0.036 for snapping to samples.
        Assert.InRange(Math.Log(f.Lower / SyntheticReport.BumpK) + HalfWidth, -4e-3, 4e-3);
        Assert.InRange(Math.Log(f.Upper / SyntheticReport.BumpK) - HalfWidth, -4e-3, 4e-3);
        // Worst point: the sample nearest the bump centre; difference close to the bump height.
        Assert.InRange(f.Difference, 0.029, 0.03);
        Assert.Equal(f.Exact / f.SlowRoll - 1, f.Difference, 12);
        Assert.Contains("/Mpc", f.Where);
        Assert.DoesNotContain('\n', f.Message);
    }

    [Fact]
    public void Negative_dip_is_flagged_with_a_negative_difference()
    {
        var k = SyntheticReport.Log(1e-4, 1.0, 100);
        var sr = k.Select(_ => 1e-10).ToArray();
        var exact = sr.Select((p, i) => p * (1 - SyntheticReport.Bump(k[i]))).ToArray();
        var f = Assert.Single(Flags.SpectrumDeviations(k, exact, sr, "P_t", 0.01));
        Assert.True(f.Difference < -0.029);
    }

    [Fact]
    public void Small_differences_give_no_flag()
    {
        var k = SyntheticReport.Log(1e-5, 1.0, 160);
        var sr = k.Select(x => 2e-9 * Math.Pow(x / 0.05, -0.035)).ToArray();
        var exact = sr.Select((p, i) => p * (1 + SyntheticReport.Bump(k[i], height: 0.009))).ToArray();
        Assert.Empty(Flags.SpectrumDeviations(k, exact, sr, "P_s", 0.01));
    }

    [Fact]
    public void Two_separate_bumps_give_two_ranges_and_a_range_at_the_edge_ends_at_the_last_sample()
    {
        var k = SyntheticReport.Log(1e-5, 1.0, 200);
        var sr = k.Select(_ => 1.0).ToArray();
        // Bump around 1e-3 and a rise that stays above the limit up to the largest k.
        var exact = k.Select(x => 1 + SyntheticReport.Bump(x) + (x > 0.1 ? 0.05 : 0.0)).ToArray();
        var flags = Flags.SpectrumDeviations(k, exact, sr, "P_s", 0.01);
        Assert.Equal(2, flags.Count);
        Assert.True(flags[0].Upper < flags[1].Lower);
        Assert.Equal(1.0, flags[1].Upper, 12);
    }

    [Fact]
    public void Bad_arrays_are_rejected_with_a_message()
    {
        var ex = Assert.Throws<ArgumentException>(() => Flags.SpectrumDeviations([1, 2, 3], [1, 2], [1, 2, 3], "P_s", 0.01));
        Assert.Contains("length", ex.Message);
        ex = Assert.Throws<ArgumentException>(() => Flags.SpectrumDeviations([1, 3, 2], [1, 2, 3], [1, 2, 3], "P_s", 0.01));
        Assert.Contains("increasing", ex.Message);
    }

    [Fact]
    public void Pivot_deviation_thresholds_follow_the_fraction_of_sigma()
    {
        var s = FlagSettings.Default; // sigma(n_s) = 0.0042, fraction 0.1 -> limit 4.2e-4
        Assert.Null(Flags.PivotDeviation("n_s", 0.9650, 0.9650 + 0.00041, s.SigmaNs, s.PivotFraction, 0.05));
        var f = Flags.PivotDeviation("n_s", 0.9650, 0.9650 + 0.00043, s.SigmaNs, s.PivotFraction, 0.05);
        Assert.NotNull(f);
        Assert.Equal(FlagKinds.PivotDeviation, f.Kind);
        Assert.Equal(-0.00043, f.Difference, 12);
        Assert.Null(Flags.PivotDeviation("alpha_s", 1e-3, double.NaN, s.SigmaAlphaS, s.PivotFraction, 0.05));

        // Defaults: r limit 0.1 * 0.018 = 1.8e-3, alpha_s limit 1.3e-3, n_t limit 0.1 * 0.018/8 = 2.25e-4.
        var pivot = new PivotResults(0.965, -1e-3, 0.010, -0.0013, 2.1e-9, 0.05, 55, 5, 1e-5, 1e16, 1, 60, 0, 1e-6, 1000);
        var sr = new ModeSolver.Estimates.SlowRollPrediction("hubble-2", 2.1e-9, 0.0121 * 2.1e-9, 0.965, 0.0121, -0.00125, 0.0005);
        var flags = Flags.PivotDeviations(pivot, sr, "second-order slow roll", s);
        Assert.Equal(["r", "alpha_s"], flags.Select(x => x.Quantity).ToArray());

        var loose = s with { PivotFraction = 2.0 };
        Assert.Empty(Flags.PivotDeviations(pivot, sr, "second-order slow roll", loose));
    }

    [Fact]
    public void Default_sigmas_are_the_documented_ones()
    {
        var s = FlagSettings.Default;
        Assert.Equal(0.0042, s.SigmaNs);       // Planck 2018 X, A&A 641, A10
        Assert.Equal(0.018, s.SigmaR, 15);     // BICEP/Keck 2021 95% bound 0.036, halved (common practice)
        Assert.Equal(0.0067, s.SigmaAlphaS);   // Planck 2018 X, -0.0045 +- 0.0067 (from memory)
        Assert.Equal(0.01, s.SpectrumThreshold);
        Assert.Equal(0.1, s.PivotFraction);
        Assert.Throws<ArgumentException>(() => (s with { SigmaNs = -1 }).Validate());
    }

    [Fact]
    public void Background_phase_inside_the_window_gives_an_N_range_clipped_to_the_window()
    {
        var n = Enumerable.Range(0, 601).Select(i => i * 0.1).ToArray();
        // epsilon_1: 0.01 with a triangular excursion to 0.31 centred on N = 20 (above 0.1 for |N - 20| < 1.4: 0.3 (1 - d/2) > 0.09 for d < 1.4).
        var e1 = n.Select(x => 0.01 + Math.Max(0, 0.3 * (1 - Math.Abs(x - 20) / 2.0))).ToArray();
        var flags = Flags.BackgroundPhases(n, e1, "epsilon_1", 0.1, 10, 30);
        var f = Assert.Single(flags);
        Assert.Equal(FlagKinds.BackgroundPhase, f.Kind);
        Assert.Equal(20 - 1.4, f.Lower, 6);
        Assert.Equal(20 + 1.4, f.Upper, 6);
        Assert.Equal(0.31, f.Exact, 9);
        Assert.True(double.IsNaN(f.SlowRoll));

        // Clipped: window ends inside the phase.
        var clipped = Assert.Single(Flags.BackgroundPhases(n, e1, "epsilon_1", 0.1, 10, 19.5));
        Assert.Equal(19.5, clipped.Upper, 12);
        // Outside the window: nothing.
        Assert.Empty(Flags.BackgroundPhases(n, e1, "epsilon_1", 0.1, 30, 50));
    }

    [Fact]
    public void Synthetic_run_flags_only_the_scalar_bump()
    {
        var r = SyntheticReport.Create();
        var f = Assert.Single(r.Flags);
        Assert.Equal("P_s", f.Quantity);
        Assert.Empty(SyntheticReport.Create(bumpHeight: 0.005).Flags);
    }
}
