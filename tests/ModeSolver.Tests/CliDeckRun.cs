using ModeSolver.Tests.Decks;

namespace ModeSolver.Tests;

/// <summary>One in-process `modesolver spectrum DECK --out DIR ARGS...` run into a fresh temporary directory, for class fixtures.</summary>
public abstract class CliDeckRun : IDisposable
{
    protected CliDeckRun(string tag, string deck, params string[] args)
    {
        Root = CliRunner.TempDir(tag);
        Dir = Path.Combine(Root, "out");
        (Code, Out, Err) = CliRunner.Run(["spectrum", DeckTests.RepoFile(deck), .. args, "--out", Dir]);
    }

    public string Root { get; }
    public string Dir { get; }
    public int Code { get; }
    public string Out { get; }
    public string Err { get; }

    public string File(string name) => Path.Combine(Dir, name);

    public void Dispose()
    {
        if (Directory.Exists(Root)) Directory.Delete(Root, true);
        GC.SuppressFinalize(this);
    }
}
