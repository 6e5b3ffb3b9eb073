using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Search;
using MeasureEval.Api.Security;
using MeasureEval.Core.Audit;
using MeasureEval.Core.Index;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Audit;

/// <summary>
/// The audit trail as FHIR AuditEvents, for administrators only. Literal routes, so they take precedence over the
/// generic <c>/{type}</c> and <c>/{type}/{id}</c> (which refuse AuditEvent, see <see cref="AuditEndpointFilter"/>).
/// </summary>
public static class AuditEventEndpoints
{
    public const string SearchName = "audit-search";
    public const string ReadName = "audit-read";

    public static IEndpointRouteBuilder MapAuditEventEndpoints(this IEndpointRouteBuilder app)
    {
        var group = app.MapGroup("").WithTags("Audit");
        group.MapGet("/AuditEvent", SearchAsync).WithName(SearchName).RequireAuthorization(AccessPolicies.Manage)
            .WithSummary("Search the audit trail, newest first: date (ge/gt/le/lt/eq), agent (token sub), patient (Patient/x), _count, _offset")
            .WithFhir([], [200], 400, 406);
        group.MapGet("/AuditEvent/{id}", ReadAsync).WithName(ReadName).RequireAuthorization(AccessPolicies.Manage)
            .WithSummary("One audit event")
            .WithFhir([], [200], 404, 406);
        return app;
    }

    public static async Task<FhirResult> ReadAsync(string id, IAuditStore store, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        var record = await store.ReadAuditAsync(id, cancellationToken);
        return record is null
            ? FhirResult.Outcome(new FhirIssue(ErrorCatalogue.NotFound, $"AuditEvent/{id} is not known."))
            : FhirResult.Of(StatusCodes.Status200OK, AuditEventMapper.ToAuditEvent(record));
    }

    public static async Task<FhirResult> SearchAsync(HttpRequest request, IAuditStore store, IOptions<SearchOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(options);
        if (!TryParse(request.Query, options.Value, out var query, out var recognized, out var issues))
        {
            return FhirResult.Outcome(issues);
        }

        var result = await store.SearchAuditAsync(query, cancellationToken);
        var baseUrl = FhirBaseUrl.Of(request);
        var bundle = new Bundle { Id = Guid.NewGuid().ToString(), Type = Bundle.BundleType.Searchset, Total = result.Total };
        bundle.Link.Add(Link("self", recognized, query, baseUrl, query.Offset));
        bundle.Link.Add(Link("first", recognized, query, baseUrl, 0));
        if (query.Offset > 0 && query.Count > 0)
        {
            bundle.Link.Add(Link("previous", recognized, query, baseUrl, Math.Max(0, query.Offset - query.Count)));
        }

        if (query.Count > 0 && query.Offset + query.Count < result.Total)
        {
            bundle.Link.Add(Link("next", recognized, query, baseUrl, query.Offset + query.Count));
        }

        foreach (var record in result.Matches)
        {
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = $"{baseUrl}/AuditEvent/{record.Id}",
                Resource = AuditEventMapper.ToAuditEvent(record),
                Search = new Bundle.SearchComponent { Mode = Bundle.SearchEntryMode.Match },
            });
        }

        if (issues.Count > 0)
        {
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = "urn:uuid:" + Guid.NewGuid(),
                Resource = OperationOutcomes.From(issues),
                Search = new Bundle.SearchComponent { Mode = Bundle.SearchEntryMode.Outcome },
            });
        }

        return FhirResult.Of(StatusCodes.Status200OK, bundle);
    }

    /// <summary>
    /// The search parameters; every problem is collected. Unknown parameters are ignored with a warning (as on the
    /// other searches). Several <c>date</c> values must all hold (a range is <c>date=ge…&amp;date=le…</c>).
    /// </summary>
    public static bool TryParse(
        IQueryCollection parameters, SearchOptions options, out AuditQuery query, out List<KeyValuePair<string, string>> recognized, out List<FhirIssue> issues)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(options);
        issues = [];
        recognized = [];
        DateTimeOffset? from = null, until = null;
        string? agent = null, patient = null;
        var count = options.DefaultPageSize;
        var offset = 0;
        foreach (var (name, values) in parameters)
        {
            foreach (var value in values.OfType<string>())
            {
                switch (name)
                {
                    case "date":
                        if (TryDate(value, issues, out var lower, out var upper))
                        {
                            from = lower is null ? from : from is null || lower > from ? lower : from;
                            until = upper is null ? until : until is null || upper < until ? upper : until;
                            recognized.Add(new(name, value));
                        }

                        break;
                    case "agent":
                        agent = value;
                        recognized.Add(new(name, value));
                        break;
                    case "patient":
                        patient = value.Contains('/', StringComparison.Ordinal) ? FactExtractor.PatientIdOf(new ResourceReference(value)) : value;
                        if (string.IsNullOrEmpty(patient))
                        {
                            issues.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"patient '{value}' is not Patient/id or an id.", "patient"));
                        }
                        else
                        {
                            recognized.Add(new(name, value));
                        }

                        break;
                    case "_count":
                        if (int.TryParse(value, NumberStyles.None, CultureInfo.InvariantCulture, out var c))
                        {
                            count = Math.Min(c, options.MaxPageSize);
                        }
                        else
                        {
                            issues.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"_count '{value}' is not a non-negative integer.", "_count"));
                        }

                        break;
                    case "_offset":
                        if (!int.TryParse(value, NumberStyles.None, CultureInfo.InvariantCulture, out offset))
                        {
                            issues.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"_offset '{value}' is not a non-negative integer.", "_offset"));
                        }

                        break;
                    case "_format" or "_pretty":
                        break;
                    default:
                        issues.Add(new FhirIssue(ErrorCatalogue.UnknownSearchParameter, $"'{name}' is not a search parameter of AuditEvent here (date, agent, patient, _count, _offset); ignored.", name));
                        break;
                }
            }
        }

        query = new AuditQuery { From = from, Until = until, Agent = agent, PatientId = patient, Count = count, Offset = offset };
        return !OperationOutcomes.HasErrors(issues);
    }

    private static bool TryDate(string value, List<FhirIssue> issues, out DateTimeOffset? from, out DateTimeOffset? until)
    {
        from = until = null;
        var prefix = value.Length > 2 && char.IsLetter(value[0]) && char.IsLetter(value[1]) ? value[..2] : "eq";
        var text = prefix == "eq" && !value.StartsWith("eq", StringComparison.Ordinal) ? value : value[2..];
        if (!SearchDateRange.TryParse(text, out var start, out var end))
        {
            issues.Add(new FhirIssue(ErrorCatalogue.InvalidSearchValue, $"date '{value}' is not a FHIR date or dateTime.", "date"));
            return false;
        }

        switch (prefix)
        {
            case "eq": (from, until) = (start, end); return true;
            case "ge": from = start; return true;
            case "gt": from = end; return true;
            case "le": until = end; return true;
            case "lt": until = start; return true;
            default:
                issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedSearchForm, $"date prefix '{prefix}' is not supported here (eq, ge, gt, le, lt).", "date"));
                return false;
        }
    }

    private static Bundle.LinkComponent Link(string relation, List<KeyValuePair<string, string>> recognized, AuditQuery query, string baseUrl, int offset)
    {
        var parts = recognized
            .Select(p => $"{Uri.EscapeDataString(p.Key)}={Uri.EscapeDataString(p.Value)}")
            .Append($"_count={query.Count.ToString(CultureInfo.InvariantCulture)}")
            .Append($"_offset={offset.ToString(CultureInfo.InvariantCulture)}");
        return new Bundle.LinkComponent { Relation = relation, Url = $"{baseUrl}/AuditEvent?{string.Join('&', parts)}" };
    }
}
