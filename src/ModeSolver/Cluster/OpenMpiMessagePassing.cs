using System.Runtime.InteropServices;

namespace ModeSolver.Cluster;

/// <summary>MPI could not be started or an MPI call failed. The message is one line.</summary>
public sealed class MessagePassingException : Physics.ModeSolverException
{
    /// <summary>Creates the error.</summary>
    public MessagePassingException(string message) : base(message) { }

    /// <inheritdoc/>
    public override int ExitCode => Physics.ExitCodes.Input;
}

/// <summary>Chooses the message-passing layer: MPI when launched by mpirun (or a PMIx launcher), else serial.</summary>
public static class MessagePassing
{
    /// <summary>The shared library loaded for OpenMPI.</summary>
    public const string OpenMpiLibrary = "libmpi.so.40";

    /// <summary>True when the process was started by an MPI launcher (OMPI_COMM_WORLD_SIZE or PMIX_RANK set).</summary>
    public static bool LaunchedByMpi =>
        Environment.GetEnvironmentVariable("OMPI_COMM_WORLD_SIZE") is { Length: > 0 } ||
        Environment.GetEnvironmentVariable("PMIX_RANK") is { Length: > 0 };

    /// <summary>
    /// MPI (initialised) when <see cref="LaunchedByMpi"/>, otherwise the serial layer. Throws a
    /// <see cref="MessagePassingException"/> when launched by mpirun but libmpi cannot be loaded or initialised.
    /// </summary>
    public static IMessagePassing Create() => LaunchedByMpi ? OpenMpiMessagePassing.Initialize() : new SerialMessagePassing();
}

/// <summary>
/// OpenMPI through function pointers from libmpi.so.40 (no compile-time binding). OpenMPI's handles are addresses of
/// exported objects: MPI_COMM_WORLD = &amp;ompi_mpi_comm_world, MPI_DOUBLE = &amp;ompi_mpi_double, MPI_BYTE =
/// &amp;ompi_mpi_byte, MPI_INT = &amp;ompi_mpi_int, MPI_SUM = &amp;ompi_mpi_op_sum. Counts are C ints, so one message holds
/// at most 2^31-1 elements.
/// </summary>
public sealed unsafe class OpenMpiMessagePassing : IMessagePassing
{
    private readonly nint _lib, _world, _double, _byte, _int, _sum;
    private readonly delegate* unmanaged<nint, int> _barrier;
    private readonly delegate* unmanaged<void*, int, nint, int, nint, int> _bcast;
    private readonly delegate* unmanaged<void*, int, nint, void*, int, nint, int, nint, int> _gather;
    private readonly delegate* unmanaged<void*, int, nint, void*, int*, int*, nint, int, nint, int> _gatherv;
    private readonly delegate* unmanaged<void*, void*, int, nint, nint, nint, int> _allreduce;
    private readonly delegate* unmanaged<int> _finalize;
    private readonly delegate* unmanaged<int*, int> _finalized;
    private bool _shutDown;

    private OpenMpiMessagePassing(nint lib)
    {
        _lib = lib;
        _world = Export("ompi_mpi_comm_world");
        _double = Export("ompi_mpi_double");
        _byte = Export("ompi_mpi_byte");
        _int = Export("ompi_mpi_int");
        _sum = Export("ompi_mpi_op_sum");
        var initialized = (delegate* unmanaged<int*, int>)Export("MPI_Initialized");
        var init = (delegate* unmanaged<int*, byte***, int>)Export("MPI_Init");
        var rank = (delegate* unmanaged<nint, int*, int>)Export("MPI_Comm_rank");
        var size = (delegate* unmanaged<nint, int*, int>)Export("MPI_Comm_size");
        _barrier = (delegate* unmanaged<nint, int>)Export("MPI_Barrier");
        _bcast = (delegate* unmanaged<void*, int, nint, int, nint, int>)Export("MPI_Bcast");
        _gather = (delegate* unmanaged<void*, int, nint, void*, int, nint, int, nint, int>)Export("MPI_Gather");
        _gatherv = (delegate* unmanaged<void*, int, nint, void*, int*, int*, nint, int, nint, int>)Export("MPI_Gatherv");
        _allreduce = (delegate* unmanaged<void*, void*, int, nint, nint, nint, int>)Export("MPI_Allreduce");
        _finalize = (delegate* unmanaged<int>)Export("MPI_Finalize");
        _finalized = (delegate* unmanaged<int*, int>)Export("MPI_Finalized");
        int flag = 0;
        Check(initialized(&flag), "MPI_Initialized");
        if (flag == 0) Check(init(null, null), "MPI_Init");
        int r = 0, s = 0;
        Check(rank(_world, &r), "MPI_Comm_rank");
        Check(size(_world, &s), "MPI_Comm_size");
        Rank = r;
        Size = s;
    }

    /// <summary>Loads libmpi.so.40 and calls MPI_Init (unless already initialised).</summary>
    public static OpenMpiMessagePassing Initialize()
    {
        nint lib;
        try { lib = NativeLibrary.Load(MessagePassing.OpenMpiLibrary); }
        catch (DllNotFoundException e)
        {
            string size = Environment.GetEnvironmentVariable("OMPI_COMM_WORLD_SIZE") ?? "?";
            throw new MessagePassingException($"launched under an MPI launcher (OMPI_COMM_WORLD_SIZE={size}) but {MessagePassing.OpenMpiLibrary} could not be loaded; install OpenMPI 4 (Debian: openmpi-bin libopenmpi-dev): {e.Message.Split('\n')[0]}");
        }
        return new OpenMpiMessagePassing(lib);
    }

    /// <inheritdoc />
    public int Rank { get; }
    /// <inheritdoc />
    public int Size { get; }

    /// <inheritdoc />
    public void Barrier() { Alive(); Check(_barrier(_world), "MPI_Barrier"); }

    /// <inheritdoc />
    public double[] BroadcastDoubles(double[]? data, int root)
    {
        int n = BroadcastLength(data?.Length ?? 0, root);
        var buf = Rank == root ? data!.ToArray() : new double[n];
        fixed (double* p = buf) Check(_bcast(p, n, _double, root, _world), "MPI_Bcast");
        return buf;
    }

    /// <inheritdoc />
    public byte[] BroadcastBytes(byte[]? data, int root)
    {
        int n = BroadcastLength(data?.Length ?? 0, root);
        var buf = Rank == root ? (data ?? []).ToArray() : new byte[n];
        fixed (byte* p = buf) Check(_bcast(n == 0 ? null : p, n, _byte, root, _world), "MPI_Bcast");
        return buf;
    }

    /// <inheritdoc />
    public double[][]? GatherDoubles(double[] local, int root)
    {
        var flat = GatherV(local, local.Length, _double, root, out int[] counts);
        if (flat is null) return null;
        return Split(flat, counts);
    }

    /// <inheritdoc />
    public byte[][]? GatherBytes(byte[] local, int root)
    {
        var flat = GatherV(local, local.Length, _byte, root, out int[] counts);
        if (flat is null) return null;
        return Split(flat, counts);
    }

    /// <inheritdoc />
    public double[] AllReduceSum(double[] local)
    {
        Alive();
        var result = new double[local.Length];
        fixed (double* s = local)
        fixed (double* r = result)
            Check(_allreduce(s, r, local.Length, _double, _sum, _world), "MPI_Allreduce");
        return result;
    }

    /// <inheritdoc />
    public void Shutdown()
    {
        if (_shutDown) return;
        _shutDown = true;
        int done = 0;
        _finalized(&done);
        if (done == 0) Check(_finalize(), "MPI_Finalize");
    }

    /// <inheritdoc />
    public void Dispose() => Shutdown();

    private int BroadcastLength(int n, int root)
    {
        Alive();
        int len = Rank == root ? n : 0;
        Check(_bcast(&len, 1, _int, root, _world), "MPI_Bcast");
        return len;
    }

    private T[]? GatherV<T>(T[] local, int count, nint type, int root, out int[] counts) where T : unmanaged
    {
        Alive();
        counts = new int[Size];
        int c = count;
        fixed (int* pc = counts) Check(_gather(&c, 1, _int, pc, 1, _int, root, _world), "MPI_Gather");
        T[]? flat = null;
        var displs = new int[Size];
        if (Rank == root)
        {
            long total = 0;
            for (int i = 0; i < Size; i++) { displs[i] = (int)total; total += counts[i]; }
            if (total > int.MaxValue) throw new MessagePassingException($"gather of {total} elements exceeds one MPI message");
            flat = new T[total];
        }
        fixed (T* s = local)
        fixed (T* r = flat)
        fixed (int* pc = counts)
        fixed (int* pd = displs)
            Check(_gatherv(s, count, type, r, pc, pd, type, root, _world), "MPI_Gatherv");
        return flat;
    }

    private static T[][] Split<T>(T[] flat, int[] counts)
    {
        var parts = new T[counts.Length][];
        int pos = 0;
        for (int i = 0; i < counts.Length; i++)
        {
            parts[i] = flat.AsSpan(pos, counts[i]).ToArray();
            pos += counts[i];
        }
        return parts;
    }

    private nint Export(string name)
    {
        if (!NativeLibrary.TryGetExport(_lib, name, out var p))
            throw new MessagePassingException($"{MessagePassing.OpenMpiLibrary} has no export '{name}' (OpenMPI 4 expected)");
        return p;
    }

    private void Alive()
    {
        if (_shutDown) throw new MessagePassingException("MPI was already finalised");
    }

    private static void Check(int rc, string call)
    {
        if (rc != 0) throw new MessagePassingException($"{call} failed with MPI error code {rc}");
    }
}
