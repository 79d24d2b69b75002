using System.Text.Json;
using PureHDF;

namespace ModeSolver.Tests.Bispectrum;

/// <summary>The plateau demo with a small bispectrum request (6 equilateral points, a 4 x 4 shape grid).</summary>
public sealed class PlateauBispectrumRun() : CliDeckRun("fnl", "runs/plateau-demo.toml", "--k-count", "12", "--fnl-equilateral", "6", "--fnl-shape-grid", "4",
    "--fnl-triangles", "0.05:0.05:0.05,0.05:0.04:0.03");

[Collection("ConsoleCapture")]
public class BispectrumCliTests(PlateauBispectrumRun run) : IClassFixture<PlateauBispectrumRun>
{
    [Fact]
    public void SpectrumWithBispectrumKeys_WritesTheObjectTheGroupAndThePlots()
    {
        Assert.True(run.Code == 0, run.Err);
        foreach (var name in new[] { "fnl.png", "fnl.svg", "fnl-shape.png", "fnl-shape.svg" })
            Assert.True(File.Exists(run.File(name)), name);
        using var doc = JsonDocument.Parse(File.ReadAllText(run.File("summary.json")));
        var b = doc.RootElement.GetProperty("bispectrum");
        double eq = b.GetProperty("f_NL_equilateral").GetDouble(), eqErr = b.GetProperty("f_NL_equilateral_error").GetDouble();
        double eqSr = b.GetProperty("f_NL_equilateral_slow_roll").GetDouble();
        double sq = b.GetProperty("f_NL_squeezed").GetDouble(), sqSr = b.GetProperty("f_NL_squeezed_slow_roll").GetDouble();
        // A plateau in slow roll (physics.md 8): leading-order slow roll holds to its O(e_n) relative accuracy (5% here),
        // and the squeezed limit to the consistency relation with the exact n_s.
        Assert.True(Math.Abs(eq / eqSr - 1) < 0.05, $"equilateral {eq} vs slow roll {eqSr}");
        Assert.True(Math.Abs(sq / sqSr - 1) < 0.02, $"squeezed {sq} vs (5/12)(1 - n_s) = {sqSr}");
        Assert.True(eqErr > 0 && eqErr < 0.02 * Math.Abs(eq));
        Assert.Equal(6, b.GetProperty("equilateral_points").GetInt32());
        Assert.Equal(0, b.GetProperty("flags").GetArrayLength());
        var tri = b.GetProperty("triangles");
        Assert.Equal(2, tri.GetArrayLength());
        // The deck's equilateral triangle at k_* is the pivot's equilateral value (shared histories, same triangle).
        Assert.True(Math.Abs(tri[0].GetProperty("f_NL").GetDouble() / eq - 1) < 1e-6);
        Assert.Equal(0.03, tri[1].GetProperty("k3").GetDouble());
        Assert.Contains("triangle (0.05, 0.04, 0.03) /Mpc", run.Out);
        using var file = H5File.OpenRead(run.File("run.h5"));
        var g = file.Group("bispectrum");
        Assert.Equal(eq, g.Attribute("f_NL_equilateral").Read<double>());
        var k = g.Dataset("equilateral_k").Read<double[]>();
        var f = g.Dataset("equilateral_f_NL").Read<double[]>();
        Assert.Equal(6, k.Length);
        Assert.Equal(6, f.Length);
        var shape = g.Dataset("shape_f_NL").Read<double[,]>();
        Assert.Equal(4, shape.GetLength(0));
        // (x2, x3) = (1, 1) is the equilateral triangle at the pivot; (1, 0.05) the squeezed corner; (0.05, 1) lies outside.
        Assert.True(Math.Abs(shape[3, 3] / eq - 1) < 1e-6, $"{shape[3, 3]} vs {eq}");
        Assert.True(double.IsNaN(shape[0, 3]));
        Assert.Contains("bispectrum", run.Out);
    }
}
