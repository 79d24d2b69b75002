using System.Globalization;
using ModeSolver.Decks;
using ModeSolver.Perturbations;
using ModeSolver.Pipeline;
using ModeSolver.Spectra;

namespace ModeSolver.Benchmarks.Perturbations;

/// <summary>
/// `--error-honesty [CASE]`: the per-k error estimate of a spectrum against the true error, measured by re-solving every
/// sample 1000x tighter on the same normalised background; prints max(true / reported) per model (figures in docs/modes.md).
/// </summary>
public static class ErrorHonesty
{
    /// <summary>A hard model of the set: command-line-like settings.</summary>
    public sealed record Case(string Name, Action<RunInput> Set);

    private static Located<double> L(double v, string key) => new(v, key);

    /// <summary>The hard models of the honesty check.</summary>
    public static IReadOnlyList<Case> Cases { get; } =
    [
        new("usr-dip", i =>
        {
            i.Potential = new("V0*(1-exp(-sqrt(2/3)*phi))^2*(1 - A*exp(-(phi-p1)^2/(2*s^2)))", "--potential");
            i.Parameters["V0"] = L(1e-10, "--param"); i.Parameters["A"] = L(0.00240120849609375, "--param");
            i.Parameters["p1"] = L(4.1, "--param"); i.Parameters["s"] = L(0.018, "--param");
            i.Phi0 = L(6, "--phi0"); i.KMin = L(1e-4, "--k-min"); i.KMax = L(1e18, "--k-max"); i.KCount = new(200, "--k-count");
        }),
        new("step-deck", i => Deck(i, "runs/step-feature.toml")),
        new("broken-linear", i => i.ModelId = new("broken-linear", "--model")),
        // The pivot matching of this model does not converge yet (a separate issue item): N_* given, V as it stands.
        new("palatini-1e6", i =>
        {
            i.ModelId = new("higgs-like-palatini", "--model"); i.Parameters["xi"] = L(1e6, "--param");
            i.Efolds = L(55, "--efolds"); i.Amplitude = new(null, "--amplitude");
        }),
        new("palatini-1e4", i =>
        {
            i.ModelId = new("higgs-like-palatini", "--model"); i.Parameters["xi"] = L(1e4, "--param");
            i.Efolds = L(55, "--efolds"); i.Amplitude = new(null, "--amplitude");
        }),
        new("t-model-1e-3", i => { i.ModelId = new("t-model", "--model"); i.Parameters["alpha"] = L(1e-3, "--param"); }),
    ];

    private static void Deck(RunInput i, string path)
    {
        string root = FindRoot();
        var deck = DeckReader.Parse(File.ReadAllText(Path.Combine(root, path)), path);
        var merged = RunInput.Merge(deck, new RunInput());
        foreach (var p in typeof(RunInput).GetProperties().Where(p => p.CanWrite)) p.SetValue(i, p.GetValue(merged));
        foreach (var (k, v) in merged.Parameters) i.Parameters[k] = v;
    }

    internal static string FindRoot()
    {
        var d = new DirectoryInfo(AppContext.BaseDirectory);
        while (d is not null && !File.Exists(Path.Combine(d.FullName, "ModeSolver.sln"))) d = d.Parent;
        return d?.FullName ?? throw new InvalidOperationException("repository root not found");
    }

    /// <summary>
    /// The reference mode: 1000x tighter; where its own estimate is not 10x below the sample's (a mode started near a
    /// fast feature, whose start the tolerance hardly moves), again from 4x and 16x deeper until it is.
    /// </summary>
    private static ModeResult Reference(ModeIntegrator integrator, ModeSolver.Background.IBackground bg, double k, ModeSettings tight, ModeSettings fallback, double reported)
    {
        ModeResult m;
        try { m = integrator.Solve(bg, k, tight); }
        catch (ModeSolver.Physics.PhysicsException) { m = integrator.Solve(bg, k, fallback); tight = fallback; }
        for (int i = 0; i < 2 && m.ErrorEstimate > 0.1 * reported; i++)
            m = integrator.Solve(bg, k, tight with { StartDepth = 4 * m.StartDepth });
        return m;
    }

    /// <summary>Runs the set (or the named case) and prints one line per model.</summary>
    public static void Run(string[] args)
    {
        string? only = args.Length >= 2 ? args[1] : null;
        foreach (var c in Cases)
        {
            if (only is not null && c.Name != only) continue;
            var input = new RunInput();
            c.Set(input);
            var settings = SettingsResolver.Resolve(input);
            PivotRun run;
            try { run = SpectrumPipeline.RunPivot(settings); }
            catch (ModeSolver.Physics.PhysicsException e) { Console.WriteLine($"{c.Name,-14} not run: {e.Message}"); continue; }
            var pivot = run.Pivot;
            var bg = pivot.Background;
            var kr = run.Settings.KRange;
            var ss = new SpectrumSettings
            {
                KMin = pivot.ToBackgroundUnits(kr.KMin), KMax = pivot.ToBackgroundUnits(kr.KMax), KCount = kr.Count,
                MaxPoints = Math.Max(kr.Count + 1, 2000), Tolerance = kr.Tolerance,
                ExtraK = kr.KMin <= pivot.KPivot && pivot.KPivot <= kr.KMax ? [pivot.ToBackgroundUnits(pivot.KPivot)] : [],
            };
            var sw = System.Diagnostics.Stopwatch.StartNew();
            var spec = SpectrumSolver.Compute(bg, ss);
            double tSpec = sw.Elapsed.TotalSeconds;
            var refSettings = new ModeSettings { Tolerance = kr.Tolerance / 3.0 / 1000.0, MaxSteps = 400_000 };
            var fallback = refSettings with { StopDepth = new ModeSettings { Tolerance = kr.Tolerance / 3.0 }.EffectiveStopDepth };
            double worst = 0, worstTrue = 0, worstRep = 0, worstK = 0, worstUnbounded = 0;
            int unbounded = 0;
            var integrator = new ModeIntegrator();
            var lines = new List<string>();
            for (int j = 0; j < spec.Count; j++)
            {
                var m = Reference(integrator, bg, spec.K[j], refSettings, fallback, spec.ErrorEstimate[j]);
                double t = Math.Max(Math.Abs(spec.Ps[j] / m.Ps - 1), Math.Abs(spec.Pt[j] / m.Pt - 1));
                double ratio = t / spec.ErrorEstimate[j];
                if (args.Contains("--all"))
                {
                    var same = integrator.Solve(bg, spec.K[j], new ModeSettings { Tolerance = kr.Tolerance / 3.0 }, FrictionScan.FromStart(bg));
                    lines.Add(FormattableString.Invariant($"  k={pivot.ToInverseMpc(spec.K[j]):G4} Ps={spec.Ps[j]:G5} true={t:G3} rep={spec.ErrorEstimate[j]:G3} ratio={ratio:G3} x0={m.StartDepth:G3} same={same.Ps / spec.Ps[j] - 1:G3} x0s={same.StartDepth:G3} Nf={same.NFinal:F2} est={same.ErrorEstimate:G3}"));
                }
                bool bounded = spec.ErrorBounded.Length == 0 || spec.ErrorBounded[j];
                if (!bounded) { unbounded++; worstUnbounded = Math.Max(worstUnbounded, ratio); continue; }
                if (ratio > worst) { worst = ratio; worstTrue = t; worstRep = spec.ErrorEstimate[j]; worstK = pivot.ToInverseMpc(spec.K[j]); }
            }
            foreach (var l in lines) Console.WriteLine(l);
            Console.WriteLine(FormattableString.Invariant(
                $"{c.Name,-14} samples {spec.Count,4}  max true/reported {worst,8:G3} at k = {worstK:G4} /Mpc (true {worstTrue:G3}, reported {worstRep:G3})  max reported {spec.MaxRelativeError:G3}  not bounded: {unbounded} (max ratio {worstUnbounded:G3})  spectrum {tSpec:F1} s"));
        }
    }
}
