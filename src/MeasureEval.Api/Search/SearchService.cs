using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.Extensions.Options;
using Microsoft.Extensions.Primitives;

namespace MeasureEval.Api.Search;

/// <summary>Parses a search, runs it against a store or a write session, and builds the searchset Bundle with paging links.</summary>
public sealed class SearchService(IOptions<SearchOptions> options)
{
    public bool TryParseSearch(string resourceType, IEnumerable<KeyValuePair<string, StringValues>> parameters, DataScope scope, bool strict, out ParsedSearch? parsed, out IReadOnlyList<FhirIssue> issues) =>
        SearchRequestParser.TryParse(resourceType, parameters, scope, options.Value, strict, out parsed, out issues);

    public static async Task<SearchResult> RunAsync(ParsedSearch parsed, Func<SearchQuery, CancellationToken, Task<SearchResult>> run, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(parsed);
        ArgumentNullException.ThrowIfNull(run);
        return parsed.MatchesNothing ? new SearchResult([], 0) : await run(parsed.Query, cancellationToken);
    }

    public static Bundle ToBundle(ParsedSearch parsed, SearchResult result, string baseUrl)
    {
        ArgumentNullException.ThrowIfNull(parsed);
        ArgumentNullException.ThrowIfNull(result);
        var query = parsed.Query;
        var bundle = new Bundle { Id = Guid.NewGuid().ToString(), Type = Bundle.BundleType.Searchset, Total = result.Total };
        bundle.Link.Add(Link("self", parsed, baseUrl, query.Offset));
        bundle.Link.Add(Link("first", parsed, baseUrl, 0));
        if (query.Offset > 0 && query.Count > 0)
        {
            bundle.Link.Add(Link("previous", parsed, baseUrl, Math.Max(0, query.Offset - query.Count)));
        }

        if (query.Count > 0 && query.Offset + query.Count < result.Total)
        {
            bundle.Link.Add(Link("next", parsed, baseUrl, query.Offset + query.Count));
        }

        foreach (var match in result.Matches)
        {
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = $"{baseUrl}/{match.ResourceType}/{match.Id}",
                Resource = match.ToPoco(),
                Search = new Bundle.SearchComponent { Mode = Bundle.SearchEntryMode.Match },
            });
        }

        if (parsed.Warnings.Count > 0)
        {
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = "urn:uuid:" + Guid.NewGuid(),
                Resource = OperationOutcomes.From(parsed.Warnings),
                Search = new Bundle.SearchComponent { Mode = Bundle.SearchEntryMode.Outcome },
            });
        }

        return bundle;
    }

    private static Bundle.LinkComponent Link(string relation, ParsedSearch parsed, string baseUrl, int offset)
    {
        var parts = parsed.Recognized
            .Select(p => $"{Uri.EscapeDataString(p.Key)}={Uri.EscapeDataString(p.Value)}")
            .Append($"_count={parsed.Query.Count.ToString(CultureInfo.InvariantCulture)}")
            .Append($"_offset={offset.ToString(CultureInfo.InvariantCulture)}");
        return new Bundle.LinkComponent { Relation = relation, Url = $"{baseUrl}/{parsed.Query.ResourceType}?{string.Join('&', parts)}" };
    }
}
