using System.Runtime.InteropServices;

namespace ModeSolver.Output;

/// <summary>What a path names on disk, as far as output safety cares.</summary>
public enum FileKind
{
    /// <summary>Nothing exists at the path.</summary>
    Missing,

    /// <summary>A regular file: the only kind ModeSolver ever replaces, backs up or deletes.</summary>
    Regular,

    /// <summary>A directory.</summary>
    Directory,

    /// <summary>A character device (a terminal, /dev/null, ...): written to directly, never replaced.</summary>
    CharacterDevice,

    /// <summary>A named pipe: written to directly, never replaced.</summary>
    Fifo,

    /// <summary>A Unix socket: cannot be opened for writing; never replaced.</summary>
    Socket,

    /// <summary>A block device (a disk): refused.</summary>
    BlockDevice,

    /// <summary>A symbolic link whose target does not exist.</summary>
    DanglingLink,
}

/// <summary>
/// The kind of file a path names, following symbolic links (<see cref="Of"/>), from the file system itself: on Linux
/// through statx(2), whose buffer layout is the same on every architecture. Where statx is not available (another
/// system), an existing non-directory counts as <see cref="FileKind.Regular"/>.
/// </summary>
public static partial class FileKinds
{
    private const int AtFdCwd = -100;
    private const int AtSymlinkNoFollow = 0x100;
    private const uint StatxType = 0x1;
    private const int StatxModeOffset = 28; // struct statx: u32 mask, u32 blksize, u64 attributes, u32 nlink, u32 uid, u32 gid, u16 mode
    private const int StatxBufferSize = 256;

    /// <summary>The kind of <paramref name="path"/>, following symbolic links.</summary>
    public static FileKind Of(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        var kind = Stat(path, followLinks: true);
        if (kind == FileKind.Missing && Stat(path, followLinks: false) != FileKind.Missing) return FileKind.DanglingLink;
        return kind;
    }

    /// <summary>True when the path itself (not a link's target) is a regular file.</summary>
    public static bool IsRegularFileItself(string path) => Stat(path, followLinks: false) == FileKind.Regular;

    /// <summary>True for the kinds that are written to directly rather than replaced (character devices and FIFOs).</summary>
    public static bool IsStreamed(FileKind kind) => kind is FileKind.CharacterDevice or FileKind.Fifo;

    /// <summary>Plain words for messages ("a named pipe").</summary>
    public static string Describe(FileKind kind) => kind switch
    {
        FileKind.Missing => "missing",
        FileKind.Regular => "a regular file",
        FileKind.Directory => "a directory",
        FileKind.CharacterDevice => "a character device",
        FileKind.Fifo => "a named pipe",
        FileKind.Socket => "a socket",
        FileKind.BlockDevice => "a block device",
        _ => "a symbolic link to a missing file",
    };

    private static unsafe FileKind Stat(string path, bool followLinks)
    {
        byte* buffer = stackalloc byte[StatxBufferSize];
        int rc;
        try
        {
            rc = Statx(AtFdCwd, path, followLinks ? 0 : AtSymlinkNoFollow, StatxType, buffer);
        }
        catch (Exception e) when (e is EntryPointNotFoundException or DllNotFoundException)
        {
            return Fallback(path, followLinks);
        }
        if (rc != 0)
        {
            int errno = Marshal.GetLastPInvokeError();
            const int ENOENT = 2, ENOTDIR = 20, ENOSYS = 38;
            if (errno is ENOENT or ENOTDIR) return FileKind.Missing;
            if (errno == ENOSYS) return Fallback(path, followLinks);
            // No permission to look (EACCES) and the like: report what .NET sees.
            return Fallback(path, followLinks);
        }
        int mode = *(ushort*)(buffer + StatxModeOffset) & 0xF000;
        return mode switch
        {
            0x8000 => FileKind.Regular,
            0x4000 => FileKind.Directory,
            0x2000 => FileKind.CharacterDevice,
            0x1000 => FileKind.Fifo,
            0xC000 => FileKind.Socket,
            0x6000 => FileKind.BlockDevice,
            0xA000 => FileKind.DanglingLink, // only without following; a link we were asked not to follow
            _ => FileKind.BlockDevice, // unknown kinds are treated like the most dangerous one: refused
        };
    }

    private static FileKind Fallback(string path, bool followLinks)
    {
        if (System.IO.Directory.Exists(path)) return FileKind.Directory;
        if (File.Exists(path)) return FileKind.Regular;
        if (!followLinks && new FileInfo(path).LinkTarget is not null) return FileKind.DanglingLink;
        return FileKind.Missing;
    }

    [LibraryImport("libc", EntryPoint = "statx", SetLastError = true, StringMarshalling = StringMarshalling.Utf8)]
    private static unsafe partial int Statx(int dirFd, string path, int flags, uint mask, byte* buffer);

    /// <summary>
    /// Makes <paramref name="link"/> a second name (hard link) of the regular file <paramref name="existing"/>: a
    /// backup that copies nothing. Returns false when the file system refuses (no hard links there, another device).
    /// </summary>
    public static bool TryHardLink(string existing, string link)
    {
        try
        {
            return Link(existing, link) == 0;
        }
        catch (Exception e) when (e is EntryPointNotFoundException or DllNotFoundException)
        {
            return false;
        }
    }

    [LibraryImport("libc", EntryPoint = "link", SetLastError = true, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int Link(string existing, string link);
}
