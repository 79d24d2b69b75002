using System.Collections.Immutable;
using System.Reflection;
using System.Reflection.Emit;
using System.Reflection.Metadata;
using System.Reflection.Metadata.Ecma335;
using System.Reflection.PortableExecutable;

namespace ModeSolver.Tests.Architecture;

/// <summary>
/// The dependency direction of the Core assembly, read from its metadata and IL: a folder (namespace) may use only
/// the folders above it in DEVELOPERS.md's Layout list. The order is read from DEVELOPERS.md itself, so the guide and
/// the check cannot drift apart.
/// </summary>
public class LayeringTests
{
    [Fact]
    public void CoreNamespacesReferenceOnlyTheLayersAboveThem()
    {
        var order = LayerOrder();
        var references = CoreReferences.Read(typeof(ModeSolver.Physics.PhysicsException).Assembly.Location);
        Assert.NotEmpty(references); // the reader sees the stages' references (e.g. Background -> Integrators)
        Assert.Contains(("Background", "Integrators"), references.Select(r => (r.From, r.To)));
        var unknown = references.SelectMany(r => new[] { r.From, r.To }).Distinct().Where(n => !order.Contains(n)).ToList();
        Assert.True(unknown.Count == 0, $"Core namespaces missing from DEVELOPERS.md's Layout list: {string.Join(", ", unknown)}");
        var violations = Layering.Violations(order, references);
        Assert.True(violations.Count == 0, "references against the layer order:\n" + string.Join("\n", violations));
    }

    [Fact]
    public void ABackReferenceIsReported()
    {
        // A synthetic reference list: Matching using Perturbations (below it) must be refused, the reverse allowed.
        string[] order = ["Physics", "Background", "Matching", "Perturbations"];
        var refs = new[]
        {
            new Reference("Perturbations", "Background", "ModeSolver.Perturbations.ModeIntegrator", "ModeSolver.Background.IBackground"),
            new Reference("Matching", "Perturbations", "ModeSolver.Matching.PivotMatcher", "ModeSolver.Perturbations.ModeIntegrator"),
            new Reference("Matching", "Matching", "ModeSolver.Matching.A", "ModeSolver.Matching.B"),
        };
        var v = Layering.Violations(order, refs);
        Assert.Single(v);
        Assert.Contains("ModeSolver.Matching.PivotMatcher (Matching) uses ModeSolver.Perturbations.ModeIntegrator (Perturbations)", v[0]);
    }

    [Fact]
    public void TheReaderFindsAReferenceInsideAMethodBody()
    {
        // Runs uses Spectra only inside method bodies (SpectrumSolver.Compute): the IL scan must see it.
        var references = CoreReferences.Read(typeof(ModeSolver.Physics.PhysicsException).Assembly.Location);
        Assert.Contains(references, r => r.From == "Runs" && r.ToType == "ModeSolver.Spectra.SpectrumSolver");
    }

    /// <summary>The folder order of src/ModeSolver.Core in DEVELOPERS.md's Layout block.</summary>
    private static IReadOnlyList<string> LayerOrder()
    {
        string? dir = AppContext.BaseDirectory;
        while (dir is not null && !File.Exists(Path.Combine(dir, "DEVELOPERS.md"))) dir = Path.GetDirectoryName(dir);
        Assert.True(dir is not null, "DEVELOPERS.md not found above the test's directory");
        var lines = File.ReadAllLines(Path.Combine(dir!, "DEVELOPERS.md"));
        var order = new List<string>();
        bool inCore = false;
        foreach (var line in lines)
        {
            if (line.StartsWith("src/ModeSolver.Core/", StringComparison.Ordinal)) { inCore = true; continue; }
            if (inCore && line.StartsWith("src/", StringComparison.Ordinal)) break;
            if (!inCore) continue;
            var m = System.Text.RegularExpressions.Regex.Match(line, @"^  ([A-Z][A-Za-z]*)/\s");
            if (m.Success) order.Add(m.Groups[1].Value);
        }
        Assert.True(order.Count >= 10, $"could not read the Core layer list from DEVELOPERS.md (got {string.Join(", ", order)})");
        return order;
    }
}

/// <summary>One use of a type of namespace <see cref="To"/> by a type of namespace <see cref="From"/> (first segment after "ModeSolver.").</summary>
public sealed record Reference(string From, string To, string FromType, string ToType);

/// <summary>The layering rule on a reference list.</summary>
public static class Layering
{
    /// <summary>One line per reference from a layer to a layer below it in <paramref name="order"/>.</summary>
    public static List<string> Violations(IReadOnlyList<string> order, IEnumerable<Reference> references)
    {
        var result = new List<string>();
        foreach (var r in references)
        {
            int from = IndexOf(order, r.From), to = IndexOf(order, r.To);
            if (from < 0 || to < 0 || to <= from) continue;
            result.Add($"{r.FromType} ({r.From}) uses {r.ToType} ({r.To}), which is below it");
        }
        result.Sort(StringComparer.Ordinal);
        return result;
    }

    private static int IndexOf(IReadOnlyList<string> order, string name)
    {
        for (int i = 0; i < order.Count; i++) if (order[i] == name) return i;
        return -1;
    }
}

/// <summary>
/// Reads, from an assembly's metadata, every use of one of its own types by another of its types: base types,
/// interfaces, field, method and local signatures, generic constraints, and the type, method and field tokens of
/// every method body's IL. Nested (and compiler-generated) types count as their outermost type.
/// </summary>
public static class CoreReferences
{
    private static readonly Dictionary<short, OperandType> Operands = typeof(OpCodes)
        .GetFields(BindingFlags.Public | BindingFlags.Static)
        .Select(f => (OpCode)f.GetValue(null)!)
        .ToDictionary(o => o.Value, o => o.OperandType);

    /// <summary>The distinct references between namespaces of the assembly at <paramref name="path"/> (within-namespace ones included).</summary>
    public static List<Reference> Read(string path)
    {
        using var stream = File.OpenRead(path);
        using var pe = new PEReader(stream);
        var md = pe.GetMetadataReader();
        var found = new HashSet<Reference>();
        var provider = new Collector(md);
        foreach (var th in md.TypeDefinitions)
        {
            var owner = Outermost(md, th);
            string ownerName = FullName(md, owner);
            string? from = Layer(md, owner);
            if (from is null) continue;
            var targets = new HashSet<TypeDefinitionHandle>();
            var td = md.GetTypeDefinition(th);
            AddType(md, td.BaseType, targets, provider);
            foreach (var ih in td.GetInterfaceImplementations()) AddType(md, md.GetInterfaceImplementation(ih).Interface, targets, provider);
            foreach (var gp in td.GetGenericParameters())
                foreach (var ch in md.GetGenericParameter(gp).GetConstraints()) AddType(md, md.GetGenericParameterConstraint(ch).Type, targets, provider);
            foreach (var fh in td.GetFields()) Collect(targets, provider, () => md.GetFieldDefinition(fh).DecodeSignature(provider, null));
            foreach (var mh in td.GetMethods())
            {
                var method = md.GetMethodDefinition(mh);
                Collect(targets, provider, () => method.DecodeSignature(provider, null));
                foreach (var gp in method.GetGenericParameters())
                    foreach (var ch in md.GetGenericParameter(gp).GetConstraints()) AddType(md, md.GetGenericParameterConstraint(ch).Type, targets, provider);
                if (method.RelativeVirtualAddress == 0) continue;
                var body = pe.GetMethodBody(method.RelativeVirtualAddress);
                if (!body.LocalSignature.IsNil)
                    Collect(targets, provider, () => md.GetStandaloneSignature(body.LocalSignature).DecodeLocalSignature(provider, null));
                foreach (var token in Tokens(body.GetILBytes()))
                    AddEntity(md, MetadataTokens.EntityHandle(token), targets, provider);
            }
            foreach (var t in targets)
            {
                var outer = Outermost(md, t);
                string? to = Layer(md, outer);
                if (to is null) continue;
                found.Add(new Reference(from, to, ownerName, FullName(md, outer)));
            }
        }
        return [.. found];
    }

    private static void Collect(HashSet<TypeDefinitionHandle> targets, Collector provider, Action decode)
    {
        provider.Sink = targets;
        decode();
    }

    private static void AddType(MetadataReader md, EntityHandle h, HashSet<TypeDefinitionHandle> targets, Collector provider)
    {
        if (h.IsNil) return;
        switch (h.Kind)
        {
            case HandleKind.TypeDefinition: targets.Add((TypeDefinitionHandle)h); break;
            case HandleKind.TypeSpecification:
                provider.Sink = targets;
                md.GetTypeSpecification((TypeSpecificationHandle)h).DecodeSignature(provider, null);
                break;
        }
    }

    private static void AddEntity(MetadataReader md, EntityHandle h, HashSet<TypeDefinitionHandle> targets, Collector provider)
    {
        switch (h.Kind)
        {
            case HandleKind.TypeDefinition:
            case HandleKind.TypeSpecification:
                AddType(md, h, targets, provider); break;
            case HandleKind.MethodDefinition:
                targets.Add(md.GetMethodDefinition((MethodDefinitionHandle)h).GetDeclaringType()); break;
            case HandleKind.FieldDefinition:
                targets.Add(md.GetFieldDefinition((FieldDefinitionHandle)h).GetDeclaringType()); break;
            case HandleKind.MemberReference:
                var mr = md.GetMemberReference((MemberReferenceHandle)h);
                AddEntity(md, mr.Parent, targets, provider);
                if (mr.GetKind() == MemberReferenceKind.Method) { provider.Sink = targets; mr.DecodeMethodSignature(provider, null); }
                else { provider.Sink = targets; mr.DecodeFieldSignature(provider, null); }
                break;
            case HandleKind.MethodSpecification:
                var ms = md.GetMethodSpecification((MethodSpecificationHandle)h);
                AddEntity(md, ms.Method, targets, provider);
                provider.Sink = targets;
                ms.DecodeSignature(provider, null);
                break;
        }
    }

    /// <summary>The metadata tokens of an IL stream's type, method, field and token operands.</summary>
    private static IEnumerable<int> Tokens(byte[]? il)
    {
        if (il is null) yield break;
        int i = 0;
        while (i < il.Length)
        {
            short code = il[i++];
            if (code == 0xFE) code = (short)(0xFE00 | il[i++]);
            var operand = Operands[code];
            switch (operand)
            {
                case OperandType.InlineNone: break;
                case OperandType.ShortInlineBrTarget: case OperandType.ShortInlineI: case OperandType.ShortInlineVar: i += 1; break;
                case OperandType.InlineVar: i += 2; break;
                case OperandType.InlineI8: case OperandType.InlineR: i += 8; break;
                case OperandType.InlineSwitch: i += 4 + 4 * BitConverter.ToInt32(il, i); break;
                case OperandType.InlineField: case OperandType.InlineMethod: case OperandType.InlineTok: case OperandType.InlineType:
                    yield return BitConverter.ToInt32(il, i); i += 4; break;
                default: i += 4; break; // InlineI, InlineBrTarget, InlineSig, InlineString, ShortInlineR
            }
        }
    }

    private static TypeDefinitionHandle Outermost(MetadataReader md, TypeDefinitionHandle h)
    {
        while (true)
        {
            var d = md.GetTypeDefinition(h).GetDeclaringType();
            if (d.IsNil) return h;
            h = d;
        }
    }

    private static string FullName(MetadataReader md, TypeDefinitionHandle h)
    {
        var t = md.GetTypeDefinition(h);
        return md.GetString(t.Namespace) + "." + md.GetString(t.Name);
    }

    /// <summary>"Background" for ModeSolver.Background(.anything); null outside ModeSolver.* (e.g. &lt;Module&gt;).</summary>
    private static string? Layer(MetadataReader md, TypeDefinitionHandle h)
    {
        string ns = md.GetString(md.GetTypeDefinition(h).Namespace);
        if (!ns.StartsWith("ModeSolver.", StringComparison.Ordinal)) return null;
        string rest = ns["ModeSolver.".Length..];
        int dot = rest.IndexOf('.');
        return dot < 0 ? rest : rest[..dot];
    }

    /// <summary>A signature decoder that records every type definition of the assembly it meets.</summary>
    private sealed class Collector(MetadataReader md) : ISignatureTypeProvider<int, object?>
    {
        public HashSet<TypeDefinitionHandle> Sink { get; set; } = [];
        public int GetArrayType(int elementType, ArrayShape shape) => 0;
        public int GetByReferenceType(int elementType) => 0;
        public int GetFunctionPointerType(MethodSignature<int> signature) => 0;
        public int GetGenericInstantiation(int genericType, ImmutableArray<int> typeArguments) => 0;
        public int GetGenericMethodParameter(object? genericContext, int index) => 0;
        public int GetGenericTypeParameter(object? genericContext, int index) => 0;
        public int GetModifiedType(int modifier, int unmodifiedType, bool isRequired) => 0;
        public int GetPinnedType(int elementType) => 0;
        public int GetPointerType(int elementType) => 0;
        public int GetPrimitiveType(PrimitiveTypeCode typeCode) => 0;
        public int GetSZArrayType(int elementType) => 0;
        public int GetTypeFromDefinition(MetadataReader reader, TypeDefinitionHandle handle, byte rawTypeKind) { Sink.Add(handle); return 0; }
        public int GetTypeFromReference(MetadataReader reader, TypeReferenceHandle handle, byte rawTypeKind) => 0;
        public int GetTypeFromSpecification(MetadataReader reader, object? genericContext, TypeSpecificationHandle handle, byte rawTypeKind) =>
            md.GetTypeSpecification(handle).DecodeSignature(this, genericContext);
    }
}
