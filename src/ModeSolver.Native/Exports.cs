using System.Runtime.InteropServices;
using ModeSolver.Output;
using ModeSolver.Report;

namespace ModeSolver.Native;

/// <summary>
/// The exported C entry points of libmodesolver.so, declared in modesolver.h (which documents each one and who owns
/// every pointer). Each entry point is thin: find the run behind the handle, call <see cref="NativeRun"/> under its
/// lock, and turn any failure into a result code and a one-line message; no exception crosses into C.
/// </summary>
internal static unsafe class Exports
{
    private static readonly byte* Version = (byte*)NativeRun.Utf8(RunReport.LibraryVersion);

    [UnmanagedCallersOnly(EntryPoint = "ms_version")]
    public static byte* MsVersion() => Version;

    [UnmanagedCallersOnly(EntryPoint = "ms_run_new")]
    public static nint MsRunNew()
    {
        try { return GCHandle.ToIntPtr(GCHandle.Alloc(new NativeRun())); }
        catch (OutOfMemoryException) { return 0; }
    }

    [UnmanagedCallersOnly(EntryPoint = "ms_run_free")]
    public static void MsRunFree(nint run)
    {
        if (run == 0) return;
        var handle = GCHandle.FromIntPtr(run);
        if (handle.Target is NativeRun r) r.Dispose();
        handle.Free();
    }

    [UnmanagedCallersOnly(EntryPoint = "ms_run_error")]
    public static byte* MsRunError(nint run) => Find(run) is { } r ? r.Error : null;

    [UnmanagedCallersOnly(EntryPoint = "ms_run_load_deck")]
    public static int MsRunLoadDeck(nint run, byte* text, byte* sourceName) => With(run, r =>
        r.LoadDeck(Text(text, "text"), sourceName is null ? "deck" : Text(sourceName, "source_name")));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_load_deck_file")]
    public static int MsRunLoadDeckFile(nint run, byte* path) => With(run, r => r.LoadDeckFile(Text(path, "path")));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_set_number")]
    public static int MsRunSetNumber(nint run, byte* key, double value) => With(run, r => r.SetNumber(Text(key, "key"), value));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_set_text")]
    public static int MsRunSetText(nint run, byte* key, byte* value) => With(run, r => r.SetText(Text(key, "key"), Text(value, "value")));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_unset")]
    public static int MsRunUnset(nint run, byte* key) => With(run, r => r.Unset(Text(key, "key")));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_set_threads")]
    public static int MsRunSetThreads(nint run, int threads) => With(run, r => r.SetThreads(threads));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_check")]
    public static int MsRunCheck(nint run) => With(run, r => r.Check());

    [UnmanagedCallersOnly(EntryPoint = "ms_run_pivot")]
    public static int MsRunPivot(nint run) => With(run, r => r.RunPivot());

    [UnmanagedCallersOnly(EntryPoint = "ms_run_spectrum")]
    public static int MsRunSpectrum(nint run) => With(run, r => r.RunSpectrum());

    [UnmanagedCallersOnly(EntryPoint = "ms_run_value")]
    public static int MsRunValue(nint run, byte* name, double* value) => With(run, r =>
    {
        if (value is null) throw new UsageException("value is a null pointer");
        *value = r.Value(Text(name, "name"));
    });

    [UnmanagedCallersOnly(EntryPoint = "ms_run_value_error")]
    public static int MsRunValueError(nint run, byte* name, double* error) => With(run, r =>
    {
        if (error is null) throw new UsageException("error is a null pointer");
        *error = r.ValueError(Text(name, "name"));
    });

    [UnmanagedCallersOnly(EntryPoint = "ms_run_tolerance_met")]
    public static int MsRunToleranceMet(nint run, int* met) => With(run, r =>
    {
        if (met is null) throw new UsageException("met is a null pointer");
        *met = r.ToleranceMet() ? 1 : 0;
    });

    [UnmanagedCallersOnly(EntryPoint = "ms_run_spectrum_size")]
    public static int MsRunSpectrumSize(nint run, nuint* size) => With(run, r =>
    {
        if (size is null) throw new UsageException("size is a null pointer");
        *size = (nuint)r.SpectrumSize;
    });

    [UnmanagedCallersOnly(EntryPoint = "ms_run_spectrum_copy")]
    public static int MsRunSpectrumCopy(nint run, double* k, double* ps, double* pt, double* relError, nuint capacity) =>
        With(run, r => r.CopySpectrum(k, ps, pt, relError, capacity));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_spectrum_at")]
    public static int MsRunSpectrumAt(nint run, double* k, nuint n, double* ps, double* pt) =>
        With(run, r => r.SpectrumAt(k, n, ps, pt));

    [UnmanagedCallersOnly(EntryPoint = "ms_run_flag_count")]
    public static nuint MsRunFlagCount(nint run) => Find(run) is { } r ? (nuint)r.FlagCount : 0;

    [UnmanagedCallersOnly(EntryPoint = "ms_run_flag")]
    public static byte* MsRunFlag(nint run, nuint i) => Find(run) is { } r ? r.Flag(i) : null;

    [UnmanagedCallersOnly(EntryPoint = "ms_run_warning_count")]
    public static nuint MsRunWarningCount(nint run) => Find(run) is { } r ? (nuint)r.WarningCount : 0;

    [UnmanagedCallersOnly(EntryPoint = "ms_run_warning")]
    public static byte* MsRunWarning(nint run, nuint i) => Find(run) is { } r ? r.Warning(i) : null;

    private static NativeRun? Find(nint run) => run == 0 ? null : GCHandle.FromIntPtr(run).Target as NativeRun;

    private static int With(nint run, Action<NativeRun> body) =>
        Find(run) is { } r ? r.Call(body) : NativeErrors.Usage;

    private static string Text(byte* p, string what) =>
        p is null ? throw new UsageException($"{what} is a null pointer") : Marshal.PtrToStringUTF8((nint)p)!;
}
