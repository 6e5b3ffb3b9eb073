using System.ComponentModel.DataAnnotations;

namespace MeasureEval.Api.Limits;

/// <summary>Request rate and evaluation time limits (configuration section <c>Limits</c>).</summary>
public sealed class LimitsOptions
{
    public const string Section = "Limits";

    /// <summary>
    /// Requests one client (token <c>sub</c>, else remote address) may make per fixed one-minute window; more → 429.
    /// 6,000 (100 a second on average) is far above what a person or a batch client needs and keeps one runaway
    /// script from taking the service's two cores from everyone else.
    /// </summary>
    [Range(1, 100_000_000)]
    public int RequestsPerMinute { get; set; } = 6000;

    /// <summary>
    /// Longest a synchronous evaluation ($evaluate-measure, $care-gaps, the care-gap export, report pages) may run before
    /// it is cancelled and answered 503; long work belongs in an asynchronous request.
    /// </summary>
    [Range(typeof(TimeSpan), "00:00:00.001", "1.00:00:00")]
    public TimeSpan EvaluationTimeBudget { get; set; } = TimeSpan.FromSeconds(120);
}
