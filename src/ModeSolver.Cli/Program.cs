using System.CommandLine;
using ModeSolver.Cli;

return CliApp.Run(args);
