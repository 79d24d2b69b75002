namespace ModeSolver.Output;

/// <summary>An output file could not be written; the message names the file and the reason in one line.</summary>
public sealed class OutputException(string message, Exception? inner = null) : Physics.ModeSolverException(message, inner)
{
    /// <inheritdoc/>
    public override int ExitCode => Physics.ExitCodes.Input;
}

/// <summary>
/// All-or-nothing output of one run, with the file-safety rules in one place:
/// <list type="bullet">
/// <item>Each file is first written under a short temporary name in the directory of the file it becomes
/// (<c>.ms-PID-RUN-N.tmp</c>, unique per run, whatever the length of the final name); <see cref="Commit"/> renames
/// them all into place.</item>
/// <item>Only regular files are ever replaced, backed up or deleted. A final name that exists as anything else (a
/// directory, device, named pipe, socket, dangling link) is refused before anything is written; a symbolic link to a
/// regular file keeps its link, and its target is replaced.</item>
/// <item>A file that is replaced keeps a backup until the whole commit succeeded: a hard link (<c>.ms-PID-RUN-N.bak</c>),
/// or a rename where hard links are not possible. Backups never copy content.</item>
/// <item>If any writer throws, or a rename fails, every temporary and backup of this run is removed, replaced files are
/// restored, and directories this transaction created are removed again if empty.</item>
/// <item>On first use of a directory, temporaries and backups left there by killed runs (recognised by their names and
/// by a process id that no longer runs) are removed.</item>
/// </list>
/// </summary>
public sealed partial class OutputTransaction : IDisposable
{
    private readonly List<Entry> _staged = [];
    private readonly List<string> _createdDirectories = []; // deepest first
    private readonly string _run = Environment.ProcessId.ToString(System.Globalization.CultureInfo.InvariantCulture) + "-" + Guid.NewGuid().ToString("N")[..8];
    private int _names;
    private bool _directoryReady;
    private bool _finished;

    private sealed record Entry(string Temp, string Final, string Target);

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
    public static void Precheck(string directory) => Precheck(directory, []);

    /// <summary>
    /// As <see cref="Precheck(string)"/>, and also refuses (in one line) when one of <paramref name="fileNames"/> exists
    /// in the directory as something other than a regular file (or a link to one): such entries are never replaced.
    /// </summary>
    public static void Precheck(string directory, IEnumerable<string> fileNames)
    {
        ArgumentNullException.ThrowIfNull(fileNames);
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
            var kind = FileKinds.Of(d);
            if (kind == FileKind.Directory) break;
            if (kind != FileKind.Missing)
                throw new OutputException(d == full
                    ? $"output directory {full} is {FileKinds.Describe(kind)}, not a directory; choose another directory"
                    : $"cannot create output directory {full}: {d} is {FileKinds.Describe(kind)}; choose another directory");
        }
        foreach (string name in fileNames) _ = ReplaceableTarget(Path.Combine(full, name));
    }

    /// <summary>
    /// The path a final name resolves to (itself, or the target of its symbolic links) when it is missing or a regular
    /// file; otherwise throws <see cref="OutputException"/>: only regular files are replaced.
    /// </summary>
    public static string ReplaceableTarget(string final)
    {
        var kind = FileKinds.Of(final);
        if (kind is not (FileKind.Missing or FileKind.Regular))
            throw new OutputException($"{final} exists and is {FileKinds.Describe(kind)}; ModeSolver replaces regular files only (remove it or choose another name)");
        if (kind == FileKind.Regular && !FileKinds.IsRegularFileItself(final))
            return new FileInfo(final).ResolveLinkTarget(returnFinalTarget: true)?.FullName ?? final;
        return final;
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

        try
        {
            EnsureDirectory();
            string target = ReplaceableTarget(final);
            string temp = Path.Combine(Path.GetDirectoryName(target)!, NextName("tmp"));
            _staged.Add(new Entry(temp, final, target));
            write(temp);
            if (!File.Exists(temp)) throw new IOException("the writer produced no file");
        }
        catch (Exception ex) when (ex is not OutputException)
        {
            Rollback();
            throw new OutputException($"cannot write {final}: {Reason(ex)}", ex);
        }
        catch
        {
            Rollback();
            throw;
        }
        return final;
    }

    /// <summary>
    /// Renames every staged file into place (replacing older regular files of the same name). On failure restores the
    /// directory to its previous state and throws <see cref="OutputException"/>.
    /// </summary>
    /// <returns>The final paths, in staging order.</returns>
    public IReadOnlyList<string> Commit()
    {
        if (_finished) throw new InvalidOperationException("output transaction already committed or rolled back");
        var backups = new List<(string Backup, string Target)>();
        var created = new List<string>();
        var placed = new List<string>();
        string? current = null;
        try
        {
            foreach (var e in _staged)
            {
                current = e.Final;
                // Checked again at the last moment: only a regular file (or nothing) is replaced.
                if (ReplaceableTarget(e.Final) != e.Target) throw new IOException("it changed while the run was writing");
                if (File.Exists(e.Target))
                {
                    string backup = Path.Combine(Path.GetDirectoryName(e.Target)!, NextName("bak"));
                    if (!FileKinds.TryHardLink(e.Target, backup)) File.Move(e.Target, backup);
                    backups.Add((backup, e.Target));
                }
                else created.Add(e.Target);
                File.Move(e.Temp, e.Target, overwrite: true);
                placed.Add(e.Final);
            }
        }
        catch (Exception ex)
        {
            // Undo: remove what was created, restore what was replaced, then drop temporaries and created directories.
            foreach (var f in created) TryDelete(f);
            foreach (var (backup, target) in backups) TryRestore(backup, target);
            Rollback();
            throw new OutputException($"cannot put {current} in place: {Reason(ex)}", ex);
        }
        foreach (var (backup, _) in backups) TryDelete(backup);
        _finished = true;
        return placed;
    }

    /// <summary>Removes every temporary file and any directory this transaction created (if empty).</summary>
    public void Rollback()
    {
        foreach (var e in _staged) TryDelete(e.Temp);
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

    /// <summary>
    /// Removes, from <paramref name="directory"/>, the temporaries and backups of runs that were killed: names
    /// <c>.ms-PID-RUN-N.tmp</c> or <c>.ms-PID-RUN-N.bak</c> whose process no longer runs, and the older forms
    /// <c>.NAME.tmp-XXXXXXXX</c> and <c>.NAME.bak-</c>(32 hex digits) once they are an hour old. Regular files only.
    /// </summary>
    /// <returns>How many were removed.</returns>
    public static int RemoveLeftovers(string directory)
    {
        int removed = 0;
        IEnumerable<string> names;
        try
        {
            names = System.IO.Directory.EnumerateFiles(directory, ".*").ToList();
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return 0;
        }
        foreach (string path in names)
        {
            string name = Path.GetFileName(path);
            bool leftover;
            var m = LeftoverName().Match(name);
            if (m.Success)
                leftover = int.TryParse(m.Groups[1].Value, System.Globalization.CultureInfo.InvariantCulture, out int pid) && !ProcessRuns(pid);
            else
                leftover = OlderLeftoverName().IsMatch(name) && File.GetLastWriteTimeUtc(path) < DateTime.UtcNow.AddHours(-1);
            if (leftover && FileKinds.IsRegularFileItself(path) && TryDelete(path)) removed++;
        }
        return removed;
    }

    private static bool ProcessRuns(int pid)
    {
        if (pid == Environment.ProcessId) return true;
        if (System.IO.Directory.Exists("/proc/self")) return System.IO.Directory.Exists("/proc/" + pid.ToString(System.Globalization.CultureInfo.InvariantCulture));
        try
        {
            using var p = System.Diagnostics.Process.GetProcessById(pid);
            return !p.HasExited;
        }
        catch (ArgumentException) { return false; }
        catch (InvalidOperationException) { return false; }
    }

    [System.Text.RegularExpressions.GeneratedRegex(@"^\.ms-(\d{1,10})-[0-9a-f]{8}-\d{1,6}\.(tmp|bak)$")]
    private static partial System.Text.RegularExpressions.Regex LeftoverName();

    [System.Text.RegularExpressions.GeneratedRegex(@"^\..+\.(tmp-[0-9a-f]{8}|bak-[0-9a-f]{32})$")]
    private static partial System.Text.RegularExpressions.Regex OlderLeftoverName();

    private string NextName(string suffix) =>
        $".ms-{_run}-{_names++.ToString(System.Globalization.CultureInfo.InvariantCulture)}.{suffix}";

    private void EnsureDirectory()
    {
        if (_directoryReady) return;
        var kind = FileKinds.Of(Directory);
        if (kind is not (FileKind.Directory or FileKind.Missing))
            throw new OutputException($"output directory {Directory} is {FileKinds.Describe(kind)}, not a directory");
        var missing = new List<string>();
        for (string? d = Directory; d is not null && !System.IO.Directory.Exists(d); d = Path.GetDirectoryName(d))
            missing.Add(d);
        try
        {
            System.IO.Directory.CreateDirectory(Directory);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new OutputException($"cannot create output directory {Directory}: {Reason(ex)}", ex);
        }
        _createdDirectories.AddRange(missing); // deepest first
        _directoryReady = true;
        RemoveLeftovers(Directory);
    }

    private static bool TryDelete(string path)
    {
        try
        {
            if (!FileKinds.IsRegularFileItself(path)) return false;
            File.Delete(path);
            return true;
        }
        catch (IOException) { return false; }
        catch (UnauthorizedAccessException) { return false; }
    }

    private static void TryRestore(string backup, string final)
    {
        try { File.Move(backup, final, overwrite: true); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }

    /// <summary>The innermost message of an exception (reflection and task wrappers removed), on one line.</summary>
    public static string Reason(Exception ex)
    {
        ArgumentNullException.ThrowIfNull(ex);
        return OneLine(Innermost(ex).Message);
    }

    /// <summary>
    /// Removes wrappers that say nothing themselves: <see cref="System.Reflection.TargetInvocationException"/> and
    /// an <see cref="AggregateException"/> with a single inner exception.
    /// </summary>
    public static Exception Innermost(Exception ex)
    {
        ArgumentNullException.ThrowIfNull(ex);
        while (true)
        {
            if (ex is System.Reflection.TargetInvocationException { InnerException: { } inner }) ex = inner;
            else if (ex is AggregateException { InnerExceptions.Count: 1 } agg) ex = agg.InnerExceptions[0];
            else if (ex is TypeInitializationException { InnerException: { } ti }) ex = ti;
            else return ex;
        }
    }

    private static string OneLine(string s) => s.Replace('\r', ' ').Replace('\n', ' ');
}
