using System.CommandLine;
using ModeSolver.Cli;

// Under mpirun a rank's stdout is often a pseudo-terminal even when mpirun's own output goes to a file: the .NET
// console would then send terminal set-up codes (keypad mode) that land in that file. A rank is never interactive,
// so it runs without terminal capabilities (TERM is read on the console's first use).
if (ModeSolver.Cluster.MessagePassing.LaunchedByMpi) Environment.SetEnvironmentVariable("TERM", "dumb");
return CliApp.Run(args);
