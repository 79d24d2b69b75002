using ModeSolver.Formulas;

namespace ModeSolver.Tests.Formulas;

/// <summary>
/// Values and derivatives 1..3 (and 4..5 on some cases) against derivatives derived by hand and written out below.
/// Tolerance: 1e-12 relative, with a floor of 1e-3 of the largest magnitude of that derivative over the sampled points
/// (where a derivative crosses zero, rounding is relative to the size of the terms that cancel).
/// </summary>
public class FormulaDerivativeTests
{
    private delegate double[] Exact(double phi);

    private static double[] Points(double lo, double hi, int count = 50)
    {
        var p = new double[count];
        for (int i = 0; i < count; i++) p[i] = lo + (hi - lo) * (i + 0.37) / count; // offset avoids symmetric special points only
        return p;
    }

    private static void Check(Formula f, Exact exact, double[] points, double rel = 1e-12)
    {
        int orders = exact(points[0]).Length;
        var expected = points.Select(p => exact(p)).ToArray();
        var floor = new double[orders];
        for (int k = 0; k < orders; k++) floor[k] = 1e-3 * expected.Max(e => Math.Abs(e[k]));
        var d = new double[orders];
        for (int i = 0; i < points.Length; i++)
        {
            f.EvaluateDerivatives(points[i], d);
            var jet = f.Evaluate(points[i]);
            double[] fromJet = [jet.Value, jet.D1, jet.D2, jet.D3];
            for (int k = 0; k < orders; k++)
            {
                double tol = rel * Math.Max(Math.Abs(expected[i][k]), floor[k]);
                Assert.True(Math.Abs(d[k] - expected[i][k]) <= tol,
                    $"{f.Text}: order {k} at phi = {points[i]:R}: got {d[k]:R}, hand-derived {expected[i][k]:R}");
                if (k < 4)
                    Assert.True(Math.Abs(fromJet[k] - expected[i][k]) <= tol,
                        $"{f.Text}: Jet3 order {k} at phi = {points[i]:R}: got {fromJet[k]:R}, hand-derived {expected[i][k]:R}");
            }
            Assert.Equal(d[0], f.Value(points[i]));
        }
    }

    [Fact]
    public void TModel()
    {
        // V = V0 tanh^2(phi/sqrt(6 alpha)) (T-model; Kallosh, Linde & Roest 2013, JHEP 11, 198).
        // With t = tanh(phi/s), S = sech^2(phi/s), s = sqrt(6 alpha), by hand:
        // V' = 2 V0 t S / s, V'' = 2 V0 S (S - 2 t^2) / s^2, V''' = 8 V0 t S (t^2 - 2 S) / s^3.
        double v0 = 2.3e-10, alpha = 0.7, s = Math.Sqrt(6 * alpha);
        var f = Formula.Parse("V0*tanh(phi/sqrt(6*alpha))^2", new Dictionary<string, double> { ["V0"] = v0, ["alpha"] = alpha });
        Check(f, phi =>
        {
            double t = Math.Tanh(phi / s), ch = Math.Cosh(phi / s), S = 1 / (ch * ch);
            return [v0 * t * t, 2 * v0 * t * S / s, 2 * v0 * S * (S - 2 * t * t) / (s * s), 8 * v0 * t * S * (t * t - 2 * S) / (s * s * s)];
        }, Points(-12, 12));
    }

    [Fact]
    public void StarobinskyEinsteinFrame()
    {
        // V = V0 (1 - exp(-sqrt(2/3) phi))^2 (Starobinsky 1980, Phys. Lett. B 91, 99, in the Einstein frame).
        // With E = exp(-a phi), a = sqrt(2/3): V' = 2 a V0 E (1 - E), V'' = -2 a^2 V0 E (1 - 2E), V''' = 2 a^3 V0 E (1 - 4E).
        double v0 = 1.1e-10, a = Math.Sqrt(2.0 / 3.0);
        var f = Formula.Parse("V0*(1 - exp(-sqrt(2/3)*phi))^2", new Dictionary<string, double> { ["V0"] = v0 });
        Check(f, phi =>
        {
            double e = Math.Exp(-a * phi);
            return [v0 * (1 - e) * (1 - e), 2 * a * v0 * e * (1 - e), -2 * a * a * v0 * e * (1 - 2 * e), 2 * a * a * a * v0 * e * (1 - 4 * e)];
        }, Points(-1, 10));
    }

    [Fact]
    public void StarobinskyOrdersFourAndFive()
    {
        // Expanding V = V0 (1 - 2E + E^2) with E = exp(-a phi): V^(n) = V0 [-2 (-a)^n E + (-2a)^n E^2] for n >= 1 (by hand).
        double v0 = 1.0, a = Math.Sqrt(2.0 / 3.0);
        var f = Formula.Parse("V0*(1 - exp(-sqrt(2/3)*phi))^2", new Dictionary<string, double> { ["V0"] = v0 });
        Check(f, phi =>
        {
            double e = Math.Exp(-a * phi);
            var r = new double[6];
            r[0] = v0 * (1 - e) * (1 - e);
            for (int n = 1; n <= 5; n++) r[n] = v0 * (-2 * Math.Pow(-a, n) * e + Math.Pow(-2 * a, n) * e * e);
            return r;
        }, Points(0.2, 8), rel: 1e-11);
    }

    [Fact]
    public void NaturalInflationToOrderFive()
    {
        // V = Lambda^4 (1 + cos(phi/f)) (natural inflation; Freese, Frieman & Olinto 1990, Phys. Rev. Lett. 65, 3233).
        // By hand: V^(n) = Lambda^4 f^(-n) cos(phi/f + n pi/2) for n >= 1.
        double l4 = 3e-9, fd = 5.5;
        var f = Formula.Parse("Lambda^4*(1 + cos(phi/f))", new Dictionary<string, double> { ["Lambda"] = Math.Pow(l4, 0.25), ["f"] = fd });
        double lam4 = Math.Pow(Math.Pow(l4, 0.25), 4);
        Check(f, phi =>
        {
            double x = phi / fd;
            var r = new double[6];
            r[0] = lam4 * (1 + Math.Cos(x));
            r[1] = -lam4 * Math.Sin(x) / fd;
            r[2] = -lam4 * Math.Cos(x) / (fd * fd);
            r[3] = lam4 * Math.Sin(x) / (fd * fd * fd);
            r[4] = lam4 * Math.Cos(x) / Math.Pow(fd, 4);
            r[5] = -lam4 * Math.Sin(x) / Math.Pow(fd, 5);
            return r;
        }, Points(0, 2 * Math.PI * fd), rel: 1e-11);
    }

    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(4)]
    [InlineData(6)]
    [InlineData(-2)]
    public void IntegerMonomials(int p)
    {
        // V = lambda phi^p; power rule by hand: V^(k) = lambda p (p-1) ... (p-k+1) phi^(p-k). Includes negative phi.
        double lambda = 1.7e-13;
        var f = Formula.Parse($"lambda*phi^{p}", new Dictionary<string, double> { ["lambda"] = lambda });
        Check(f, phi =>
        {
            var r = new double[6];
            double coeff = lambda;
            for (int k = 0; k <= 5; k++)
            {
                r[k] = coeff * Math.Pow(phi, p - k);
                coeff *= p - k;
            }
            return r;
        }, p < 0 ? Points(0.3, 20) : Points(-20, 20), rel: 1e-12);
    }

    [Fact]
    public void RealPowerMonomial()
    {
        // V = lambda phi^(2/3); power rule by hand, phi > 0.
        double lambda = 2e-10, p = 2.0 / 3.0;
        var f = Formula.Parse("lambda*phi^(2/3)", new Dictionary<string, double> { ["lambda"] = lambda });
        Check(f, phi => [lambda * Math.Pow(phi, p), lambda * p * Math.Pow(phi, p - 1),
            lambda * p * (p - 1) * Math.Pow(phi, p - 2), lambda * p * (p - 1) * (p - 2) * Math.Pow(phi, p - 3)], Points(0.05, 30));
    }

    [Fact]
    public void QuadraticWithTanhStep()
    {
        // V = (1/2) m^2 phi^2 (1 + c tanh((phi - phi_s)/d)) (step in the potential; Adams, Cresswell & Easther 2001,
        // Phys. Rev. D 64, 123514). By hand, Q = m^2 phi^2/2, T = 1 + c t, t = tanh(y), S = sech^2(y), y = (phi - phi_s)/d:
        // T' = c S/d, T'' = -2 c t S/d^2, T''' = -2 c S (S - 2 t^2)/d^3, and V^(n) by Leibniz with Q''' = 0.
        double m = 7.1e-6, c = 1.8e-3, ps = 14.7, dd = 0.03;
        var f = Formula.Parse("0.5*m^2*phi^2*(1 + c*tanh((phi - phi_s)/d))",
            new Dictionary<string, double> { ["m"] = m, ["c"] = c, ["phi_s"] = ps, ["d"] = dd });
        Check(f, phi =>
        {
            double m2 = m * m, q = 0.5 * m2 * phi * phi, q1 = m2 * phi, q2 = m2;
            double y = (phi - ps) / dd, t = Math.Tanh(y), ch = Math.Cosh(y), S = 1 / (ch * ch);
            double T = 1 + c * t, T1 = c * S / dd, T2 = -2 * c * t * S / (dd * dd), T3 = -2 * c * S * (S - 2 * t * t) / (dd * dd * dd);
            return [q * T, q1 * T + q * T1, q2 * T + 2 * q1 * T1 + q * T2, 3 * q2 * T1 + 3 * q1 * T2 + q * T3];
        }, Points(14.4, 15.0));
    }

    [Fact]
    public void ConformalFactor()
    {
        // Omega^2 = 1 + xi phi^2 (non-minimal coupling; Bezrukov & Shaposhnikov 2008, Phys. Lett. B 659, 703): 2 xi phi, 2 xi, 0.
        // And Omega^-4 = (1 + xi phi^2)^-2: by hand with u = 1 + xi phi^2:
        // -4 xi phi u^-3, -4 xi u^-3 + 24 xi^2 phi^2 u^-4, 72 xi^2 phi u^-4 - 192 xi^3 phi^3 u^-5.
        double xi = 1.3e3;
        var p = new Dictionary<string, double> { ["xi"] = xi };
        Check(Formula.Parse("1 + xi*phi^2", p), phi => [1 + xi * phi * phi, 2 * xi * phi, 2 * xi, 0], Points(-1, 1));
        Check(Formula.Parse("(1 + xi*phi^2)^-2", p), phi =>
        {
            double u = 1 + xi * phi * phi;
            return [1 / (u * u), -4 * xi * phi / (u * u * u), -4 * xi / Math.Pow(u, 3) + 24 * xi * xi * phi * phi / Math.Pow(u, 4),
                72 * xi * xi * phi / Math.Pow(u, 4) - 192 * xi * xi * xi * Math.Pow(phi, 3) / Math.Pow(u, 5)];
        }, Points(-0.5, 0.5));
    }

    public static TheoryData<string, double, double> CompositionCases => new()
    {
        { "log(1 + phi^2)", -6, 6 },
        { "sqrt(1 + phi^2)", -6, 6 },
        { "asinh(phi/m)", -6, 6 },
        { "(1 + phi^2)^1.5", -6, 6 },
        { "atan(phi)", -6, 6 },
        { "phi^phi", 0.2, 4 },
        { "log10(phi)", 0.1, 50 },
        { "exp(-phi^2/2)*sin(3*phi)", -3, 3 },
        { "phi/(1 + phi^2)", -5, 5 },
        { "tan(phi)", -1.4, 1.4 },
        { "atanh(phi)", -0.95, 0.95 },
        { "asin(phi) + acos(phi/2)", -0.95, 0.95 },
        { "acosh(phi)", 1.05, 20 },
        { "sinh(phi) - cosh(phi)", -5, 5 },
        { "2^phi", -5, 5 },
    };

    [Theory]
    [MemberData(nameof(CompositionCases))]
    public void Compositions(string text, double lo, double hi)
    {
        // Hand-derived derivatives of each composition (elementary calculus), written out in HandDerived below.
        const double m = 0.8;
        var f = Formula.Parse(text, text.Contains("m)") ? new Dictionary<string, double> { ["m"] = m } : null);
        Check(f, phi => HandDerived(text, phi, m), Points(lo, hi));
    }

    private static double[] HandDerived(string text, double x, double m)
    {
        switch (text)
        {
            case "log(1 + phi^2)":
            {
                double u = 1 + x * x;
                return [Math.Log(u), 2 * x / u, 2 * (1 - x * x) / (u * u), 4 * x * (x * x - 3) / (u * u * u)];
            }
            case "sqrt(1 + phi^2)":
            {
                double u = 1 + x * x;
                return [Math.Sqrt(u), x / Math.Sqrt(u), Math.Pow(u, -1.5), -3 * x * Math.Pow(u, -2.5)];
            }
            case "asinh(phi/m)":
            {
                double u = m * m + x * x;
                return [Math.Asinh(x / m), 1 / Math.Sqrt(u), -x * Math.Pow(u, -1.5), (2 * x * x - m * m) * Math.Pow(u, -2.5)];
            }
            case "(1 + phi^2)^1.5":
            {
                double u = 1 + x * x;
                return [Math.Pow(u, 1.5), 3 * x * Math.Sqrt(u), 3 * Math.Sqrt(u) + 3 * x * x / Math.Sqrt(u),
                    9 * x / Math.Sqrt(u) - 3 * x * x * x * Math.Pow(u, -1.5)];
            }
            case "atan(phi)":
            {
                double u = 1 + x * x;
                return [Math.Atan(x), 1 / u, -2 * x / (u * u), (6 * x * x - 2) / (u * u * u)];
            }
            case "phi^phi":
            {
                double f = Math.Pow(x, x), l = Math.Log(x) + 1;
                return [f, f * l, f * (l * l + 1 / x), f * (l * l * l + 3 * l / x - 1 / (x * x))];
            }
            case "log10(phi)":
            {
                double ln10 = Math.Log(10);
                return [Math.Log10(x), 1 / (x * ln10), -1 / (x * x * ln10), 2 / (x * x * x * ln10)];
            }
            case "exp(-phi^2/2)*sin(3*phi)":
            {
                // g = exp(-x^2/2): g' = -x g, g'' = (x^2 - 1) g, g''' = (3x - x^3) g; h = sin 3x: 3cos, -9 sin, -27 cos.
                double g = Math.Exp(-x * x / 2), s = Math.Sin(3 * x), c = Math.Cos(3 * x);
                double g1 = -x * g, g2 = (x * x - 1) * g, g3 = (3 * x - x * x * x) * g;
                double h1 = 3 * c, h2 = -9 * s, h3 = -27 * c;
                return [g * s, g1 * s + g * h1, g2 * s + 2 * g1 * h1 + g * h2, g3 * s + 3 * g2 * h1 + 3 * g1 * h2 + g * h3];
            }
            case "phi/(1 + phi^2)":
            {
                double u = 1 + x * x;
                return [x / u, (1 - x * x) / (u * u), (2 * x * x * x - 6 * x) / (u * u * u), (-6 * x * x * x * x + 36 * x * x - 6) / (u * u * u * u)];
            }
            case "tan(phi)":
            {
                double t = Math.Tan(x), w = 1 + t * t;
                return [t, w, 2 * t * w, 2 * w * (1 + 3 * t * t)];
            }
            case "atanh(phi)":
            {
                double u = 1 - x * x;
                return [Math.Atanh(x), 1 / u, 2 * x / (u * u), (2 + 6 * x * x) / (u * u * u)];
            }
            case "asin(phi) + acos(phi/2)":
            {
                // asin: (1-x^2)^-1/2, x (1-x^2)^-3/2, (1 + 2x^2)(1-x^2)^-5/2; acos(x/2) = -asin(x/2): -(4 - x^2)^-1/2, ...
                double u = 1 - x * x, v = 4 - x * x;
                return [Math.Asin(x) + Math.Acos(x / 2),
                    Math.Pow(u, -0.5) - Math.Pow(v, -0.5),
                    x * Math.Pow(u, -1.5) - x * Math.Pow(v, -1.5),
                    (1 + 2 * x * x) * Math.Pow(u, -2.5) - (4 + 2 * x * x) * Math.Pow(v, -2.5)];
            }
            case "acosh(phi)":
            {
                double u = x * x - 1;
                return [Math.Acosh(x), Math.Pow(u, -0.5), -x * Math.Pow(u, -1.5), (2 * x * x + 1) * Math.Pow(u, -2.5)];
            }
            case "sinh(phi) - cosh(phi)":
            {
                double e = Math.Exp(-x); // sinh - cosh = -exp(-x)
                return [Math.Sinh(x) - Math.Cosh(x), e, -e, e];
            }
            case "2^phi":
            {
                double l = Math.Log(2), p = Math.Pow(2, x);
                return [p, l * p, l * l * p, l * l * l * p];
            }
            default:
                throw new ArgumentException(text);
        }
    }

    [Fact]
    public void KinkIsPiecewiseLinear()
    {
        // Linear potential with a change of slope (Starobinsky 1992, JETP Lett. 55, 489): V0 + A(phi - phi0), A = A_plus above, A_minus below.
        var p = new Dictionary<string, double> { ["V0"] = 1, ["Ap"] = 2e-3, ["Am"] = 2e-4, ["phi0"] = 0.7 };
        var f = Formula.Parse("piecewise(phi > phi0, V0 + Ap*(phi - phi0), V0 + Am*(phi - phi0))", p);
        foreach (double phi in Points(-2, 3))
        {
            double a = phi > 0.7 ? 2e-3 : 2e-4;
            var j = f.Evaluate(phi);
            Assert.Equal(1 + a * (phi - 0.7), j.Value, 15);
            Assert.True(Math.Abs(a - j.D1) <= 1e-18, "slope");
            Assert.Equal(0, j.D2);
            Assert.Equal(0, j.D3);
        }
    }

    [Fact]
    public void AbsMinMaxStepDerivativesAreThoseOfTheActiveBranch()
    {
        // Elementary: away from the switch, abs/min/max/step act as the selected branch.
        var f = Formula.Parse("abs(phi - 1)*phi + max(phi^2, 4) + min(phi, 0) + 3*step(phi - 0.5)");
        foreach (double x in new[] { -3.1, -1.2, 0.3, 0.8, 1.7, 2.6 })
        {
            double a = x > 1 ? 1 : -1;
            bool big = x * x > 4;
            double v = Math.Abs(x - 1) * x + (big ? x * x : 4) + Math.Min(x, 0) + (x >= 0.5 ? 3 : 0);
            double d1 = a * (2 * x - 1) + (big ? 2 * x : 0) + (x < 0 ? 1 : 0);
            double d2 = 2 * a + (big ? 2 : 0);
            var j = f.Evaluate(x);
            Assert.Equal(v, j.Value, 13);
            Assert.Equal(d1, j.D1, 13);
            Assert.Equal(d2, j.D2, 13);
            Assert.Equal(0, j.D3, 13);
        }
    }

    [Fact]
    public void HighOrderOfExpMatchesExactly()
    {
        // d^n/dphi^n exp(2 phi) = 2^n exp(2 phi) (elementary), orders 0..10.
        var f = Formula.Parse("exp(2*phi)");
        var d = new double[11];
        foreach (double x in new[] { -1.3, 0.0, 0.4, 2.2 })
        {
            f.EvaluateDerivatives(x, d);
            for (int n = 0; n <= 10; n++)
                Assert.True(Math.Abs(d[n] - Math.Pow(2, n) * Math.Exp(2 * x)) <= 1e-12 * Math.Pow(2, n) * Math.Exp(2 * x), $"order {n}");
        }
    }
}
