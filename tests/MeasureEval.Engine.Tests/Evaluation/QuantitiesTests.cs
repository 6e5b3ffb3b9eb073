namespace MeasureEval.Engine.Tests.Evaluation;

public sealed class QuantitiesTests
{
    // NGSP master equation, NGSP % = 0.09148 × IFCC + 2.152 (ngsp.org; Hoelzel et al., Clin Chem 2004), as common.library.json declares it.
    private static readonly UnitConversion[] Ngsp = [new("mmol/mol", "%", 0.09148m, 2.152m, "NGSP master equation")];

    [Theory]
    [InlineData(64, 8.00672, false)] // 8.007 %: not < 8
    [InlineData(63, 7.91524, true)] // 7.915 %: < 8
    public void TryConvert_IfccBelow8_UsesTheMasterEquationUnrounded(int ifcc, double ngsp, bool below8)
    {
        Assert.True(Quantities.TryConvert(ifcc, "mmol/mol", "%", Ngsp, out var converted));
        Assert.Equal((decimal)ngsp, converted);
        Assert.Equal(below8, Quantities.Passes(converted, null, Comparison.LessThan, 8m));
    }

    [Fact]
    public void TryConvert_Ifcc75_IsAbove9()
    {
        Assert.True(Quantities.TryConvert(75, "mmol/mol", "%", Ngsp, out var converted));
        Assert.Equal(9.013m, converted); // 0.09148 × 75 + 2.152 = 9.013
        Assert.True(Quantities.Passes(converted, null, Comparison.GreaterThan, 9m));
    }

    [Fact]
    public void TryConvert_IfccWithoutDeclaredConversion_IsNotLeftToUcumForTheNgspPair()
    {
        // UCUM alone would turn 64 mmol/mol into 6.4 % (both dimensionless ratios): the declared conversion must win.
        Assert.True(Quantities.TryConvert(64, "mmol/mol", "%", Ngsp, out var converted));
        Assert.NotEqual(6.4m, decimal.Round(converted, 1));
    }

    [Fact]
    public void TryConvert_KilopascalToMillimetresOfMercury_ByUcum()
    {
        // UCUM: mm[Hg] = 133.322 Pa, so 18 kPa = 135.01 mm[Hg] (UCUM table of units).
        Assert.True(Quantities.TryConvert(18, "kPa", "mm[Hg]", [], out var converted));
        Assert.Equal(135.01m, decimal.Round(converted, 2));
    }

    [Fact]
    public void TryConvert_MassConcentrationToPercent_Fails() => Assert.False(Quantities.TryConvert(7, "mg/dL", "%", Ngsp, out _));

    [Theory]
    [InlineData("{score}", "")]
    [InlineData("1", "")]
    [InlineData("", "{score}")]
    public void TryConvert_ScoresAreUnitless(string from, string to)
    {
        Assert.True(Quantities.TryConvert(12, from, to, [], out var converted));
        Assert.Equal(12m, converted);
    }

    [Theory]
    // Spec check values: "<6.0 %" is < 8; ">14 %" is > 9; "<10 %" is not > 9.
    [InlineData(6.0, "<", Comparison.LessThan, 8.0, true)]
    [InlineData(14.0, ">", Comparison.GreaterThan, 9.0, true)]
    [InlineData(10.0, "<", Comparison.GreaterThan, 9.0, false)]
    // Every value the comparator allows must pass: "<=8" is not < 8, "<8" is < 8, ">=9" is not > 9, ">9" is > 9.
    [InlineData(8.0, "<=", Comparison.LessThan, 8.0, false)]
    [InlineData(8.0, "<", Comparison.LessThan, 8.0, true)]
    [InlineData(9.0, ">=", Comparison.GreaterThan, 9.0, false)]
    [InlineData(9.0, ">", Comparison.GreaterThan, 9.0, true)]
    // 9.0 itself is not > 9.0 (spec).
    [InlineData(9.0, null, Comparison.GreaterThan, 9.0, false)]
    public void Passes_Comparator_OnlyWhenEveryAllowedValuePasses(double value, string? comparator, Comparison comparison, double threshold, bool passes) =>
        Assert.Equal(passes, Quantities.Passes((decimal)value, comparator, comparison, (decimal)threshold));

    [Fact]
    public void Passes_SufficientToAchieve_IsNotJudged() => Assert.Null(Quantities.Passes(5m, "ad", Comparison.LessThan, 8m));
}
