using BenchmarkDotNet.Running;

// Runs the benchmarks chosen on the command line, e.g. `--filter '*'`.
BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
