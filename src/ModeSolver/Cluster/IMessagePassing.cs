using System.Text;

namespace ModeSolver.Cluster;

/// <summary>
/// The few collective operations the sweeps need, over MPI or (serially) over one process. Every rank must call the
/// collective methods in the same order. Not thread-safe: call from one thread.
/// </summary>
public interface IMessagePassing : IDisposable
{
    /// <summary>This process' rank, 0-based.</summary>
    int Rank { get; }
    /// <summary>The number of processes.</summary>
    int Size { get; }
    /// <summary>Blocks until every rank has called it.</summary>
    void Barrier();
    /// <summary>Broadcasts <paramref name="data"/> from <paramref name="root"/> (other ranks may pass null); every rank gets the root's array.</summary>
    double[] BroadcastDoubles(double[]? data, int root);
    /// <summary>Broadcasts bytes from <paramref name="root"/> (other ranks may pass null).</summary>
    byte[] BroadcastBytes(byte[]? data, int root);
    /// <summary>Gathers each rank's doubles (any lengths) at <paramref name="root"/>, in rank order; null on other ranks.</summary>
    double[][]? GatherDoubles(double[] local, int root);
    /// <summary>Gathers each rank's bytes (any lengths) at <paramref name="root"/>, in rank order; null on other ranks.</summary>
    byte[][]? GatherBytes(byte[] local, int root);
    /// <summary>Element-wise sum over the ranks, result on every rank.</summary>
    double[] AllReduceSum(double[] local);
    /// <summary>Ends message passing (MPI_Finalize; idempotent; also done by Dispose). No collective may follow.</summary>
    void Shutdown();
}

/// <summary>String helpers over the byte operations.</summary>
public static class MessagePassingExtensions
{
    /// <summary>Broadcasts a UTF-8 string from <paramref name="root"/>.</summary>
    public static string BroadcastString(this IMessagePassing comm, string? text, int root) =>
        Encoding.UTF8.GetString(comm.BroadcastBytes(comm.Rank == root ? Encoding.UTF8.GetBytes(text ?? "") : null, root));

    /// <summary>Gathers a UTF-8 string from every rank at <paramref name="root"/>; null on other ranks.</summary>
    public static string[]? GatherStrings(this IMessagePassing comm, string text, int root) =>
        comm.GatherBytes(Encoding.UTF8.GetBytes(text), root)?.Select(b => Encoding.UTF8.GetString(b)).ToArray();
}

/// <summary>One process, no MPI: rank 0 of size 1; the collectives return copies of the input.</summary>
public sealed class SerialMessagePassing : IMessagePassing
{
    /// <inheritdoc />
    public int Rank => 0;
    /// <inheritdoc />
    public int Size => 1;
    /// <inheritdoc />
    public void Barrier() { }
    /// <inheritdoc />
    public double[] BroadcastDoubles(double[]? data, int root) { Check(root); return (data ?? []).ToArray(); }
    /// <inheritdoc />
    public byte[] BroadcastBytes(byte[]? data, int root) { Check(root); return (data ?? []).ToArray(); }
    /// <inheritdoc />
    public double[][]? GatherDoubles(double[] local, int root) { Check(root); return [local.ToArray()]; }
    /// <inheritdoc />
    public byte[][]? GatherBytes(byte[] local, int root) { Check(root); return [local.ToArray()]; }
    /// <inheritdoc />
    public double[] AllReduceSum(double[] local) => local.ToArray();
    /// <inheritdoc />
    public void Shutdown() { }
    /// <inheritdoc />
    public void Dispose() { }

    private static void Check(int root)
    {
        if (root != 0) throw new ArgumentOutOfRangeException(nameof(root), "a serial run has only rank 0");
    }
}
