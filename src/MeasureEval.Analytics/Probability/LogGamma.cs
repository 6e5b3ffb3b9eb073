namespace MeasureEval.Analytics.Probability;

/// <summary>ln Γ(x) by the Lanczos approximation (g = 7, nine coefficients), relative error about 1e-15 for x &gt; 0.</summary>
internal static class LogGamma
{
    private const double G = 7;

    // Lanczos coefficients for g = 7, n = 9 (the widely tabulated set; Numerical Recipes 3rd ed. §6.1 uses the same scheme).
    private static readonly double[] Coefficients =
    [
        0.99999999999980993,
        676.5203681218851,
        -1259.1392167224028,
        771.32342877765313,
        -176.61502916214059,
        12.507343278686905,
        -0.13857109526572012,
        9.9843695780195716e-6,
        1.5056327351493116e-7,
    ];

    // Exact for small arguments, which carry most of the mass in small panels.
    private static readonly double[] SmallFactorials = BuildSmallFactorials();

    public static double Of(double x)
    {
        if (x < 0.5)
        {
            // Reflection formula: Γ(x)Γ(1−x) = π / sin(πx).
            return Math.Log(Math.PI / Math.Abs(Math.Sin(Math.PI * x))) - Of(1 - x);
        }

        x -= 1;
        var a = Coefficients[0];
        var t = x + G + 0.5;
        for (var i = 1; i < Coefficients.Length; i++)
        {
            a += Coefficients[i] / (x + i);
        }

        return (0.5 * Math.Log(2 * Math.PI)) + ((x + 0.5) * Math.Log(t)) - t + Math.Log(a);
    }

    /// <summary>ln k!.</summary>
    public static double OfFactorial(int k) => k < SmallFactorials.Length ? SmallFactorials[k] : Of(k + 1.0);

    private static double[] BuildSmallFactorials()
    {
        var table = new double[171];
        var product = 1.0;
        for (var k = 1; k < table.Length; k++)
        {
            product *= k;
            table[k] = Math.Log(product);
        }

        return table;
    }
}
