namespace MeasureEval.Engine.Tests.Evaluation;

public sealed class StatedTimeTests
{
    [Fact]
    public void TryParse_OffsetPlus14_CountsOnTheStatedDate()
    {
        // FHIR R4 dateTime: the date as written in its own offset (spec rule: no conversion); UTC would say 2025-12-31.
        Assert.True(StatedTime.TryParse("2026-01-01T00:30:00+14:00", out var time));
        Assert.Equal(new DateOnly(2026, 1, 1), time.First);
        Assert.Equal(new DateTimeOffset(2025, 12, 31, 10, 30, 0, TimeSpan.Zero), time.Instant);
    }

    [Theory]
    [InlineData("2024", "2024-01-01", "2024-12-31")]
    [InlineData("2024-02", "2024-02-01", "2024-02-29")] // 2024 is a leap year (Gregorian calendar)
    [InlineData("2025-02", "2025-02-01", "2025-02-28")]
    [InlineData("2024-05-06", "2024-05-06", "2024-05-06")]
    public void TryParse_PartialDate_StandsForTheWholeInterval(string text, string first, string last)
    {
        Assert.True(StatedTime.TryParse(text, out var time));
        Assert.Equal(DateOnly.Parse(first, System.Globalization.CultureInfo.InvariantCulture), time.First);
        Assert.Equal(DateOnly.Parse(last, System.Globalization.CultureInfo.InvariantCulture), time.Last);
    }

    [Theory]
    [InlineData("2024-13")]
    [InlineData("2025-02-29")]
    [InlineData("24-01-01")]
    [InlineData("2024-01-01X10:00")]
    public void TryParse_NotAFhirDate_Fails(string text) => Assert.False(StatedTime.TryParse(text, out _));

    [Fact]
    public void CompareRank_SameDate_DateOnlyBeforeTimed()
    {
        // Spec: "a date-only value ranks before timed values of the same date".
        StatedTime.TryParse("2026-03-01", out var dateOnly);
        StatedTime.TryParse("2026-03-01T00:00:00Z", out var timed);
        Assert.True(StatedTime.CompareRank(dateOnly, timed) < 0);
    }

    [Fact]
    public void CompareRank_BothTimed_ByInstant()
    {
        // Same stated date, different offsets: 08:00+02:00 is 06:00Z, earlier than 07:00Z.
        StatedTime.TryParse("2026-03-01T08:00:00+02:00", out var a);
        StatedTime.TryParse("2026-03-01T07:00:00Z", out var b);
        Assert.True(StatedTime.CompareRank(a, b) < 0);
    }
}
