namespace MeasureEval.Engine.Gaps;

/// <summary>A patient's standing on one measure, as the DEQM gaps-in-care status codes name it.</summary>
public enum GapStatus
{
    /// <summary>In the rate and the measure's wanted result is not (yet) reached.</summary>
    Open,
    /// <summary>In the rate and the wanted result is reached, and it keeps counting through the horizon.</summary>
    Closed,
    /// <summary>Closed today, but the event that closes it stops counting before the horizon.</summary>
    Prospective,
    /// <summary>Not in the denominator, or excluded or excepted.</summary>
    NotApplicable,
}

public static class GapStatuses
{
    /// <summary>HL7 Da Vinci DEQM code system of gap statuses.</summary>
    public const string System = "http://hl7.org/fhir/us/davinci-deqm/CodeSystem/gaps-status";

    public static IReadOnlyList<GapStatus> All { get; } = [GapStatus.Open, GapStatus.Closed, GapStatus.Prospective, GapStatus.NotApplicable];

    public static string Code(this GapStatus status) => status switch
    {
        GapStatus.Open => "open-gap",
        GapStatus.Closed => "closed-gap",
        GapStatus.Prospective => "prospective-gap",
        GapStatus.NotApplicable => "not-applicable",
        _ => throw new ArgumentOutOfRangeException(nameof(status)),
    };

    public static string Display(this GapStatus status) => status switch
    {
        GapStatus.Open => "Open Gap",
        GapStatus.Closed => "Closed Gap",
        GapStatus.Prospective => "Prospective Gap",
        _ => "Not Applicable",
    };

    public static bool TryParse(string? code, out GapStatus status)
    {
        foreach (var s in All)
        {
            if (string.Equals(s.Code(), code, StringComparison.Ordinal))
            {
                status = s;
                return true;
            }
        }

        status = default;
        return false;
    }
}
