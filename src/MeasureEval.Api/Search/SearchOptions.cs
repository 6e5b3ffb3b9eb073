using System.ComponentModel.DataAnnotations;

namespace MeasureEval.Api.Search;

/// <summary>Paging limits (configuration section <c>Search</c>).</summary>
public sealed class SearchOptions
{
    public const string Section = "Search";

    [Range(1, 10_000)]
    public int DefaultPageSize { get; set; } = 50;

    /// <summary>A larger <c>_count</c> is lowered to this (FHIR lets a server return fewer than asked).</summary>
    [Range(1, 10_000)]
    public int MaxPageSize { get; set; } = 1000;
}
