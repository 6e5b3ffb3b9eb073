using System.Globalization;
using System.Text.RegularExpressions;

namespace MeasureEval.Api.Search;

/// <summary>A FHIR search date as the half-open instant range its precision covers (2024-05 → [May 1, June 1)).</summary>
public static partial class SearchDateRange
{
    public static bool TryParse(string text, out DateTimeOffset start, out DateTimeOffset end)
    {
        start = end = default;
        // A '+' zone arrives as a space when the client did not percent-encode it.
        var match = DatePattern().Match(text.Replace(' ', '+'));
        if (!match.Success)
        {
            return false;
        }

        var year = int.Parse(match.Groups["y"].Value, CultureInfo.InvariantCulture);
        var month = match.Groups["m"].Success ? int.Parse(match.Groups["m"].Value, CultureInfo.InvariantCulture) : 1;
        var day = match.Groups["d"].Success ? int.Parse(match.Groups["d"].Value, CultureInfo.InvariantCulture) : 1;
        var hour = match.Groups["h"].Success ? int.Parse(match.Groups["h"].Value, CultureInfo.InvariantCulture) : 0;
        var minute = match.Groups["min"].Success ? int.Parse(match.Groups["min"].Value, CultureInfo.InvariantCulture) : 0;
        var second = match.Groups["s"].Success ? int.Parse(match.Groups["s"].Value, CultureInfo.InvariantCulture) : 0;
        var fraction = match.Groups["f"].Success ? match.Groups["f"].Value : "";
        var zone = TimeSpan.Zero;
        if (match.Groups["z"].Success && match.Groups["z"].Value != "Z")
        {
            var z = match.Groups["z"].Value;
            zone = new TimeSpan(int.Parse(z[1..3], CultureInfo.InvariantCulture), int.Parse(z[4..6], CultureInfo.InvariantCulture), 0);
            if (z[0] == '-')
            {
                zone = -zone;
            }
        }

        if (month is < 1 or > 12 || day < 1 || day > DateTime.DaysInMonth(year, month) || hour > 23 || minute > 59 || second > 59 || zone.Duration() > TimeSpan.FromHours(14))
        {
            return false;
        }

        var ticks = fraction.Length == 0 ? 0L : long.Parse(fraction.PadRight(7, '0')[..7], CultureInfo.InvariantCulture);
        start = new DateTimeOffset(year, month, day, hour, minute, second, zone).AddTicks(ticks);
        end = true switch
        {
            _ when fraction.Length > 0 => start.AddTicks((long)Math.Pow(10, 7 - Math.Min(fraction.Length, 7))),
            _ when match.Groups["s"].Success => start.AddSeconds(1),
            _ when match.Groups["min"].Success => start.AddMinutes(1),
            _ when match.Groups["d"].Success => start.AddDays(1),
            _ when match.Groups["m"].Success => start.AddMonths(1),
            _ => start.AddYears(1),
        };
        return true;
    }

    [GeneratedRegex(@"^(?<y>\d{4})(-(?<m>\d{2})(-(?<d>\d{2})(T(?<h>\d{2}):(?<min>\d{2})(:(?<s>\d{2})(\.(?<f>\d{1,9}))?)?(?<z>Z|[+-]\d{2}:\d{2})?)?)?)?$")]
    private static partial Regex DatePattern();
}
