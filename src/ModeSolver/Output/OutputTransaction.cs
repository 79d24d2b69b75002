namespace ModeSolver.Output;

/// <summary>An output file could not be written; the message names the file and the reason in one line.</summary>
public sealed class OutputException(string message, Exception? inner = null) : IOException(message, inner);

/// <summary>
/// All-or-nothing output of one run. Each file is first written under a temporary name in the target directory
/// (".&lt;name&gt;.tmp-&lt;random&gt;"); <see cref="Commit"/> renames them all into place. If any writer throws, or a rename
/// fails, every temporary is removed, files that were replaced are restored from backups, and directories this
/// transaction created are removed again if empty: the output directory is left as it was.
/// </summary>
public sealed class OutputTransaction : IDisposable
{
    private readonly List<(string Temp, string Final)> _staged = [];
    private readonly List<string> _createdDirectories = []; // deepest first
    private bool _directoryReady;
    private bool _finished;

    /// <summary>Starts a transaction for files in <paramref name="directory"/> (created on first use if missing).</summary>
    public OutputTransaction(string directory)
    {
        if (string.IsNullOrWhiteSpace(directory))
            throw new ArgumentException("output directory must not be empty");
        Directory = Path.GetFullPath(directory);
    }

    /// <summary>
    /// A cheap check before a long run: throws <see cref="OutputException"/> when <paramref name="directory"/> is an
    /// existing file or cannot be created because a part of its path is a file. Touches nothing.
    /// </summary>
    public static void Precheck(string directory)
    {
        if (string.IsNullOrWhiteSpace(directory)) throw new OutputException("the output directory is empty");
        string full;
        try
        {
            full = Path.GetFullPath(directory);
        }
        catch (Exception ex) when (ex is ArgumentException or NotSupportedException or PathTooLongException)
        {
            throw new OutputException($"the output directory '{directory}' is not a valid path: {OneLine(ex.Message)}", ex);
        }
        for (string? d = full; d is not null; d = Path.GetDirectoryName(d))
        {
            if (File.Exists(d))
                throw new OutputException(d == full
                    ? $"output directory {full} is an existing file; choose another directory"
                    : $"cannot create output directory {full}: {d} is a file; choose another directory");
            if (System.IO.Directory.Exists(d)) return;
        }
    }

    /// <summary>Absolute path of the output directory.</summary>
    public string Directory { get; }

    /// <summary>Final paths of the files staged so far.</summary>
    public IReadOnlyList<string> Files => _staged.Select(s => s.Final).ToList();

    /// <summary>
    /// Writes one file under a temporary name by calling <paramref name="write"/> with the temporary path. If the
    /// writer throws, the whole transaction is rolled back and an <see cref="OutputException"/> naming the file is thrown.
    /// </summary>
    /// <param name="fileName">Plain file name (no directory part), unique within the transaction.</param>
    /// <param name="write">Writes the complete file to the path it is given.</param>
    /// <returns>The final path the file will have after <see cref="Commit"/>.</returns>
    public string Stage(string fileName, Action<string> write)
    {
        ArgumentNullException.ThrowIfNull(write);
        if (_finished) throw new InvalidOperationException("output transaction already committed or rolled back");
        if (string.IsNullOrWhiteSpace(fileName) || fileName != Path.GetFileName(fileName) || fileName is "." or "..")
            throw new ArgumentException($"output file name '{fileName}' must be a plain file name without a directory part");
        string final = Path.Combine(Directory, fileName);
        foreach (var s in _staged)
            if (s.Final == final) throw new ArgumentException($"output file '{fileName}' is written twice in one run");

        string temp = Path.Combine(Directory, $".{fileName}.tmp-{Guid.NewGuid():N}"[..(fileName.Length + 14)]);
        try
        {
            EnsureDirectory();
            _staged.Add((temp, final));
            write(temp);
            if (!File.Exists(temp)) throw new IOException("the writer produced no file");
        }
        catch (Exception ex) when (ex is not OutputException)
        {
            Rollback();
            throw new OutputException($"cannot write {final}: {OneLine(ex.Message)}", ex);
        }
        catch
        {
            Rollback();
            throw;
        }
        return final;
    }

    /// <summary>
    /// Renames every staged file into place (replacing older files of the same name). On failure restores the
    /// directory to its previous state and throws <see cref="OutputException"/>.
    /// </summary>
    /// <returns>The final paths, in staging order.</returns>
    public IReadOnlyList<string> Commit()
    {
        if (_finished) throw new InvalidOperationException("output transaction already committed or rolled back");
        var backups = new List<(string Backup, string Final)>();
        var placed = new List<string>();
        string? current = null;
        try
        {
            foreach (var (temp, final) in _staged)
            {
                current = final;
                if (File.Exists(final))
                {
                    string backup = Path.Combine(Directory, $".{Path.GetFileName(final)}.bak-{Guid.NewGuid():N}");
                    File.Copy(final, backup);
                    backups.Add((backup, final));
                }
                File.Move(temp, final, overwrite: true);
                placed.Add(final);
            }
        }
        catch (Exception ex)
        {
            // Undo: remove what was placed, restore what was replaced, then drop temporaries and created directories.
            foreach (var f in placed) TryDelete(f);
            foreach (var (backup, final) in backups) TryRestore(backup, final);
            Rollback();
            throw new OutputException($"cannot put {current} in place: {OneLine(ex.Message)}", ex);
        }
        foreach (var (backup, _) in backups) TryDelete(backup);
        _finished = true;
        return placed;
    }

    /// <summary>Removes every temporary file and any directory this transaction created (if empty).</summary>
    public void Rollback()
    {
        foreach (var (temp, _) in _staged) TryDelete(temp);
        _staged.Clear();
        foreach (var dir in _createdDirectories)
        {
            try
            {
                if (System.IO.Directory.Exists(dir) && !System.IO.Directory.EnumerateFileSystemEntries(dir).Any())
                    System.IO.Directory.Delete(dir);
            }
            catch (IOException) { }
            catch (UnauthorizedAccessException) { }
        }
        _createdDirectories.Clear();
        _finished = true;
    }

    /// <summary>Rolls back unless <see cref="Commit"/> succeeded.</summary>
    public void Dispose()
    {
        if (!_finished) Rollback();
    }

    private void EnsureDirectory()
    {
        if (_directoryReady) return;
        if (File.Exists(Directory))
            throw new OutputException($"output directory {Directory} is an existing file");
        var missing = new List<string>();
        for (string? d = Directory; d is not null && !System.IO.Directory.Exists(d); d = Path.GetDirectoryName(d))
            missing.Add(d);
        try
        {
            System.IO.Directory.CreateDirectory(Directory);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new OutputException($"cannot create output directory {Directory}: {OneLine(ex.Message)}", ex);
        }
        _createdDirectories.AddRange(missing); // deepest first
        _directoryReady = true;
    }

    private static void TryDelete(string path)
    {
        try { if (File.Exists(path)) File.Delete(path); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }

    private static void TryRestore(string backup, string final)
    {
        try { File.Move(backup, final, overwrite: true); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }

    private static string OneLine(string s) => s.Replace('\r', ' ').Replace('\n', ' ');
}
