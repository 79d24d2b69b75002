using ModeSolver.Models;

namespace ModeSolver.Tests.Models;

public class FieldGeometryTests
{
    /// <summary>The 2-sphere of radius r in (theta, varphi): ds^2 = r^2 d theta^2 + r^2 sin^2 theta d varphi^2, closed-form derivatives.</summary>
    private static MetricFieldTheory Sphere(double r, bool closedForm)
    {
        double r2 = r * r;
        return new MetricFieldTheory(new[] { "theta", "varphi" }, phi => 1.0,
            metric: (phi, g) => { g[0] = r2; g[1] = 0; g[2] = 0; g[3] = r2 * Math.Sin(phi[0]) * Math.Sin(phi[0]); },
            metricDerivative: closedForm ? (phi, d) =>
            {
                d.Clear();
                d[3] = r2 * Math.Sin(2 * phi[0]);             // d_theta G_vv
            } : null,
            metricSecondDerivative: closedForm ? (phi, d) =>
            {
                d.Clear();
                d[3] = 2 * r2 * Math.Cos(2 * phi[0]);         // d_theta d_theta G_vv at [(0 * 2 + 0) * 4 + 3]
            } : null);
    }

    /// <summary>
    /// The hyperbolic disk of the alpha-attractors in (phi, theta): ds^2 = d phi^2 + (3 alpha/2) sinh^2(sqrt(2/(3 alpha)) phi) d theta^2
    /// (physics.md section 7, Kahler potential -3 alpha ln(1 - Z Zbar)), closed-form derivatives.
    /// </summary>
    private static MetricFieldTheory Disk(double alpha, bool closedForm)
    {
        double a = 1.5 * alpha, c = Math.Sqrt(2.0 / (3.0 * alpha));
        return new MetricFieldTheory(new[] { "phi", "theta" }, phi => 1.0,
            metric: (phi, g) => { double s = Math.Sinh(c * phi[0]); g[0] = 1; g[1] = 0; g[2] = 0; g[3] = a * s * s; },
            metricDerivative: closedForm ? (phi, d) => { d.Clear(); d[3] = a * c * Math.Sinh(2 * c * phi[0]); } : null,
            metricSecondDerivative: closedForm ? (phi, d) => { d.Clear(); d[3] = 2 * a * c * c * Math.Cosh(2 * c * phi[0]); } : null);
    }

    [Theory]
    [InlineData(1.0, true)]
    [InlineData(2.5, true)]
    [InlineData(2.5, false)]
    public void TwoSphere_RicciScalarIsTwoOverRSquared(double r, bool closedForm)
    {
        // Any GR text (e.g. Carroll 2004, Spacetime and Geometry, section 3.7): the 2-sphere of radius r has Gaussian
        // curvature 1/r^2 and Ricci scalar R = 2/r^2, the same at every point.
        var sphere = Sphere(r, closedForm);
        double tol = closedForm ? 1e-12 : 1e-7;
        foreach (double theta in new[] { 0.4, 1.1, 2.3 })
        {
            double ricci = FieldGeometry.RicciScalar(sphere, new[] { theta, 0.7 });
            Assert.True(Math.Abs(ricci - 2 / (r * r)) <= tol * (2 / (r * r)), $"R = {ricci} at theta = {theta}, expected {2 / (r * r)}");
        }
    }

    [Fact]
    public void ThreeSphere_RicciScalarIsSixOverRSquared_NumericalDerivatives()
    {
        // Any GR text: the n-sphere of radius r has R = n(n - 1)/r^2 (6/r^2 for n = 3). Metric r^2 (d a^2 + sin^2 a (d b^2 + sin^2 b d c^2)),
        // every derivative by the documented Richardson differences.
        const double r = 1.7;
        var s3 = new MetricFieldTheory(new[] { "a", "b", "c" }, phi => 1.0, metric: (phi, g) =>
        {
            g.Clear();
            double sa = Math.Sin(phi[0]), sb = Math.Sin(phi[1]);
            g[0] = r * r; g[4] = r * r * sa * sa; g[8] = r * r * sa * sa * sb * sb;
        });
        double ricci = FieldGeometry.RicciScalar(s3, new[] { 0.9, 1.3, 0.2 });
        Assert.True(Math.Abs(ricci - 6 / (r * r)) <= 1e-6 * 6 / (r * r), $"R = {ricci}, expected {6 / (r * r)}");
    }

    [Theory]
    [InlineData(1.0 / 3.0, true)]
    [InlineData(1.0, true)]
    [InlineData(4.0, true)]
    [InlineData(1.0, false)]
    public void HyperbolicDisk_RicciScalarIsMinusFourOverThreeAlpha(double alpha, bool closedForm)
    {
        // physics.md section 7 (alpha-attractors on the disk, e.g. Achucarro, Kallosh, Linde, Wang & Welling 2018, JCAP 04, 028):
        // Gaussian curvature -2/(3 alpha), R_fs = -4/(3 alpha); and in two dimensions R_IJKL = (R/2)(G_IK G_JL - G_IL G_JK).
        var disk = Disk(alpha, closedForm);
        double expected = -4.0 / (3.0 * alpha);
        double tol = closedForm ? 1e-11 : 1e-7;
        foreach (double phi in new[] { 0.3, 1.0, 2.2 })
        {
            var x = new[] { phi, 0.5 };
            double ricci = FieldGeometry.RicciScalar(disk, x);
            Assert.True(Math.Abs(ricci - expected) <= tol * Math.Abs(expected), $"R = {ricci} at phi = {phi}, expected {expected}");
            var riemann = new double[16];
            var g = new double[4];
            disk.Riemann(x, riemann);
            disk.Metric(x, g);
            // R^0_101 = G^00 R_0101 = (R/2) G_11 (G^00 = 1).
            double r0101 = 0.5 * expected * g[3];
            Assert.True(Math.Abs(riemann[((0 * 2 + 1) * 2 + 0) * 2 + 1] - r0101) <= tol * Math.Abs(r0101) + 1e-14, $"R^0_101 = {riemann[5]}, expected {r0101}");
            Assert.True(Math.Abs(riemann[((0 * 2 + 1) * 2 + 1) * 2 + 0] + r0101) <= tol * Math.Abs(r0101) + 1e-14, "antisymmetry in the last pair");
        }
    }

    [Fact]
    public void FlatPlaneInPolarCoordinates_HasTheKnownChristoffelsAndNoCurvature()
    {
        // ds^2 = dr^2 + r^2 d theta^2 (any GR text): Gamma^r_thth = -r, Gamma^th_rth = 1/r, Riemann = 0.
        var polar = new MetricFieldTheory(new[] { "r", "theta" }, phi => 1.0,
            metric: (phi, g) => { g[0] = 1; g[1] = 0; g[2] = 0; g[3] = phi[0] * phi[0]; });
        var x = new[] { 1.7, 0.4 };
        var gamma = new double[8];
        polar.Christoffel(x, gamma);
        Assert.Equal(-1.7, gamma[(0 * 2 + 1) * 2 + 1], 1e-9);
        Assert.Equal(1 / 1.7, gamma[(1 * 2 + 0) * 2 + 1], 1e-9);
        Assert.Equal(1 / 1.7, gamma[(1 * 2 + 1) * 2 + 0], 1e-9);
        Assert.Equal(0.0, gamma[0], 1e-9);
        var riemann = new double[16];
        polar.Riemann(x, riemann);
        foreach (double v in riemann) Assert.True(Math.Abs(v) < 1e-7, $"Riemann component {v} on a flat plane");
    }

    /// <summary>Gauss-Jordan elimination with partial pivoting: an independent direct solve of A X = B (B n x m, row-major).</summary>
    private static double[] DirectSolve(double[] a, int n, double[] b, int m)
    {
        var A = (double[])a.Clone();
        var B = (double[])b.Clone();
        for (int c = 0; c < n; c++)
        {
            int piv = c;
            for (int r = c + 1; r < n; r++) if (Math.Abs(A[r * n + c]) > Math.Abs(A[piv * n + c])) piv = r;
            for (int k = 0; k < n; k++) (A[c * n + k], A[piv * n + k]) = (A[piv * n + k], A[c * n + k]);
            for (int k = 0; k < m; k++) (B[c * m + k], B[piv * m + k]) = (B[piv * m + k], B[c * m + k]);
            for (int r = 0; r < n; r++)
            {
                if (r == c) continue;
                double f = A[r * n + c] / A[c * n + c];
                for (int k = 0; k < n; k++) A[r * n + k] -= f * A[c * n + k];
                for (int k = 0; k < m; k++) B[r * m + k] -= f * B[c * m + k];
            }
        }
        for (int r = 0; r < n; r++) for (int k = 0; k < m; k++) B[r * m + k] /= A[r * n + r];
        return B;
    }

    [Fact]
    public void ThreeByThree_CholeskyAndInverseAgreeWithADirectSolve()
    {
        // A fixed symmetric positive-definite matrix M = B B^T + I (B an arbitrary fixed matrix).
        double[] bm = { 0.3, -1.2, 0.7, 2.1, 0.4, -0.5, -0.8, 1.5, 0.9 };
        var g = new double[9];
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
            {
                double s = i == j ? 1 : 0;
                for (int k = 0; k < 3; k++) s += bm[i * 3 + k] * bm[j * 3 + k];
                g[i * 3 + j] = s;
            }
        var lower = new double[9];
        Assert.True(FieldGeometry.Cholesky(g, 3, lower));
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
            {
                double s = 0;
                for (int k = 0; k < 3; k++) s += lower[i * 3 + k] * lower[j * 3 + k];
                Assert.Equal(g[i * 3 + j], s, 1e-13);
                if (j > i) Assert.Equal(0.0, lower[i * 3 + j]);
            }
        var inverse = new double[9];
        Assert.True(FieldGeometry.Inverse(g, 3, inverse, new double[9]));
        var identity = new double[9];
        identity[0] = identity[4] = identity[8] = 1;
        var direct = DirectSolve(g, 3, identity, 3);
        for (int i = 0; i < 9; i++) Assert.Equal(direct[i], inverse[i], 1e-13);
        double[] rhs = { 0.5, -2.0, 1.25 };
        var x = new double[3];
        FieldGeometry.CholeskySolve(lower, 3, rhs, x);
        var xd = DirectSolve(g, 3, rhs, 1);
        for (int i = 0; i < 3; i++) Assert.Equal(xd[i], x[i], 1e-13);
    }

    [Fact]
    public void Cholesky_RejectsIndefiniteAndSingularMetrics()
    {
        double[] indefinite = { 1, 2, 0, 2, 1, 0, 0, 0, 1 }; // eigenvalues 3, -1, 1
        double[] singular = { 1, 1, 0, 1, 1, 0, 0, 0, 1 };
        Assert.False(FieldGeometry.Cholesky(indefinite, 3, new double[9]));
        Assert.False(FieldGeometry.Cholesky(singular, 3, new double[9]));
        Assert.False(FieldGeometry.SmallestPivot(indefinite, 3, new double[9]) > 0);
        Assert.False(FieldGeometry.Inverse(singular, 3, new double[9], new double[9]));
    }

    [Fact]
    public void NumericalDerivatives_MatchClosedForms()
    {
        // V = exp(x) sin(y) + x^2 y^3: gradient and Hessian in closed form against the Richardson differences.
        FieldScalar v = p => Math.Exp(p[0]) * Math.Sin(p[1]) + p[0] * p[0] * p[1] * p[1] * p[1];
        var x = new[] { 0.7, -1.3 };
        var grad = new double[2];
        NumericalDerivatives.Gradient(v, x, grad);
        double ex = Math.Exp(0.7), s = Math.Sin(-1.3), c = Math.Cos(-1.3), y = -1.3;
        Assert.Equal(ex * s + 2 * 0.7 * y * y * y, grad[0], 1e-9);
        Assert.Equal(ex * c + 3 * 0.49 * y * y, grad[1], 1e-9);
        var hess = new double[4];
        NumericalDerivatives.Hessian(v, x, hess);
        Assert.Equal(ex * s + 2 * y * y * y, hess[0], 1e-7);
        Assert.Equal(ex * c + 6 * 0.7 * y * y, hess[1], 1e-7);
        Assert.Equal(hess[1], hess[2]);
        Assert.Equal(-ex * s + 6 * 0.49 * y, hess[3], 1e-7);
    }
}
