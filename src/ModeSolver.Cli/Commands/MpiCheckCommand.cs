using System.CommandLine;
using System.Globalization;
using ModeSolver.Cluster;

namespace ModeSolver.Cli.Commands;

/// <summary>
/// Hidden <c>modesolver mpi-check</c>: exercises the message-passing layer (rank/size, broadcast, gathers, sum,
/// barrier) and prints one line on rank 0, e.g. <c>mpi-check size=2 ranks=0,1 names=r0,r1 sum=3 bcast=ok</c>.
/// </summary>
public static class MpiCheckCommand
{
    /// <summary>Builds the command.</summary>
    public static Command Create()
    {
        var command = new Command("mpi-check", "Check the MPI layer (prints a summary on rank 0)") { Hidden = true };
        command.SetAction(_ =>
        {
            try
            {
                using var comm = MessagePassing.Create();
                var ranks = comm.GatherDoubles([comm.Rank], 0);
                var names = comm.GatherStrings($"r{comm.Rank}", 0);
                var sum = comm.AllReduceSum([comm.Rank + 1.0, 1.0]);
                var bcast = comm.BroadcastDoubles(comm.Rank == 0 ? [Math.PI, -2.5] : null, 0);
                string word = comm.BroadcastString(comm.Rank == 0 ? "ok" : "", 0);
                comm.Barrier();
                bool bcastOk = bcast.Length == 2 && bcast[0] == Math.PI && bcast[1] == -2.5 && word == "ok";
                if (comm.Rank == 0)
                {
                    string rankList = string.Join(",", ranks!.Select(r => ((int)r[0]).ToString(CultureInfo.InvariantCulture)));
                    Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                        $"mpi-check size={comm.Size} ranks={rankList} names={string.Join(",", names!)} sum={sum[0]} count={sum[1]} bcast={(bcastOk ? "ok" : "BAD")}"));
                }
                comm.Shutdown();
                return bcastOk ? 0 : 3;
            }
            catch (MessagePassingException e)
            {
                Console.Error.WriteLine($"modesolver: {CommandErrors.OneLine(e.Message)}");
                return e.ExitCode;
            }
        });
        return command;
    }
}
