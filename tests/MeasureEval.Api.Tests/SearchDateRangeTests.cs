using MeasureEval.Api.Search;

namespace MeasureEval.Api.Tests;

/// <summary>FHIR R4 search.html "date": the value's precision defines the range it stands for.</summary>
public sealed class SearchDateRangeTests
{
    [Theory]
    [InlineData("2024", "2024-01-01T00:00:00+00:00", "2025-01-01T00:00:00+00:00")]
    [InlineData("2024-02", "2024-02-01T00:00:00+00:00", "2024-03-01T00:00:00+00:00")]
    [InlineData("2024-02-29", "2024-02-29T00:00:00+00:00", "2024-03-01T00:00:00+00:00")]
    [InlineData("2024-03-05T10:15", "2024-03-05T10:15:00+00:00", "2024-03-05T10:16:00+00:00")]
    [InlineData("2024-03-05T10:15:30Z", "2024-03-05T10:15:30+00:00", "2024-03-05T10:15:31+00:00")]
    [InlineData("2024-03-05T10:15:30.5-06:00", "2024-03-05T16:15:30.5+00:00", "2024-03-05T16:15:30.6+00:00")]
    [InlineData("2024-03-05T10:15:30 02:00", "2024-03-05T08:15:30+00:00", "2024-03-05T08:15:31+00:00")]
    public void TryParse_Precision_SetsRange(string text, string start, string end)
    {
        Assert.True(SearchDateRange.TryParse(text, out var from, out var until));
        Assert.Equal(DateTimeOffset.Parse(start, System.Globalization.CultureInfo.InvariantCulture), from);
        Assert.Equal(DateTimeOffset.Parse(end, System.Globalization.CultureInfo.InvariantCulture), until);
    }

    [Theory]
    [InlineData("2023-02-29")]
    [InlineData("2024-13")]
    [InlineData("24-01-01")]
    [InlineData("2024-01-01T25:00")]
    [InlineData("today")]
    public void TryParse_NotADate_False(string text)
    {
        Assert.False(SearchDateRange.TryParse(text, out _, out _));
    }
}
