using System.CommandLine;
using ModeSolver.Decks;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// `modesolver spectrum [DECK] [options]`: resolves and validates the run settings, builds the theory, and runs
/// <see cref="Execute"/>. For now Execute prints a summary of the resolved settings; the pipeline replaces it.
/// </summary>
public static class SpectrumCommand
{
    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var cmd = new Command("spectrum", "Compute the scalar and tensor spectra of a model (from a deck and/or options).")
        {
            TreatUnmatchedTokensAsErrors = false,
        };
        var options = RunOptions.Add(cmd);
        cmd.SetAction(parse => CommandErrors.Guard(() =>
        {
            var settings = options.Resolve(parse);
            return Execute(settings, Console.Out, Console.Error);
        }));
        return cmd;
    }

    /// <summary>
    /// Runs the spectrum pipeline on validated settings and returns the exit code. Currently: builds the theory
    /// (checking it is valid at phi0), prints warnings to <paramref name="error"/> and a one-paragraph summary to
    /// <paramref name="output"/>, returns 0. This is the single method the pipeline wiring replaces.
    /// </summary>
    public static int Execute(RunSettings settings, TextWriter output, TextWriter error)
    {
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(output);
        ArgumentNullException.ThrowIfNull(error);
        var theory = TheoryFactory.Build(settings);
        foreach (string w in settings.Warnings) error.WriteLine("modesolver: warning: " + w);
        output.WriteLine(settings.Summary());
        var (lo, hi) = theory.ValidRange;
        if (double.IsFinite(lo) || double.IsFinite(hi))
            output.WriteLine(FormattableString.Invariant($"The theory is valid for {Bound(lo)} < phi < {Bound(hi)}."));
        return 0;
    }

    private static string Bound(double x) =>
        double.IsPositiveInfinity(x) ? "inf" : double.IsNegativeInfinity(x) ? "-inf" : x.ToString("G6", System.Globalization.CultureInfo.InvariantCulture);
}
