using MeasureEval.Cli.Batch;

namespace MeasureEval.Synthetic.Tests.Cli;

public class FhirInputReaderTests
{
    private static string InputDirectory => Path.Combine(AppContext.BaseDirectory, "Cli", "Inputs");

    [Fact]
    public void Read_NdjsonWithBadLines_ReportsEveryIssueWithItsLine()
    {
        var issues = new List<InputIssue>();
        var resources = FhirInputReader.Read(InputDirectory, issues).SelectMany(b => b).ToList();

        // Line 1 is valid; 2 has an impossible date, 3 is cut-off JSON, 4 an element R4 Observation does not have.
        Assert.Equal(["p1"], resources.Select(r => r.Resource.Id));
        Assert.Equal([2, 3, 4], issues.Select(i => i.Line).Distinct().Order());
        Assert.All(issues, i => Assert.Equal("issues.ndjson", i.File));
    }

    [Fact]
    public void Read_NdjsonWithBadLines_GivesFirelyCodesAndFhirPaths()
    {
        var issues = new List<InputIssue>();
        _ = FhirInputReader.Read(InputDirectory, issues).Sum(b => b.Count);

        // Firely SDK 6 strict parser codes (checked on this machine, shared notes): PVAL124 bad date, PVAL128 unknown element.
        Assert.Contains(issues, i => i.Line == 2 && i.Code == "PVAL124" && i.Expression == "Patient.birthDate");
        Assert.Contains(issues, i => i.Line == 3 && i.Code == "malformed-json");
        Assert.Contains(issues, i => i.Line == 4 && i.Code == "PVAL128");
    }
}
