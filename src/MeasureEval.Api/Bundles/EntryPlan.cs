using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Search;
using MeasureEval.Core.Storage;

namespace MeasureEval.Api.Bundles;

/// <summary>Where an entry's request.url points: a type, an instance, a version, or a search.</summary>
public sealed record EntryTarget(string Type, string? Id, int? Version, string? Query);

/// <summary>One Bundle entry as understood before anything is written, and what became of it.</summary>
public sealed class EntryPlan(int index, Bundle.EntryComponent entry)
{
    public int Index { get; } = index;

    public Bundle.EntryComponent Entry { get; } = entry;

    public string Path => $"Bundle.entry[{Index}]";

    public Bundle.HTTPVerb Method { get; set; }

    public EntryTarget? Target { get; set; }

    public Resource? Resource => Entry.Resource;

    public int? IfMatch { get; set; }

    public ParsedSearch? Condition { get; set; }

    /// <summary>ifNoneExist parameters naming other entries by urn:uuid: parsed once those entries have ids.</summary>
    public Dictionary<string, Microsoft.Extensions.Primitives.StringValues>? DeferredCondition { get; set; }

    public ParsedSearch? Search { get; set; }

    public List<LocatedReference> References { get; } = [];

    public List<FhirIssue> Issues { get; } = [];

    /// <summary>The id a POST will be stored under (new, or the conditional create's match).</summary>
    public string? AssignedId { get; set; }

    /// <summary>Set when a conditional create found its match: nothing is written.</summary>
    public StoredResource? Matched { get; set; }

    public Bundle.EntryComponent? Response { get; set; }

    /// <summary>DELETE, then POST, then PUT, then GET (FHIR R4 http.html, transaction processing rules).</summary>
    public int Phase => Method switch
    {
        Bundle.HTTPVerb.DELETE => 0,
        Bundle.HTTPVerb.POST => 1,
        Bundle.HTTPVerb.PUT or Bundle.HTTPVerb.PATCH => 2,
        _ => 3,
    };
}
