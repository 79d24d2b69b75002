namespace ModeSolver.Tests.Native;

/// <summary>
/// The Python package (python/) over the published libmodesolver.so: its unittest suite (python/tests), which also
/// builds a wheel with the in-tree backend and runs the Boltzmann-grid example, with a python3 that has numpy.
/// </summary>
public class NativePythonTests
{
    [SkippableFact]
    public void ThePythonPackagesTestsPass()
    {
        Skip.If(NativeBuild.PythonWithNumpy is null, NativeBuild.NoNumpy);
        string lib = Path.Combine(NativeBuild.LibraryDirectory, "libmodesolver.so");
        var (code, o, e) = NativeBuild.Execute(NativeBuild.PythonWithNumpy!,
            ["-m", "unittest", "discover", "-s", Path.Combine(NativeBuild.Repo, "python", "tests"), "-v"],
            new Dictionary<string, string> { ["MODESOLVER_LIB"] = lib, ["PYTHONDONTWRITEBYTECODE"] = "1" });
        Assert.True(code == 0, $"python3 -m unittest failed:\n{o}\n{e}");
        Assert.Matches(@"Ran \d+ tests", e);
        Assert.DoesNotContain("skipped", e);
        Assert.EndsWith("OK", e.TrimEnd());
    }
}
