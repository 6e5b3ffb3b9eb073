using System.Globalization;

namespace MeasureEval.Engine;

/// <summary>
/// A FHIR date, dateTime or instant read as stated: the calendar date(s) written in the value's own offset, with no
/// conversion (2026-01-01T00:30:00+14:00 is on 2026-01-01). A partial date stands for its whole year or month.
/// </summary>
public readonly record struct StatedTime(DateOnly First, DateOnly Last, DateTimeOffset? Instant)
{
    public bool HasTime => Instant is not null;

    /// <summary>Day precision, not a year or month standing for many days.</summary>
    public bool IsWholeDay => First == Last;

    /// <summary>The stated date as written ("2024", "2024-05", "2024-05-06"): distinct dates for dose counting.</summary>
    public string DateKey => First == Last
        ? First.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)
        : First.Month == 1 && Last.Month == 12 && First.Day == 1 && Last.Day == 31 ? First.ToString("yyyy", CultureInfo.InvariantCulture) : First.ToString("yyyy-MM", CultureInfo.InvariantCulture);

    public static bool TryParse(string? text, out StatedTime time)
    {
        time = default;
        if (string.IsNullOrWhiteSpace(text) || text.Length < 4)
        {
            return false;
        }

        if (!TryDigits(text, 0, 4, out var year) || year < 1)
        {
            return false;
        }

        if (text.Length == 4)
        {
            time = new StatedTime(new DateOnly(year, 1, 1), new DateOnly(year, 12, 31), null);
            return true;
        }

        if (text[4] != '-' || text.Length < 7 || !TryDigits(text, 5, 2, out var month) || month is < 1 or > 12)
        {
            return false;
        }

        if (text.Length == 7)
        {
            var first = new DateOnly(year, month, 1);
            time = new StatedTime(first, first.AddMonths(1).AddDays(-1), null);
            return true;
        }

        if (text[7] != '-' || text.Length < 10 || !TryDigits(text, 8, 2, out var day) || day < 1 || day > DateTime.DaysInMonth(year, month))
        {
            return false;
        }

        var date = new DateOnly(year, month, day);
        if (text.Length == 10)
        {
            time = new StatedTime(date, date, null);
            return true;
        }

        if (text[10] != 'T' || !DateTimeOffset.TryParse(text, CultureInfo.InvariantCulture, DateTimeStyles.None, out var instant))
        {
            return false;
        }

        time = new StatedTime(date, date, instant.ToUniversalTime());
        return true;
    }

    /// <summary>Ranking in time: by stated (first) date, then date-only before timed, then instant.</summary>
    public static int CompareRank(StatedTime a, StatedTime b)
    {
        var byDate = a.First.CompareTo(b.First);
        if (byDate != 0)
        {
            return byDate;
        }

        if (a.HasTime != b.HasTime)
        {
            return a.HasTime ? 1 : -1;
        }

        return a.HasTime ? a.Instant!.Value.CompareTo(b.Instant!.Value) : 0;
    }

    private static bool TryDigits(string text, int start, int count, out int value)
    {
        value = 0;
        if (text.Length < start + count)
        {
            return false;
        }

        for (var i = start; i < start + count; i++)
        {
            var c = text[i];
            if (c is < '0' or > '9')
            {
                return false;
            }

            value = (value * 10) + (c - '0');
        }

        return true;
    }
}

/// <summary>Calendar arithmetic of the measures: a day missing from the target month rolls to the next 1st (2024-02-29 + 1 year = 2025-03-01).</summary>
public static class Calendar
{
    public static DateOnly Add(DateOnly date, CalendarAmount amount) => amount.Unit switch
    {
        CalendarUnit.Day => date.AddDays(amount.Amount),
        CalendarUnit.Week => date.AddDays(7 * amount.Amount),
        CalendarUnit.Month => AddMonths(date, amount.Amount),
        _ => AddMonths(date, 12 * amount.Amount),
    };

    public static DateOnly AddMonths(DateOnly date, int months)
    {
        var index = (date.Year * 12) + (date.Month - 1) + months;
        var year = index / 12;
        var month = (index % 12) + 1;
        var days = DateTime.DaysInMonth(year, month);
        return date.Day <= days ? new DateOnly(year, month, date.Day) : new DateOnly(year, month, days).AddDays(1);
    }

    /// <summary>True when the patient born on <paramref name="birth"/> has reached the age <paramref name="amount"/> on <paramref name="on"/>.</summary>
    public static bool HasReached(DateOnly birth, CalendarAmount amount, DateOnly on) => Add(birth, amount) <= on;

    /// <summary>Whole years on the date, comparing (month, day): a 29 February birthday is reached on 1 March in common years.</summary>
    public static int AgeInYears(DateOnly birth, DateOnly on)
    {
        var years = on.Year - birth.Year;
        if (on.Month < birth.Month || (on.Month == birth.Month && on.Day < birth.Day))
        {
            years--;
        }

        return years;
    }
}
