using Tomlyn;
using Tomlyn.Model;
using Tomlyn.Serialization;

namespace ModeSolver.Decks;

/// <summary>
/// TOML text to Tomlyn's untyped model through source-generated metadata, so that deck reading works the same in
/// a native ahead-of-time build (where reflection-based deserialisation is switched off) as under the JIT.
/// </summary>
public static class DeckToml
{
    /// <summary>Parses <paramref name="text"/> into a table (an empty table for empty text) with the given options.</summary>
    /// <exception cref="TomlException">a TOML syntax or semantic error.</exception>
    public static TomlTable Parse(string text, TomlSerializerOptions? options = null)
    {
        var info = options is null
            ? DeckTomlContext.Default.TomlTable
            : (TomlTypeInfo<TomlTable>)DeckTomlContext.Default.GetTypeInfo(typeof(TomlTable), options with { TypeInfoResolver = DeckTomlContext.Default })!;
        return TomlSerializer.Deserialize(text, info) ?? new TomlTable();
    }
}

/// <summary>Source-generated TOML metadata for the untyped model.</summary>
[TomlSerializable(typeof(TomlTable))]
internal sealed partial class DeckTomlContext : TomlSerializerContext;
