using MeasureEval.Analytics.Trends;
using MeasureEval.Api.Analytics;
using MeasureEval.Engine;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.Primitives;
using Microsoft.Extensions.Time.Testing;

namespace MeasureEval.Analytics.Tests.Api;

public class ReportQueryTests
{
    private static readonly FakeTimeProvider July2027 = new(new DateTimeOffset(2027, 7, 14, 9, 0, 0, TimeSpan.Zero));

    [Fact]
    public void TryParse_DefaultsToTheCurrentCalendarYear()
    {
        Assert.True(ReportQuery.TryParse(Query(), July2027, out var query, out var issues));
        Assert.Empty(issues);
        Assert.Equal(MeasurementPeriod.CalendarYear(2027), query.Period);
        Assert.Null(query.Target);
        Assert.Equal(TrendInterval.Quarter, query.Interval);
        Assert.Equal(ReportOutput.Html, query.Format);
    }

    [Fact]
    public void TryParse_AllParameters()
    {
        var ok = ReportQuery.TryParse(
            Query(("periodStart", "2026-01-01"), ("periodEnd", "2026-12-31"), ("target", "0.75"), ("interval", "rolling-12-months"), ("format", "csv")),
            July2027, out var query, out _);
        Assert.True(ok);
        Assert.Equal(0.75m, query.Target);
        Assert.Equal(TrendInterval.Rolling12Months, query.Interval);
        Assert.Equal(ReportOutput.Csv, query.Format);
        Assert.Equal("?periodStart=2026-01-01&periodEnd=2026-12-31&target=0.75&interval=rolling-12-months&format=json", query.ToQueryString("json"));
    }

    [Fact]
    public void TryParse_RepeatedParameter_Issue()
    {
        Assert.False(ReportQuery.TryParse(Query(("target", "0.5"), ("target", "0.6")), July2027, out _, out var issues));
        Assert.Equal("target", Assert.Single(issues).Expression);
    }

    [Fact]
    public void TryParse_PartialDate_Issue()
    {
        // A report period is whole days: "2026" or "2026-01" is refused rather than guessed.
        Assert.False(ReportQuery.TryParse(Query(("periodStart", "2026")), July2027, out _, out var issues));
        Assert.Equal("periodStart", Assert.Single(issues).Expression);
    }

    private static QueryCollection Query(params (string Name, string Value)[] parameters) =>
        new(parameters.GroupBy(p => p.Name).ToDictionary(g => g.Key, g => new StringValues([.. g.Select(p => p.Value)])));
}
