namespace MeasureEval.Engine.Tests.Evaluation;

public sealed class CalendarTests
{
    private static DateOnly D(string text) => DateOnly.Parse(text, System.Globalization.CultureInfo.InvariantCulture);

    [Theory]
    [InlineData("2024-02-29", 1, CalendarUnit.Year, "2025-03-01")] // a day missing from the target month rolls to the next 1st (our rule)
    [InlineData("2024-02-29", 4, CalendarUnit.Year, "2028-02-29")]
    [InlineData("2026-01-31", 1, CalendarUnit.Month, "2026-03-01")]
    [InlineData("2026-01-01", 6, CalendarUnit.Month, "2026-07-01")]
    [InlineData("2026-01-01", -5, CalendarUnit.Month, "2025-08-01")] // influenza window from 1 August (spec)
    [InlineData("2026-01-01", -9, CalendarUnit.Year, "2017-01-01")]
    [InlineData("2024-06-15", 42, CalendarUnit.Day, "2024-07-27")]
    [InlineData("2025-01-01", 42, CalendarUnit.Week, "2025-10-22")] // 294 days
    public void Add_CalendarAmount_FollowsTheRollRule(string from, int amount, CalendarUnit unit, string expected) =>
        Assert.Equal(D(expected), Calendar.Add(D(from), new CalendarAmount(amount, unit)));

    [Theory]
    [InlineData("2026-02-28", 17)] // our rule: a 29 February birthday is reached on 1 March in common years
    [InlineData("2026-03-01", 18)]
    [InlineData("2028-02-28", 19)]
    [InlineData("2028-02-29", 20)]
    public void AgeInYears_BornOn29February_OurRule(string on, int age)
    {
        Assert.Equal(age, Calendar.AgeInYears(D("2008-02-29"), D(on)));
        Assert.Equal(age >= 18, Calendar.HasReached(D("2008-02-29"), new CalendarAmount(18, CalendarUnit.Year), D(on)));
    }

    [Theory]
    [InlineData("2025-08-31", "2026-02-28", false)] // + 6 months = 2026-02-31 → rolls to 2026-03-01 (our rule)
    [InlineData("2025-08-31", "2026-03-01", true)]
    [InlineData("2025-07-01", "2026-01-01", true)]
    public void HasReached_SixMonths_RollsLikeTheSpec(string birth, string on, bool reached) =>
        Assert.Equal(reached, Calendar.HasReached(D(birth), new CalendarAmount(6, CalendarUnit.Month), D(on)));
}
