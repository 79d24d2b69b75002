using System.Text;

namespace ModeSolver.Cli;

/// <summary>Standard output or standard error could not be written (full, closed, read-only): exit 2, one line if stderr works.</summary>
internal sealed class StandardStreamException(string stream, Exception inner)
    : ModeSolver.Physics.ModeSolverException($"cannot write to {stream}: {ModeSolver.Output.OutputTransaction.Reason(inner)}", inner)
{
    /// <inheritdoc/>
    public override int ExitCode => ModeSolver.Physics.ExitCodes.Input;

    /// <summary>"standard output" or "standard error".</summary>
    public string Stream { get; } = stream;
}

/// <summary>
/// Wraps a standard stream's writer so that a failed write becomes a <see cref="StandardStreamException"/> naming the
/// stream, instead of an internal error (or an abort while reporting it). After one failure every later write
/// fails the same way at once.
/// </summary>
internal sealed class GuardedWriter(TextWriter inner, string stream) : TextWriter
{
    private Exception? _failed;

    /// <summary>Which stream this is.</summary>
    public string Stream { get; } = stream;

    /// <summary>True once a write has failed.</summary>
    public bool Failed => _failed is not null;

    public override Encoding Encoding => inner.Encoding;

    public override IFormatProvider FormatProvider => inner.FormatProvider;

    public override string NewLine
    {
        get => inner.NewLine;
#pragma warning disable CS8765 // the base setter accepts null
        set => inner.NewLine = value;
#pragma warning restore CS8765
    }

    public override void Write(char value) => Do(() => inner.Write(value));

    public override void Write(string? value) => Do(() => inner.Write(value));

    public override void Write(char[] buffer, int index, int count) => Do(() => inner.Write(buffer, index, count));

    public override void Write(ReadOnlySpan<char> buffer)
    {
        string s = buffer.ToString();
        Do(() => inner.Write(s));
    }

    public override void WriteLine() => Do(inner.WriteLine);

    public override void WriteLine(string? value) => Do(() => inner.WriteLine(value));

    public override void Flush() => Do(inner.Flush);

    private void Do(Action write)
    {
        if (_failed is not null) throw new StandardStreamException(Stream, _failed);
        try
        {
            write();
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or ObjectDisposedException or NotSupportedException)
        {
            _failed = e;
            throw new StandardStreamException(Stream, e);
        }
    }
}
