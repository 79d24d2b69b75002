using System.Diagnostics;
using System.Globalization;
using ModeSolver.Sweeps;

namespace ModeSolver.Tests.Sweeps;

/// <summary>
/// Sweeps with the real physics evaluator (<see cref="PipelineSweepEvaluator"/>): physics limits, failed points,
/// unknown keys, and the real CLI under mpirun and under real process kills.
/// </summary>
public class PipelineSweepTests
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    /// <summary>A T-model run deck (a scenario of our own) followed by the given [sweep] table.</summary>
    private static string TModelDeck(string sweep) => """
        [model]
        catalogue = "t-model"

        [model.parameters]
        alpha = 1.0
        V0 = 1.0e-10

        [start]
        phi0 = 6.5

        [pivot]
        k = 0.05
        efolds = 55

        [normalisation]
        a_s = 2.1e-9

        """ + sweep;

    private static string WriteDeck(string dir, string text)
    {
        var path = Path.Combine(dir, "deck.toml");
        File.WriteAllText(path, text);
        return path;
    }

    private static SweepRecord[] RunInProcess(string deckText, int threads, string name)
    {
        var dir = SweepTestSupport.TempDir(name);
        var spec = SweepDeck.ParseSpec(deckText, "deck.toml");
        var evaluator = PipelineSweepEvaluator.FromDeckText(deckText, "deck.toml");
        var summary = SweepRunner.Run(spec, deckText, evaluator, SweepTestSupport.Options(dir, threads));
        Assert.True(summary.Completed);
        return SweepResults.Load(dir).Records.OrderBy(r => r.Index).ToArray();
    }

    /// <summary>
    /// T-model at N_* = 60 over alpha = 1e-3 .. 1: the attractor limits n_s -> 1 - 2/N and r -> 12 alpha / N^2
    /// (Kallosh, Linde & Roest 2013, JHEP 11, 198; physics.md 4d).
    /// Tolerances, from the slow-roll expansion (our derivation, stated so it can be checked): with
    /// x = phi / sqrt(6 alpha), N = (3 alpha / 4) (cosh 2x - cosh 2x_end) and eps_V = 4 / (3 alpha sinh^2 2x), so
    /// r = 16 eps_V = 12 alpha / N^2 * (1 - 3 alpha cosh(2x_end) / (2N) + O(1/N^2)), and cosh 2x_end ~ 2 / sqrt(3 alpha)
    /// for small alpha: the alpha-dependent part of r / (12 alpha / N^2) - 1 is about -sqrt(3 alpha) / N and vanishes
    /// like sqrt(alpha). What remains at alpha -> 0 is an alpha-independent O(1/N) piece (the end of inflation at
    /// eps_H = 1 rather than eps_V = 1, and exact vs leading-order slow roll shift N by O(1): r = 12 alpha / (N + dN)^2).
    /// Checks: |r / (12 alpha/N^2) - 1| &lt;= 2/N (measured at most 1.49/N); the step of that quantity between adjacent
    /// decades of alpha shrinks by about 1/sqrt(10) per decade (accepted 0.2 .. 0.45; measured 0.27 and 0.33);
    /// |n_s - (1 - 2/N)| &lt;= 1/N^2, the size of the next order in 1/N (measured at most 0.78/N^2).
    /// </summary>
    [Fact]
    public void TModelApproachesTheAttractorLimitsAtSmallAlpha()
    {
        // phi0 chosen for about 72 slow-roll e-folds at each alpha: (3 alpha/4) cosh(2 phi0 / sqrt(6 alpha)) = 72.
        var deck = TModelDeck("""
            [sweep]
            zip = ["param.alpha", "phi0"]

            [[sweep.axis]]
            key = "param.alpha"
            values = [0.001, 0.01, 0.1, 1.0]

            [[sweep.axis]]
            key = "phi0"
            values = [0.48, 1.25, 2.95, 6.5]

            [[sweep.axis]]
            key = "efolds"
            values = [60]
            """);
        var records = RunInProcess(deck, 2, "attractor");
        const double n = 60;
        double[] alphas = [0.001, 0.01, 0.1, 1.0];
        var d = new double[alphas.Length];
        for (int i = 0; i < alphas.Length; i++)
        {
            var rec = records[i];
            Assert.True(rec.Ok, $"alpha = {alphas[i]}: {rec.Message}");
            Assert.Equal(n, rec.NStar, 9);
            double nsDev = Math.Abs(rec.Ns - (1 - 2 / n));
            Assert.True(nsDev <= 1 / (n * n), $"alpha = {alphas[i]}: |n_s - (1 - 2/N)| = {nsDev:G4} > 1/N^2");
            d[i] = rec.R / (12 * alphas[i] / (n * n)) - 1;
            Assert.True(Math.Abs(d[i]) <= 2 / n, $"alpha = {alphas[i]}: r / (12 alpha/N^2) - 1 = {d[i]:G4} exceeds 2/N");
            // Second-order slow roll (physics.md 4c): n_t / (-r/8) = 1 + eps2 + O(eps^2), and eps2 = 2/N on the plateau
            // (n_s - 1 = -2 eps1 - eps2 = -2/N with eps1 << eps2); tolerance 0.3/N covers the O(1/N^2) remainder.
            // Not at alpha = 0.001: there |n_t| = 4e-7 and the numerical d ln P_t / d ln k is good to about 1e-8 only.
            if (alphas[i] >= 0.01) Assert.Equal(1 + 2 / n, rec.Nt / (-rec.R / 8), 0.3 / n);
        }
        double step01 = Math.Abs(d[1] - d[0]), step12 = Math.Abs(d[2] - d[1]), step23 = Math.Abs(d[3] - d[2]);
        Assert.True(step01 < step12 && step12 < step23, $"r/(12 alpha/N^2) does not converge toward small alpha: steps {step23:G3}, {step12:G3}, {step01:G3}");
        foreach (double ratio in new[] { step01 / step12, step12 / step23 })
            Assert.InRange(ratio, 0.2, 0.45);
    }

    [Fact]
    public void PhysicallyImpossiblePointIsRecordedAsFailedAndTheSweepGoesOn()
    {
        // phi0 = 2 gives far fewer than 60 e-folds at alpha = 1; phi0 = 6.5 gives about 72.
        var deck = TModelDeck("""
            [sweep]
            [[sweep.axis]]
            key = "phi0"
            values = [2.0, 6.5]

            [[sweep.axis]]
            key = "efolds"
            values = [60]
            """);
        var records = RunInProcess(deck, 1, "failed-point");
        Assert.Equal(2, records.Length);
        Assert.False(records[0].Ok);
        Assert.Contains("e-folds", records[0].Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', records[0].Message);
        Assert.True(records[1].Ok, records[1].Message);
        Assert.InRange(records[1].Ns, 0.96, 0.97);
    }

    [Fact]
    public void PivotDeviationFlagsCompareExactWithSecondOrderSlowRoll()
    {
        var text = TModelDeck("""
            [sweep]
            [[sweep.axis]]
            key = "efolds"
            values = [55]
            """);
        var spec = SweepDeck.ParseSpec(text, "deck.toml");
        var runDeck = ModeSolver.Decks.DeckReader.Parse(SweepDeck.RemoveSweep(text, "deck.toml"), "deck.toml");
        var point = spec.GetPoint(0);
        // Default thresholds (0.1 sigma): exact and second-order slow roll agree for the T-model, no flag.
        var quiet = new PipelineSweepEvaluator(runDeck, spec.Keys, "deck.toml").Evaluate(point, CancellationToken.None);
        Assert.True(quiet.Ok, quiet.Message);
        Assert.Empty(quiet.Flags);
        // Thresholds far below the exact-vs-slow-roll difference (a 1e-9 fraction of sigma): every compared quantity flags.
        var strict = new ModeSolver.Diagnostics.FlagSettings(PivotFraction: 1e-9);
        var loud = new PipelineSweepEvaluator(runDeck, spec.Keys, "deck.toml", strict).Evaluate(point, CancellationToken.None);
        Assert.Equal(["n_s-deviation", "r-deviation", "alpha_s-deviation", "n_t-deviation"], loud.Flags);
        Assert.Equal(quiet.Ns, loud.Ns);
    }

    [Fact]
    public void RunDeckErrorsAfterTheSweepTableCiteTheirOwnLine()
    {
        const string text = "[model]\ncatalogue = \"t-model\"\n\n[sweep]\n[[sweep.axis]]\nkey = \"efolds\"\nvalues = [50, 60]\n\n[start]\nphi00 = 6.5\n";
        var ex = Assert.Throws<ModeSolver.Decks.DeckException>(() => PipelineSweepEvaluator.FromDeckText(text, "deck.toml"));
        Assert.StartsWith("deck.toml:10: start.phi00 is not a key of [start]", ex.Message, StringComparison.Ordinal);
        // The blanked deck keeps every line; the removed one keeps none of the sweep table's.
        Assert.Equal(text.Count(c => c == '\n'), SweepDeck.BlankSweep(text).Count(c => c == '\n'));
        Assert.DoesNotContain("sweep", SweepDeck.BlankSweep(text), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("reheat.temperature", "reheat.temperature")]
    [InlineData("param.", "param.")]
    [InlineData("param.beta", "model t-model has no parameter 'beta' (its parameters: V0, alpha)")]
    public void UnknownSweepKeyIsRefusedWithOneLineBeforeAnyPointRuns(string key, string expected)
    {
        var dir = SweepTestSupport.TempDir("unknown-key");
        var deck = WriteDeck(dir, TModelDeck($"""
            [sweep]
            [[sweep.axis]]
            key = "{key}"
            values = [1.0, 2.0]
            """));
        var ex = Assert.Throws<SweepException>(() => PipelineSweepEvaluator.FromDeck(deck));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', ex.Message);
        if (!key.StartsWith("param.", StringComparison.Ordinal))
            Assert.Contains("valid: param.NAME, model, efolds, reheat.w, reheat.T, reheat.efolds, reheat.dof, phi0, start.efolds, phi_end, k_pivot, amplitude", ex.Message, StringComparison.Ordinal);

        var outDir = Path.Combine(dir, "out");
        var (code, stdout, stderr) = CliProcess.Run(["sweep", deck, "--out", outDir, "--quiet"]);
        Assert.Equal(2, code);
        Assert.Equal("", stdout);
        var line = Assert.Single(stderr.Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.Contains(expected, line, StringComparison.Ordinal);
        Assert.False(Directory.Exists(outDir));
    }

    [Fact]
    public void ParameterOfAFormulaModelMustBeUsedByItsFormulas()
    {
        const string text = "[model]\npotential = \"V0 * (1 - exp(-b * phi))^2\"\n[model.parameters]\nV0 = 1e-10\nb = 0.8\n[start]\nphi0 = 8.0\n" +
                            "[sweep]\n[[sweep.axis]]\nkey = \"param.c\"\nvalues = [0.5, 0.8]\n";
        var ex = Assert.Throws<SweepException>(() => PipelineSweepEvaluator.FromDeckText(text, "deck.toml"));
        Assert.Equal("deck.toml: sweep axis 'param.c': the model's formulas use no parameter 'c' (they use: V0, b)", ex.Message);
        Assert.NotNull(PipelineSweepEvaluator.FromDeckText(text.Replace("param.c", "param.b"), "deck.toml"));
    }

    [Fact]
    public void SpectraAreStoredWhenAskedForAndThreadCountDoesNotChangeResults()
    {
        var deck = TModelDeck("""
            [modes]
            k_min = 1.0e-3
            k_max = 0.2
            count = 12
            tolerance = 1.0e-5

            [sweep]
            spectra = true

            [[sweep.axis]]
            key = "reheat.T"
            values = [1.0e6, 1.0e12]

            [[sweep.axis]]
            key = "reheat.w"
            values = [0.0, 0.5]
            """);
        var one = RunInProcess(deck, 1, "spectra1");
        var two = RunInProcess(deck, 2, "spectra2");
        Assert.Equal(4, one.Length);
        for (int i = 0; i < one.Length; i++)
        {
            Assert.True(one[i].Ok, one[i].Message);
            Assert.Equal(one[i].Ns, two[i].Ns);
            Assert.Equal(one[i].R, two[i].R);
            Assert.Equal(one[i].Ps, two[i].Ps);
            var k = one[i].K!;
            Assert.True(k.Length >= 12);
            Assert.Equal(k.Length, one[i].Ps!.Length);
            Assert.Equal(k.Length, one[i].Pt!.Length);
            // The pivot is one of the computed wavenumbers; there P_s is the normalisation A_s (exact amplitude).
            int p = Array.FindIndex(k, x => Math.Abs(x / 0.05 - 1) < 1e-6);
            Assert.True(p >= 0, "the pivot k is not among the stored wavenumbers");
            Assert.Equal(1.0, one[i].Ps![p] / 2.1e-9, 1e-4);
            Assert.Equal(one[i].R, one[i].Pt![p] / one[i].Ps![p], 1e-4 * one[i].R);
        }
        // Points: (T_reh, w) = (1e6, 0), (1e6, 0.5), (1e12, 0), (1e12, 0.5). From physics.md section 5 (compare
        // Liddle & Leach 2003, PRD 68, 103503), N_* depends on the reheating phase through
        // (1 - 3w) / (12 (1 + w)) ln(rho_reh / rho_end): a longer phase (lower T_reh) lowers N_* for w < 1/3 and
        // raises it for w > 1/3; at fixed T_reh a stiffer fluid gives the larger N_*.
        Assert.True(one[2].NStar > one[0].NStar, "w = 0: higher T_reh must give a larger N_*");
        Assert.True(one[3].NStar < one[1].NStar, "w = 0.5: higher T_reh must give a smaller N_*");
        Assert.True(one[1].NStar > one[0].NStar, "T_reh = 1e6 GeV: w = 0.5 must give a larger N_* than w = 0");
    }

    [SkippableFact]
    public void TwoMpiRanksThroughTheCliEqualTheSerialRun()
    {
        Skip.IfNot(MpiTestHost.MpirunAvailable, MpiTestHost.SkipReason);
        var dir = SweepTestSupport.TempDir("mpi-real");
        var deck = WriteDeck(dir, TModelDeck("""
            [sweep]
            zip = ["param.alpha", "phi0"]

            [[sweep.axis]]
            key = "param.alpha"
            values = [0.1, 1.0, 10.0]

            [[sweep.axis]]
            key = "phi0"
            values = [2.95, 6.5, 2.0]     # the last gives too few e-folds: a failed point

            [[sweep.axis]]
            key = "efolds"
            values = [50, 60]
            """));
        var serial = Path.Combine(dir, "serial");
        var (code, _, stderr) = CliProcess.Run(["sweep", deck, "--out", serial, "--quiet"]);
        Assert.True(code == 0, stderr);
        var mpi = MpiTestHost.RunSweepUnderMpi(2, deck);
        SweepTestSupport.AssertSameOutputs(serial, mpi);
        var records = SweepResults.Load(mpi).Records;
        Assert.Equal(6, records.Count);
        Assert.Equal(2, records.Count(r => !r.Ok));
    }

    /// <summary>
    /// Real process kills: the CLI runs as a child process, is killed (whole process tree) once some points are in
    /// the journal, and resumed with the same command; the files equal an uninterrupted run's.
    /// </summary>
    [Fact]
    public void KilledAndResumedCliSweepEqualsAnUninterruptedOne()
    {
        var dir = SweepTestSupport.TempDir("kill-real");
        var deck = WriteDeck(dir, TModelDeck("""
            [sweep]
            [[sweep.axis]]
            key = "k_pivot"
            values = [0.002, 0.05]

            [[sweep.axis]]
            key = "efolds"
            linear = [46, 64, 19]
            """));
        const int total = 38;
        var reference = Path.Combine(dir, "reference");
        Assert.Equal(0, CliProcess.Run(["sweep", deck, "--out", reference, "--quiet", "--threads", "1"]).ExitCode);

        var rng = new Random();
        // Scenario 1: one kill, then resume. Scenario 2: two kills at increasing moments, then resume.
        var scenarios = new[] { new[] { rng.Next(1, 20) }, new[] { rng.Next(1, 10), rng.Next(12, 30) } };
        int interrupted = 0;
        foreach (var kills in scenarios)
        {
            var outDir = Path.Combine(dir, "killed-" + string.Join("-", kills));
            string[] args = ["sweep", deck, "--out", outDir, "--quiet", "--threads", "1"];
            foreach (int after in kills)
                if (KillAfter(args, Path.Combine(outDir, SweepFiles.Journal), after, total)) interrupted++;
            var (code, stdout, stderr) = CliProcess.Run(args);
            Assert.True(code == 0, $"resume after kills at {string.Join(", ", kills)} points: exit {code}: {stderr}");
            Assert.Contains("from an earlier run", stdout, StringComparison.Ordinal);
            SweepTestSupport.AssertSameOutputs(reference, outDir);
        }
        Assert.True(interrupted >= 2, $"only {interrupted} of the kills interrupted a running sweep");
    }

    /// <summary>Starts the CLI, kills its process tree once the journal holds <paramref name="points"/> points; true when it was still running.</summary>
    private static bool KillAfter(string[] args, string journal, int points, int total)
    {
        using var p = Process.Start(CliProcess.StartInfo(args))!;
        var sw = Stopwatch.StartNew();
        while (!p.HasExited && sw.Elapsed < TimeSpan.FromSeconds(60))
        {
            if (CliProcess.JournalPoints(journal) >= points) break;
            Thread.Sleep(5);
        }
        bool running = !p.HasExited;
        if (running) p.Kill(entireProcessTree: true);
        p.WaitForExit();
        return running && CliProcess.JournalPoints(journal) < total;
    }
}
