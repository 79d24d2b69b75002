using System.Globalization;
using System.Text.Json;

namespace ModeSolver.Sweeps;

/// <summary>
/// One point's result: what the evaluator returns, and, after <see cref="ForJournal"/>, the finished point as stored in
/// the journal and the outputs (its pivot results, or its failure).
/// </summary>
public sealed class SweepRecord
{
    /// <summary>The point index.</summary>
    public required long Index { get; init; }
    /// <summary>True when the point succeeded.</summary>
    public required bool Ok { get; init; }
    /// <summary>The failure reason (one line), empty when the point succeeded.</summary>
    public string Message { get; init; } = "";
    /// <summary>n_s.</summary>
    public double Ns { get; init; } = double.NaN;
    /// <summary>r.</summary>
    public double R { get; init; } = double.NaN;
    /// <summary>alpha_s.</summary>
    public double AlphaS { get; init; } = double.NaN;
    /// <summary>n_t.</summary>
    public double Nt { get; init; } = double.NaN;
    /// <summary>A_s.</summary>
    public double As { get; init; } = double.NaN;
    /// <summary>N_*.</summary>
    public double NStar { get; init; } = double.NaN;
    /// <summary>V scale.</summary>
    public double VScale { get; init; } = double.NaN;
    /// <summary>beta_iso = P_S/(P_zeta + P_S) at the pivot at the end of inflation; NaN for one field.</summary>
    public double BetaIso { get; init; } = double.NaN;
    /// <summary>The correlation cos Delta at the pivot; NaN for one field, or when P_S is not resolved above its error.</summary>
    public double CosDelta { get; init; } = double.NaN;
    /// <summary>The transfer T_RS at the pivot; NaN for one field.</summary>
    public double Trs { get; init; } = double.NaN;
    /// <summary>The local f_NL from delta N at the pivot; NaN for one field, or when delta N could not be computed.</summary>
    public double FNlLocal { get; init; } = double.NaN;
    /// <summary>Flags.</summary>
    public IReadOnlyList<string> Flags { get; init; } = [];
    /// <summary>Spectrum wavenumbers, if stored.</summary>
    public double[]? K { get; init; }
    /// <summary>Scalar spectrum, if stored.</summary>
    public double[]? Ps { get; init; }
    /// <summary>Tensor spectrum, if stored.</summary>
    public double[]? Pt { get; init; }

    /// <summary>
    /// The record as the journal stores it, at <paramref name="index"/>: flags on one line without ';', the failure
    /// message on one line, the spectrum arrays only when the sweep keeps them.
    /// </summary>
    public SweepRecord ForJournal(long index, bool keepSpectrum)
    {
        if (!Ok) return Failure(index, Message);
        return new SweepRecord
        {
            Index = index, Ok = true, Ns = Ns, R = R, AlphaS = AlphaS, Nt = Nt, As = As, NStar = NStar, VScale = VScale,
            BetaIso = BetaIso, CosDelta = CosDelta, Trs = Trs, FNlLocal = FNlLocal,
            Flags = Flags.Select(f => SweepDeck.OneLine(f).Replace(';', ',')).ToArray(),
            K = keepSpectrum ? K : null, Ps = keepSpectrum ? Ps : null, Pt = keepSpectrum ? Pt : null,
        };
    }

    /// <summary>This record without its spectrum arrays (itself when it has none), for what keeps many records.</summary>
    public SweepRecord WithoutSpectrum() => K is null && Ps is null && Pt is null ? this : new SweepRecord
    {
        Index = Index, Ok = Ok, Message = Message, Ns = Ns, R = R, AlphaS = AlphaS, Nt = Nt, As = As, NStar = NStar, VScale = VScale, Flags = Flags,
        BetaIso = BetaIso, CosDelta = CosDelta, Trs = Trs, FNlLocal = FNlLocal,
    };

    /// <summary>A failed point.</summary>
    public static SweepRecord Failure(long index, string reason) =>
        new() { Index = index, Ok = false, Message = SweepDeck.OneLine(reason.Length == 0 ? "failed" : reason) };

    /// <summary>The journal line of this record (UTF-8 JSON, ending in '\n').</summary>
    public byte[] ToJsonLine()
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms))
        {
            w.WriteStartObject();
            w.WriteNumber("i", Index);
            w.WriteBoolean("ok", Ok);
            if (!Ok) w.WriteString("msg", Message);
            else
            {
                Num(w, "n_s", Ns); Num(w, "r", R); Num(w, "alpha_s", AlphaS); Num(w, "n_t", Nt);
                Num(w, "A_s", As); Num(w, "N_star", NStar); Num(w, "V_scale", VScale);
                // The n-field values only where they exist: a one-field line is as before, and an older journal reads as NaN.
                Optional(w, "beta_iso", BetaIso); Optional(w, "cos_delta", CosDelta); Optional(w, "T_RS", Trs); Optional(w, "f_NL_local", FNlLocal);
                if (Flags.Count > 0)
                {
                    w.WriteStartArray("flags");
                    foreach (var f in Flags) w.WriteStringValue(f);
                    w.WriteEndArray();
                }
                Arr(w, "k", K); Arr(w, "P_s", Ps); Arr(w, "P_t", Pt);
            }
            w.WriteEndObject();
        }
        ms.WriteByte((byte)'\n');
        return ms.ToArray();
    }

    /// <summary>Parses a journal line (without its newline); throws on malformed input.</summary>
    public static SweepRecord FromJson(ReadOnlySpan<byte> line)
    {
        using var doc = JsonDocument.Parse(line.ToArray());
        var e = doc.RootElement;
        if (e.ValueKind != JsonValueKind.Object) throw new FormatException("not a JSON object");
        long i = Required(e, "i").GetInt64();
        bool ok = Required(e, "ok").GetBoolean();
        if (!ok) return new SweepRecord { Index = i, Ok = false, Message = Required(e, "msg").GetString() ?? "" };
        // An ok point carries every value: a line without them is damage, never a point full of NaN.
        return new SweepRecord
        {
            Index = i, Ok = true,
            Ns = Value(e, "n_s"), R = Value(e, "r"), AlphaS = Value(e, "alpha_s"), Nt = Value(e, "n_t"), As = Value(e, "A_s"),
            NStar = Value(e, "N_star"), VScale = Value(e, "V_scale"),
            BetaIso = OptionalValue(e, "beta_iso"), CosDelta = OptionalValue(e, "cos_delta"), Trs = OptionalValue(e, "T_RS"), FNlLocal = OptionalValue(e, "f_NL_local"),
            Flags = e.TryGetProperty("flags", out var f) ? f.EnumerateArray().Select(x => x.GetString() ?? "").ToArray() : [],
            K = A(e, "k"), Ps = A(e, "P_s"), Pt = A(e, "P_t"),
        };
    }

    private static void Num(Utf8JsonWriter w, string name, double x)
    {
        if (double.IsFinite(x)) w.WriteNumber(name, x);
        else w.WriteString(name, x.ToString(CultureInfo.InvariantCulture));
    }

    private static void Optional(Utf8JsonWriter w, string name, double x)
    {
        if (double.IsFinite(x)) w.WriteNumber(name, x);
    }

    private static double OptionalValue(JsonElement e, string name) => e.TryGetProperty(name, out var x) ? D(x) : double.NaN;

    private static void Arr(Utf8JsonWriter w, string name, double[]? a)
    {
        if (a is null) return;
        w.WriteStartArray(name);
        foreach (var x in a)
        {
            if (double.IsFinite(x)) w.WriteNumberValue(x);
            else w.WriteStringValue(x.ToString(CultureInfo.InvariantCulture));
        }
        w.WriteEndArray();
    }

    private static double D(JsonElement x) =>
        x.ValueKind == JsonValueKind.String ? double.Parse(x.GetString()!, CultureInfo.InvariantCulture) : x.GetDouble();

    private static JsonElement Required(JsonElement e, string name) =>
        e.TryGetProperty(name, out var x) ? x : throw new FormatException($"'{name}' is missing");

    private static double Value(JsonElement e, string name) => D(Required(e, name));

    private static double[]? A(JsonElement e, string name)
    {
        if (!e.TryGetProperty(name, out var x)) return null;
        var r = new double[x.GetArrayLength()];
        int j = 0;
        foreach (var y in x.EnumerateArray()) r[j++] = D(y);
        return r;
    }
}
