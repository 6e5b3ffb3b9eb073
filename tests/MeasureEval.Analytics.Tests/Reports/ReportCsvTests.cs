using MeasureEval.Analytics.Reports;
using MeasureEval.Analytics.Tests.Support;

namespace MeasureEval.Analytics.Tests.Reports;

public class ReportCsvTests
{
    [Fact]
    public void Write_OneRowPerRate()
    {
        var lines = ReportCsv.Write(SampleReports.Report()).Split("\r\n", StringSplitOptions.RemoveEmptyEntries);

        // Header + overall + 7 strata + 4 panels + network + 4 quarters.
        Assert.Equal(1 + 1 + 7 + 4 + 1 + 4, lines.Length);
        Assert.Equal(string.Join(',', ReportCsv.Header), lines[0]);
        Assert.All(lines, l => Assert.Equal(ReportCsv.Header.Length, l.Split(',').Length));
    }

    [Fact]
    public void Write_RatesAndIntervalsAsFractions()
    {
        var overall = ReportCsv.Write(SampleReports.Report()).Split("\r\n")[1].Split(',');
        Assert.Equal("overall", overall[1]);
        Assert.Equal(170.0 / 280, double.Parse(overall[13], System.Globalization.CultureInfo.InvariantCulture), 12);
        Assert.Equal("280", overall[12]);
    }

    [Fact]
    public void Write_GuardsFormulaTextAndQuotes()
    {
        var csv = ReportCsv.Write(SampleReports.Report("=HYPERLINK(\"x\"),1"));
        Assert.Contains("\"'=HYPERLINK(\"\"x\"\"),1\"", csv, StringComparison.Ordinal);
    }
}
