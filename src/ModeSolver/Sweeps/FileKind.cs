using System.Runtime.InteropServices;

namespace ModeSolver.Sweeps;

/// <summary>Whether a path is a regular file (not a link, directory, device, FIFO or socket), from the file's type bits.</summary>
internal static partial class FileKind
{
    private const int AtFdCwd = -100, AtSymlinkNoFollow = 0x100;
    private const uint StatxType = 0x1;
    private const int ModeOffset = 28; // struct statx: stx_mode (u16) at byte 28 on every Linux architecture
    private const int TypeMask = 0xF000, Regular = 0x8000;

    [LibraryImport("libc", EntryPoint = "statx", StringMarshalling = StringMarshalling.Utf8)]
    private static partial int Statx(int dirfd, string path, int flags, uint mask, Span<byte> buffer);

    /// <summary>True when <paramref name="path"/> exists and is a regular file (the link itself is looked at, not its target).</summary>
    public static bool IsRegularFile(string path)
    {
        if (!OperatingSystem.IsLinux())
        {
            var info = new FileInfo(path);
            return info.Exists && info.LinkTarget is null;
        }
        Span<byte> buffer = stackalloc byte[256];
        if (Statx(AtFdCwd, path, AtSymlinkNoFollow, StatxType, buffer) != 0) return false;
        int mode = buffer[ModeOffset] | (buffer[ModeOffset + 1] << 8);
        return (mode & TypeMask) == Regular;
    }
}
