using System.Text.Json;
using ModeSolver.Output;
using ModeSolver.Report;
using ModeSolver.Runs;
using ModeSolver.Tests.Background;

namespace ModeSolver.Tests.Output;

public class MultiFieldWriterTests
{
    /// <summary>A real two-field report (double quadratic, m_chi = 2 m_phi, from TheoryRun), computed once for the class.</summary>
    private static readonly Lazy<RunReport> Shared = new(() =>
        TheoryRun.Run(FieldBackgroundTests.DoubleQuadratic(1, 2),
            new RunRequest { Fields0 = [15.0, 9.0], KMin = 1e-3, KMax = 1e-1, KCount = 5, Tolerance = 1e-5, BackgroundSamples = 64, Threads = 1 }));

    private static RunReport Report() => Shared.Value;

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
        Assert.Equal(r.Pivot.As, dn.GetProperty("P_zeta_modes").GetDouble());
        Assert.Equal(d.Agrees, dn.GetProperty("agrees").GetBoolean());
        Assert.Equal(2, dn.GetProperty("N_I").GetArrayLength());
        Assert.Equal(d.Gradient[1], dn.GetProperty("N_I")[1].GetDouble());
        Assert.Equal("uniform-density", dn.GetProperty("slice").GetString());
        Assert.Equal("attractor", dn.GetProperty("velocity").GetString());
        var t = root.GetProperty("trajectory");
        Assert.Equal(["phi", "chi"], t.GetProperty("field_names").EnumerateArray().Select(e => e.GetString()!).ToArray());
        Assert.True(t.GetProperty("max_eta_perp").GetDouble() > 0);
        // f_NL of the double quadratic is slow-roll small and P_zeta scales with the potential.
        Assert.InRange(d.FNL, 0.005, 0.01);
        Assert.Equal(d.Raw.Pzeta * r.Pivot.VScale, d.Pzeta, 1e-15 * d.Pzeta);
        var iso = root.GetProperty("isocurvature");
        var p = r.Isocurvature!.Pivot;
        Assert.Equal(p.Ps, iso.GetProperty("P_S").GetDouble());
        Assert.Equal(p.BetaIso, iso.GetProperty("beta_iso").GetDouble());
        Assert.Equal(p.CosDelta, iso.GetProperty("cos_delta").GetDouble());
        Assert.Equal(p.Trs, iso.GetProperty("T_RS").GetDouble());
        // A single-field report has none of these keys.
        using var single = JsonDocument.Parse(SummaryJsonWriter.ToJson(SyntheticReport.Create(modes: 12)));
        foreach (var key in new[] { "isocurvature", "f_NL_local", "delta_N", "trajectory" })
            Assert.False(single.RootElement.TryGetProperty(key, out _), key);
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
            // The spectra matrix: k x 2 x 2, [[P_R, C_RS], [C_RS, P_S]] per k.
            var iso = r.Isocurvature!;
            Assert.Contains($"( {iso.K.Length}, 2, 2 )", ExternalTools.Run(h5dump!, "-H -d /isocurvature/spectra_matrix " + path));
            var matrix = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-d /isocurvature/spectra_matrix -m %.17g " + path));
            for (int i = 0; i < iso.K.Length; i++)
            {
                Assert.Equal(r.Spectrum.Ps[i], matrix[4 * i]);
                Assert.Equal(iso.Crs[i], matrix[4 * i + 1]);
                Assert.Equal(iso.Crs[i], matrix[4 * i + 2]);
                Assert.Equal(iso.Ps[i], matrix[4 * i + 3]);
            }
            var beta = ExternalTools.H5DumpDataValues(ExternalTools.Run(h5dump!, "-a /isocurvature/beta_iso -m %.17g " + path));
            Assert.Equal([iso.Pivot.BetaIso], beta);
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

    [Fact]
    public void Terminal_summary_has_the_isocurvature_delta_N_and_trajectory_lines()
    {
        var r = Report();
        var sw = new StringWriter();
        ModeSolver.Cli.Output.SummaryPrinter.Print(r, sw, plain: true);
        string s = sw.ToString();
        var lines = s.Split('\n');
        Assert.Single(lines, l => l.StartsWith("isocurvature at the pivot: P_S = ", StringComparison.Ordinal) && l.Contains("beta_iso"));
        var dn = Assert.Single(lines, l => l.StartsWith("delta N: P_zeta = ", StringComparison.Ordinal));
        Assert.Contains("agree", dn);
        Assert.Contains("f_NL^local = " + r.MultiField!.DeltaN!.FNL.ToString("0.0000e+00", System.Globalization.CultureInfo.InvariantCulture).Replace("E", "e"), dn);
        Assert.Single(lines, l => l.StartsWith("trajectory (phi, chi): largest eta_perp = ", StringComparison.Ordinal));
        Assert.DoesNotContain('\u001b', s);
    }

    [Fact]
    public void WriteAll_writes_the_n_field_files_and_refuses_an_inconsistent_trajectory()
    {
        var r = Report();
        string dir = SyntheticReport.TempDir();
        try
        {
            var files = RunOutputs.Standard(table: false).Concat(RunOutputs.FieldPlots(2)).ToList();
            var written = RunOutputs.WriteAll(r, dir, files);
            Assert.Equal(files.Count, written.Count);
            foreach (var name in new[] { "trajectory.png", "trajectory.svg", "turn-rate.png", "turn-rate.svg", "run.h5", "summary.json" })
                Assert.True(File.Exists(Path.Combine(dir, name)), name);
            Assert.Equal(2, RunOutputs.FieldPlots(3).Count);
            Assert.Empty(RunOutputs.FieldPlots(1));
            var t = r.MultiField!.Trajectory;
            var broken = r with { MultiField = r.MultiField with { Trajectory = t with { Fields = t.Fields.RemoveAt(0) } } };
            var ex = Assert.Throws<ArgumentException>(() => RunOutputs.WriteAll(broken, dir, files));
            Assert.Contains("trajectory fields and velocities", ex.Message);
        }
        finally { Directory.Delete(dir, true); }
    }
}
