namespace ModeSolver.Integrators;

/// <summary>
/// LU factorisation with partial pivoting of small dense matrices, real and complex, in place, row-major
/// (Golub and Van Loan, Matrix Computations, 4th ed., alg. 3.4.1). No allocation.
/// </summary>
internal static class DenseLu
{
    /// <summary>Factors a (n x n) in place; returns false if a pivot is exactly zero (singular).</summary>
    public static bool Factor(Span<double> a, Span<int> pivot, int n)
    {
        for (int k = 0; k < n; k++)
        {
            int p = k;
            double max = Math.Abs(a[k * n + k]);
            for (int i = k + 1; i < n; i++)
            {
                double v = Math.Abs(a[i * n + k]);
                if (v > max) { max = v; p = i; }
            }
            pivot[k] = p;
            if (max == 0 || !double.IsFinite(max)) return false;
            if (p != k)
                for (int j = 0; j < n; j++) (a[k * n + j], a[p * n + j]) = (a[p * n + j], a[k * n + j]);
            double inv = 1.0 / a[k * n + k];
            for (int i = k + 1; i < n; i++)
            {
                double l = a[i * n + k] * inv;
                a[i * n + k] = l;
                if (l == 0) continue;
                for (int j = k + 1; j < n; j++) a[i * n + j] -= l * a[k * n + j];
            }
        }
        return true;
    }

    /// <summary>Solves A x = b with the factors from Factor; b is overwritten by x.</summary>
    public static void Solve(ReadOnlySpan<double> lu, ReadOnlySpan<int> pivot, int n, Span<double> b)
    {
        for (int k = 0; k < n; k++)
        {
            int p = pivot[k];
            if (p != k) (b[k], b[p]) = (b[p], b[k]);
            double bk = b[k];
            for (int i = k + 1; i < n; i++) b[i] -= lu[i * n + k] * bk;
        }
        for (int i = n - 1; i >= 0; i--)
        {
            double s = b[i];
            for (int j = i + 1; j < n; j++) s -= lu[i * n + j] * b[j];
            b[i] = s / lu[i * n + i];
        }
    }

    /// <summary>Complex version: the matrix is (ar + i ai), factored in place.</summary>
    public static bool Factor(Span<double> ar, Span<double> ai, Span<int> pivot, int n)
    {
        for (int k = 0; k < n; k++)
        {
            int p = k;
            double max = Math.Abs(ar[k * n + k]) + Math.Abs(ai[k * n + k]);
            for (int i = k + 1; i < n; i++)
            {
                double v = Math.Abs(ar[i * n + k]) + Math.Abs(ai[i * n + k]);
                if (v > max) { max = v; p = i; }
            }
            pivot[k] = p;
            if (max == 0 || !double.IsFinite(max)) return false;
            if (p != k)
            {
                for (int j = 0; j < n; j++)
                {
                    (ar[k * n + j], ar[p * n + j]) = (ar[p * n + j], ar[k * n + j]);
                    (ai[k * n + j], ai[p * n + j]) = (ai[p * n + j], ai[k * n + j]);
                }
            }
            double dr = ar[k * n + k], di = ai[k * n + k];
            double den = dr * dr + di * di;
            double invr = dr / den, invi = -di / den;
            for (int i = k + 1; i < n; i++)
            {
                double xr = ar[i * n + k], xi = ai[i * n + k];
                double lr = xr * invr - xi * invi, li = xr * invi + xi * invr;
                ar[i * n + k] = lr;
                ai[i * n + k] = li;
                if (lr == 0 && li == 0) continue;
                for (int j = k + 1; j < n; j++)
                {
                    double ur = ar[k * n + j], ui = ai[k * n + j];
                    ar[i * n + j] -= lr * ur - li * ui;
                    ai[i * n + j] -= lr * ui + li * ur;
                }
            }
        }
        return true;
    }

    /// <summary>Solves (ar + i ai) x = (br + i bi) with the complex factors; b is overwritten by x.</summary>
    public static void Solve(ReadOnlySpan<double> ar, ReadOnlySpan<double> ai, ReadOnlySpan<int> pivot, int n,
                             Span<double> br, Span<double> bi)
    {
        for (int k = 0; k < n; k++)
        {
            int p = pivot[k];
            if (p != k)
            {
                (br[k], br[p]) = (br[p], br[k]);
                (bi[k], bi[p]) = (bi[p], bi[k]);
            }
            double xr = br[k], xi = bi[k];
            for (int i = k + 1; i < n; i++)
            {
                double lr = ar[i * n + k], li = ai[i * n + k];
                br[i] -= lr * xr - li * xi;
                bi[i] -= lr * xi + li * xr;
            }
        }
        for (int i = n - 1; i >= 0; i--)
        {
            double sr = br[i], si = bi[i];
            for (int j = i + 1; j < n; j++)
            {
                double ur = ar[i * n + j], ui = ai[i * n + j];
                sr -= ur * br[j] - ui * bi[j];
                si -= ur * bi[j] + ui * br[j];
            }
            double dr = ar[i * n + i], di = ai[i * n + i];
            double den = dr * dr + di * di;
            br[i] = (sr * dr + si * di) / den;
            bi[i] = (si * dr - sr * di) / den;
        }
    }
}
