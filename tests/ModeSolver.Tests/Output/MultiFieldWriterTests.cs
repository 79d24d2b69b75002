using System.Text.Json;
using ModeSolver.Background;
using ModeSolver.Output;
using ModeSolver.Report;
using ModeSolver.Runs;
using ModeSolver.Tests.Background;

namespace ModeSolver.Tests.Output;

public class MultiFieldWriterTests
{
    /// <summary>The synthetic report with the n-field additions of a real double-quadratic background (m_chi = 2 m_phi).</summary>
    private static RunReport Report()
    {
        var settings = new BackgroundSettings { Fields0 = new[] { 13.0, 8.0 }, Tolerance = 1e-11, EFoldsAfterEnd = 1 };
        var bg = FieldBackgroundSolver.Solve(FieldBackgroundTests.DoubleQuadratic(1, 2), settings);
        var baseReport = SyntheticReport.Create(modes: 12);
        double nPivot = bg.NEnd - 50;
        var (multi, flags) = MultiFieldStage.Compute(bg, settings, origin: 0, nPivot, vScale: 1e-10, windowStart: nPivot - 3,
            modesPzeta: 2.1e-9, modesPzetaError: 1e-12, kPivot: 0.05);
        return baseReport with { MultiField = multi, Flags = baseReport.Flags.AddRange(flags) };
    }

    [Fact]
    public void Json_has_the_delta_N_and_trajectory_keys()
    {
        var r = Report();
        var d = r.MultiField!.DeltaN!;
        using var doc = JsonDocument.Parse(SummaryJsonWriter.ToJson(r));
        var root = doc.RootElement;
        Assert.Equal(d.FNL, root.GetProperty("f_NL_local").GetDouble());
        Assert.Equal(d.FNLError, root.GetProperty("f_NL_local_error").GetDouble());
        var dn = root.GetProperty("delta_N");
        Assert.Equal(d.Pzeta, dn.GetProperty("P_zeta").GetDouble());
        Assert.Equal(d.PzetaError, dn.GetProperty("P_zeta_error").GetDouble());
        Assert.Equal(2.1e-9, dn.GetProperty("P_zeta_modes").GetDouble());
        Assert.Equal(d.Agrees, dn.GetProperty("agrees").GetBoolean());
        Assert.Equal(2, dn.GetProperty("N_I").GetArrayLength());
        Assert.Equal(d.Gradient[1], dn.GetProperty("N_I")[1].GetDouble());
        Assert.Equal("uniform-density", dn.GetProperty("slice").GetString());
        Assert.Equal("attractor", dn.GetProperty("velocity").GetString());
        var t = root.GetProperty("trajectory");
        Assert.Equal(["phi", "chi"], t.GetProperty("field_names").EnumerateArray().Select(e => e.GetString()!).ToArray());
        Assert.True(t.GetProperty("max_eta_perp").GetDouble() > 0);
        // f_NL of the double quadratic is slow-roll small and P_zeta scales with the potential (V scale 1e-10 here).
        Assert.InRange(d.FNL, 0.005, 0.01);
        Assert.Equal(d.Raw.Pzeta * 1e-10, d.Pzeta, 1e-15 * d.Pzeta);
    }

    [SkippableFact]
    public void Hdf5_field_indexed_arrays_are_readable_by_h5dump()
    {
        string? h5dump = ExternalTools.FindOnPath("h5dump");
        Skip.If(h5dump is null, "h5dump not installed: apt-get install hdf5-tools");
        var r = Report();
        var t = r.MultiField!.Trajectory;
        string dir = SyntheticReport.TempDir();
        try
        {
            string path = Path.Combine(dir, "run.h5");
            Hdf5Writer.Write(r, path);
            string header = ExternalTools.Run(h5dump!, "-H -d /multifield/trajectory/fields " + path);
            Assert.Contains($"( {t.N.Length}, 2 )", header);
            var fields = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /multifield/trajectory/fields -m %.17g " + path));
            Assert.Equal(t.Fields.ToArray(), fields); // row-major: (phi, chi) per N
            var eta = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /multifield/trajectory/eta_perp -m %.17g " + path));
            Assert.Equal(t.TurnRate.ToArray(), eta);
            var ms = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /multifield/trajectory/m_s2_over_H2 -m %.17g " + path));
            Assert.Equal(t.EntropicMass.ToArray(), ms);
            var fnl = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-a /multifield/delta_N/f_NL_local -m %.17g " + path));
            Assert.Equal([r.MultiField.DeltaN!.FNL], fnl);
            var nij = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /multifield/delta_N/N_IJ -m %.17g " + path));
            Assert.Equal(r.MultiField.DeltaN.Raw.Hessian.ToArray(), nij);
            string names = ExternalTools.Run(h5dump!, "-a /multifield/trajectory/field_names " + path);
            Assert.Contains("\"chi\"", names);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Plots_are_non_empty_png_and_svg()
    {
        var r = Report();
        string dir = SyntheticReport.TempDir();
        try
        {
            var files = new[] { "trajectory.png", "trajectory.svg", "turn-rate.png", "turn-rate.svg" }.Select(f => Path.Combine(dir, f)).ToArray();
            MultiFieldPlots.SaveTrajectory(r, files[0], PlotFormat.Png);
            MultiFieldPlots.SaveTrajectory(r, files[1], PlotFormat.Svg);
            MultiFieldPlots.SaveKinematics(r, files[2], PlotFormat.Png);
            MultiFieldPlots.SaveKinematics(r, files[3], PlotFormat.Svg);
            byte[] sig = [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A];
            foreach (var f in new[] { files[0], files[2] })
            {
                var bytes = File.ReadAllBytes(f);
                Assert.Equal(sig, bytes[..8]);
                Assert.True(bytes.Length > 20_000, $"{f}: {bytes.Length} bytes");
                Assert.Equal(MultiFieldPlots.Height, (bytes[20] << 24) | (bytes[21] << 16) | (bytes[22] << 8) | bytes[23]);
            }
            foreach (var f in new[] { files[1], files[3] })
            {
                var x = System.Xml.Linq.XDocument.Load(f);
                Assert.Equal("svg", x.Root!.Name.LocalName);
                Assert.True(x.Descendants().Count(e => e.Name.LocalName == "path") > 20, f);
            }
            // The field-space plot draws the contours of ln V: many more paths than the trajectory alone.
            var traj = System.Xml.Linq.XDocument.Load(files[1]);
            Assert.True(traj.Descendants().Count(e => e.Name.LocalName == "path") > MultiFieldPlots.ContourLevels);
            Assert.Contains("chi", File.ReadAllText(files[1]));
        }
        finally { Directory.Delete(dir, true); }
    }
}
