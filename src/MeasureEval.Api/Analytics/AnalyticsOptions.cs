using System.ComponentModel.DataAnnotations;

namespace MeasureEval.Api.Analytics;

/// <summary>Where the measure definitions are read from when no other part of the host has registered them.</summary>
public sealed class AnalyticsOptions
{
    public const string Section = "Measures";

    /// <summary>The measures directory; relative paths are taken from the content root. Default: the repository's measures/.</summary>
    [Required(AllowEmptyStrings = false)]
    public string Directory { get; set; } = "measures";
}
