namespace MeasureEval.Engine;

public enum CalendarUnit
{
    Day,
    Week,
    Month,
    Year,
}

/// <summary>A signed amount of calendar time ("6 months", "-1 day").</summary>
public sealed record CalendarAmount(int Amount, CalendarUnit Unit)
{
    public override string ToString() => $"{Amount} {Unit.ToString().ToLowerInvariant()}{(Math.Abs(Amount) == 1 ? "" : "s")}";
}

public enum DateAnchor
{
    PeriodStart,
    PeriodEnd,
    BirthDate,
    /// <summary>The stated date of the record chosen by the enclosing mostRecent.</summary>
    Record,
}

/// <summary>An anchor followed by calendar offsets applied left to right: "periodStart + 6 months - 1 day".</summary>
public sealed record DateExpression(DateAnchor Anchor, IReadOnlyList<CalendarAmount> Offsets)
{
    public string Text { get; init; } = "";

    public override string ToString() => Text;
}

/// <summary>Inclusive bounds; either may be open.</summary>
public sealed record DateWindow(DateExpression? From, DateExpression? To);
