using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Search;
using MeasureEval.Core.Security;
using Microsoft.AspNetCore.WebUtilities;

namespace MeasureEval.Api.Bundles;

/// <summary>Checks a transaction or batch Bundle before anything is written, collecting every issue per entry.</summary>
public sealed class BundlePlanner(SearchService search)
{
    public List<EntryPlan> Plan(Bundle bundle, string baseUrl)
    {
        ArgumentNullException.ThrowIfNull(bundle);
        var transaction = bundle.Type == Bundle.BundleType.Transaction;
        var plans = bundle.Entry.Select((entry, index) => new EntryPlan(index, entry)).ToList();
        var fullUrls = new Dictionary<string, EntryPlan>(StringComparer.Ordinal);
        var targets = new HashSet<string>(StringComparer.Ordinal);
        foreach (var plan in plans)
        {
            PlanRequest(plan, baseUrl);
            if (plan.Entry.FullUrl is { Length: > 0 } fullUrl && !fullUrls.TryAdd(fullUrl, plan))
            {
                plan.Issues.Add(new FhirIssue(ErrorCatalogue.DuplicateFullUrl, $"fullUrl '{fullUrl}' is already used by entry {fullUrls[fullUrl].Index}.", plan.Path + ".fullUrl"));
            }

            if (transaction && plan.Target is { Id: { } id, Query: null } target && plan.Method is Bundle.HTTPVerb.PUT or Bundle.HTTPVerb.DELETE
                && !targets.Add($"{target.Type}/{id}"))
            {
                plan.Issues.Add(new FhirIssue(ErrorCatalogue.DuplicateTarget, $"{target.Type}/{id} is written by more than one entry of this transaction.", plan.Path + ".request.url"));
            }

            if (plan.Resource is not null)
            {
                plan.References.AddRange(ReferenceWalker.Collect(plan.Resource, plan.Path + ".resource"));
            }
        }

        foreach (var plan in plans)
        {
            foreach (var located in plan.References)
            {
                var reference = located.Reference.Reference!;
                fullUrls.TryGetValue(reference, out var target);
                if (!transaction && target is not null && target != plan)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.BatchCrossReference, $"'{reference}' names another entry; batch entries are processed independently (use a transaction).", located.Path));
                }
                else if (target is null && reference.StartsWith("urn:uuid:", StringComparison.OrdinalIgnoreCase))
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.UnresolvedReference, $"'{reference}' is not the fullUrl of any entry in this bundle.", located.Path));
                }
            }
        }

        return plans;
    }

    private void PlanRequest(EntryPlan plan, string baseUrl)
    {
        var request = plan.Entry.Request;
        var path = plan.Path + ".request";
        if (request is null)
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.EntryRequestMissing, "Each transaction or batch entry needs a request (method and url).", path));
            return;
        }

        if (request.Method is not { } method)
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.EntryRequestMissing, "request.method is missing.", path + ".method"));
            return;
        }

        plan.Method = method;
        if (method is Bundle.HTTPVerb.PATCH or Bundle.HTTPVerb.HEAD)
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedEntryMethod, $"{method} entries are not supported.", path + ".method"));
            return;
        }

        if (string.IsNullOrWhiteSpace(request.Url))
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.EntryRequestMissing, "request.url is missing.", path + ".url"));
            return;
        }

        if (!TryParseTarget(request.Url, baseUrl, out var target, out var problem))
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.InvalidEntryUrl, problem, path + ".url"));
            return;
        }

        plan.Target = target;
        var resource = plan.Resource;
        switch (method)
        {
            case Bundle.HTTPVerb.POST:
                if (target.Id is not null || target.Query is not null)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.InvalidEntryUrl, $"A POST entry's url is the resource type only, got '{request.Url}'.", path + ".url"));
                }

                RequireResource(plan, target);
                if (!string.IsNullOrEmpty(request.IfNoneExist))
                {
                    var parameters = QueryHelpers.ParseQuery(request.IfNoneExist);
                    if (parameters.Values.SelectMany(v => v).Any(v => v?.StartsWith("urn:uuid:", StringComparison.OrdinalIgnoreCase) == true))
                    {
                        plan.DeferredCondition = parameters;
                    }
                    else
                    {
                        ParseCondition(plan, parameters);
                    }
                }

                break;
            case Bundle.HTTPVerb.PUT:
                if (target.Query is not null)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedEntryMethod, "Conditional update is not supported; PUT to Type/id.", path + ".url"));
                    return;
                }

                if (target.Id is null || target.Version is not null)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.InvalidEntryUrl, $"A PUT entry's url is Type/id, got '{request.Url}'.", path + ".url"));
                    return;
                }

                if (RequireResource(plan, target) && resource is not null)
                {
                    if (string.IsNullOrEmpty(resource.Id))
                    {
                        plan.Issues.Add(new FhirIssue(ErrorCatalogue.IdMissing, $"The resource must carry the id of request.url ('{target.Id}').", plan.Path + ".resource.id"));
                    }
                    else if (resource.Id != target.Id)
                    {
                        plan.Issues.Add(new FhirIssue(ErrorCatalogue.IdMismatch, $"The resource id '{resource.Id}' differs from request.url id '{target.Id}'.", plan.Path + ".resource.id"));
                    }
                }

                ReadIfMatch(plan, request.IfMatch, path);
                break;
            case Bundle.HTTPVerb.DELETE:
                if (target.Query is not null)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedEntryMethod, "Conditional delete is not supported; DELETE Type/id.", path + ".url"));
                    return;
                }

                if (target.Id is null || target.Version is not null)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.InvalidEntryUrl, $"A DELETE entry's url is Type/id, got '{request.Url}'.", path + ".url"));
                    return;
                }

                ReadIfMatch(plan, request.IfMatch, path);
                break;
            default:
                if (target.Version is not null)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedEntryMethod, "Versioned reads are not supported inside a bundle; use GET Type/id/_history/vid.", path + ".url"));
                }
                else if (target.Id is null)
                {
                    // Bundles are written under the write policy (ingest, admin), whose callers are unscoped.
                    if (search.TryParseSearch(target.Type, QueryHelpers.ParseQuery(target.Query ?? ""), DataScope.Unrestricted, strict: false, out var parsed, out var issues))
                    {
                        plan.Search = parsed;
                    }
                    else
                    {
                        plan.Issues.AddRange(issues.Select(i => i with { Expression = path + ".url" }));
                    }
                }

                break;
        }
    }

    /// <summary>Parses an ifNoneExist query (strictly: an ignored parameter would widen the match) into the plan.</summary>
    public void ParseCondition(EntryPlan plan, IEnumerable<KeyValuePair<string, Microsoft.Extensions.Primitives.StringValues>> parameters)
    {
        ArgumentNullException.ThrowIfNull(plan);
        if (search.TryParseSearch(plan.Target!.Type, parameters, DataScope.Unrestricted, strict: true, out var condition, out var issues))
        {
            plan.Condition = condition! with { Query = condition.Query with { Count = 2, Offset = 0 } };
        }
        else
        {
            plan.Issues.AddRange(issues.Select(i => i with { Expression = plan.Path + ".request.ifNoneExist" }));
        }
    }

    private static bool RequireResource(EntryPlan plan, EntryTarget target)
    {
        if (plan.Resource is null)
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.EntryResourceMissing, $"A {plan.Method} entry needs a resource.", plan.Path + ".resource"));
            return false;
        }

        if (plan.Resource.TypeName != target.Type)
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.ResourceTypeMismatch, $"The resource is a {plan.Resource.TypeName} but request.url names {target.Type}.", plan.Path + ".resource"));
            return false;
        }

        return true;
    }

    private static void ReadIfMatch(EntryPlan plan, string? ifMatch, string path)
    {
        if (string.IsNullOrEmpty(ifMatch))
        {
            return;
        }

        if (ETags.TryParseVersion(ifMatch, out var version))
        {
            plan.IfMatch = version;
        }
        else
        {
            plan.Issues.Add(new FhirIssue(ErrorCatalogue.InvalidIfMatch, $"ifMatch '{ifMatch}' is not a version ETag such as W/\"3\".", path + ".ifMatch"));
        }
    }

    /// <summary>Type, Type/id, Type/id/_history/vid, or Type?query; relative, or absolute under this server's base.</summary>
    public static bool TryParseTarget(string url, string baseUrl, out EntryTarget target, out string problem)
    {
        target = new EntryTarget("", null, null, null);
        problem = "";
        var text = url.Trim();
        if (text.StartsWith(baseUrl + "/", StringComparison.OrdinalIgnoreCase))
        {
            text = text[(baseUrl.Length + 1)..];
        }
        else if (Uri.TryCreate(text, UriKind.Absolute, out _))
        {
            problem = $"'{url}' is an absolute URL of another server; use a relative url such as Patient/123.";
            return false;
        }

        string? query = null;
        var questionMark = text.IndexOf('?', StringComparison.Ordinal);
        if (questionMark >= 0)
        {
            query = text[(questionMark + 1)..];
            text = text[..questionMark];
        }

        var segments = text.Trim('/').Split('/');
        if (!FhirResourceTypes.IsKnown(segments[0]))
        {
            problem = $"'{segments[0]}' is not a FHIR R4 resource type.";
            return false;
        }

        if (FhirResourceTypes.IsServerKept(segments[0]))
        {
            problem = $"{segments[0]} is written by the server only (the audit trail); read it with GET /{segments[0]} as an administrator.";
            return false;
        }

        int? version = null;
        var shapeOk = segments.Length switch
        {
            1 => true,
            2 => query is null,
            4 => query is null && segments[2] == "_history" && int.TryParse(segments[3], NumberStyles.None, CultureInfo.InvariantCulture, out var v) && (version = v) > 0,
            _ => false,
        };
        if (!shapeOk)
        {
            problem = $"'{url}' is not Type, Type/id, Type/id/_history/vid or Type?query.";
            return false;
        }

        target = new EntryTarget(segments[0], segments.Length > 1 ? segments[1] : null, version, query);
        return true;
    }
}
