using System.CommandLine;
using System.Globalization;

namespace MeasureEval.Cli;

/// <summary>Option helpers shared by the commands.</summary>
internal static class CliOptions
{
    /// <summary>A yyyy-MM-dd date option; a malformed value is a parse error naming the option.</summary>
    public static Option<DateOnly> Date(string name, string description, DateOnly? defaultValue = null)
    {
        var option = new Option<DateOnly>(name)
        {
            Description = description,
            Required = defaultValue is null,
            CustomParser = result =>
            {
                var text = result.Tokens.Count == 1 ? result.Tokens[0].Value : string.Empty;
                if (DateOnly.TryParseExact(text, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var date))
                {
                    return date;
                }

                result.AddError($"{name} must be a date as yyyy-MM-dd, got '{text}'");
                return default;
            },
        };
        if (defaultValue is { } value)
        {
            option.DefaultValueFactory = _ => value;
        }

        return option;
    }
}
