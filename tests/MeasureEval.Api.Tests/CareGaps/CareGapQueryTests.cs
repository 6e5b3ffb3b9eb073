using Hl7.Fhir.Model;
using MeasureEval.Api.CareGaps;
using MeasureEval.Api.Errors;
using MeasureEval.Engine.Gaps;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.Primitives;

namespace MeasureEval.Api.Tests.CareGaps;

public sealed class CareGapQueryTests
{
    private static readonly TimeProvider Time = new FixedTime(new DateTimeOffset(2026, 6, 1, 12, 0, 0, TimeSpan.Zero));

    [Fact]
    public void TryRead_DefaultsToCurrentYearAndOpenGaps()
    {
        Assert.True(CareGapQuery.TryRead(Query([]), Time, export: false, [], out var query));

        Assert.Equal(new DateOnly(2026, 1, 1), query!.Period.Start);
        Assert.Equal(new DateOnly(2026, 12, 31), query.Period.End);
        Assert.Equal([GapStatus.Open], query.Statuses);
        Assert.Empty(query.MeasureIds);
        Assert.Null(query.Horizon);
    }

    [Fact]
    public void TryRead_RepeatedAndCommaSeparatedValues()
    {
        var ok = CareGapQuery.TryRead(
            Query([("status", "open-gap,prospective-gap"), ("status", "closed-gap"), ("measureId", "Measure/colorectal-cancer-screening"), ("measureId", "influenza-vaccination"), ("horizon", "2027-06")]),
            Time, export: false, [], out var query);

        Assert.True(ok);
        Assert.Equal(3, query!.Statuses.Count);
        Assert.Equal(["colorectal-cancer-screening", "influenza-vaccination"], query.MeasureIds);
        Assert.Equal(new DateOnly(2027, 6, 30), query.Horizon); // a partial horizon stands for its last day
    }

    [Fact]
    public void TryRead_ExportFormats()
    {
        Assert.True(CareGapQuery.TryRead(Query([("_format", "ndjson")]), Time, export: true, [], out var query));
        Assert.Equal(ExportFormat.Ndjson, query!.Format);
        var issues = new List<FhirIssue>();
        Assert.False(CareGapQuery.TryRead(Query([("_format", "xml")]), Time, export: true, issues, out _));
        Assert.Equal("_format", Assert.Single(issues).Expression);
    }

    [Fact]
    public void TryRead_ParametersBodyLocatesBadValues()
    {
        var body = new Parameters();
        body.Add("periodStart", new Date("2026-01-01"));
        body.Add("practitioner", new ResourceReference("Organization/cedar-valley"));
        body.Add("status", new Code("closed"));
        var issues = new List<FhirIssue>();

        Assert.False(CareGapQuery.TryRead(body, Time, issues, out _));

        Assert.Equal(["Parameters.parameter[1]", "Parameters.parameter[2]"], issues.Select(i => i.Expression));
        Assert.All(issues, i => Assert.Equal(CareGapErrors.InvalidParameter, i.Code));
    }

    [Fact]
    public void TryRead_PeriodEndBeforeStart()
    {
        var issues = new List<FhirIssue>();

        Assert.False(CareGapQuery.TryRead(Query([("periodStart", "2026-12-31"), ("periodEnd", "2026-01-01")]), Time, export: false, issues, out _));

        Assert.Equal("periodEnd", Assert.Single(issues).Expression);
    }

    private static QueryCollection Query(IEnumerable<(string Key, string Value)> values) =>
        new(values.GroupBy(v => v.Key).ToDictionary(g => g.Key, g => new StringValues([.. g.Select(v => v.Value)])));

    private sealed class FixedTime(DateTimeOffset now) : TimeProvider
    {
        public override DateTimeOffset GetUtcNow() => now;
    }
}
