using System.Globalization;

namespace ModeSolver.Sweeps;

/// <summary>
/// The exclusive lock of a sweep output directory, held for a run's lifetime: an advisory lock (flock) on the file
/// <see cref="FileName"/> in the directory, taken without waiting. The holder's process id, host and start time go to
/// <see cref="OwnerFileName"/> so that a refused run can say who holds it. The lock is released when the process
/// ends, however it ends; the two small files stay (deleting a lock file would race with the next run).
/// </summary>
public sealed class SweepLock : IDisposable
{
    /// <summary>The lock file in the output directory.</summary>
    public const string FileName = ".sweep.lock";

    /// <summary>The file naming the lock's holder.</summary>
    public const string OwnerFileName = ".sweep.lock.owner";

    private readonly FileStream _stream;

    private SweepLock(FileStream stream, string directory)
    {
        _stream = stream;
        Directory = directory;
    }

    /// <summary>The locked directory.</summary>
    public string Directory { get; }

    /// <summary>
    /// Takes the lock of <paramref name="directory"/> (which must exist), or throws a one-line
    /// <see cref="SweepException"/> naming the process that holds it.
    /// </summary>
    public static SweepLock Acquire(string directory)
    {
        string path = Path.Combine(directory, FileName), owner = Path.Combine(directory, OwnerFileName);
        if (File.Exists(path) && !FileKind.IsRegularFile(path))
            throw new SweepException($"{path}: exists and is not a regular file; remove it or use another --out");
        FileStream stream;
        try
        {
            // FileShare.None takes an exclusive flock on Unix; a second holder's open fails at once.
            stream = new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None, 1);
        }
        catch (IOException e) when (e is not FileNotFoundException and not DirectoryNotFoundException and not PathTooLongException)
        {
            string who = "another process";
            try
            {
                if (FileKind.IsRegularFile(owner)) who = File.ReadAllText(owner).Trim();
            }
            catch (IOException) { }
            catch (UnauthorizedAccessException) { }
            throw new SweepException($"{directory}: in use by another sweep ({SweepDeck.OneLine(who)}); wait for it to end or use another --out");
        }
        try
        {
            string text = string.Create(CultureInfo.InvariantCulture,
                $"process {Environment.ProcessId} on {Environment.MachineName}, started {DateTime.UtcNow:yyyy-MM-dd HH:mm:ss} UTC\n");
            SweepOutputs.WriteAtomically(owner, p => File.WriteAllText(p, text));
        }
        catch
        {
            stream.Dispose();
            throw;
        }
        return new SweepLock(stream, directory);
    }

    /// <inheritdoc />
    public void Dispose() => _stream.Dispose();
}
