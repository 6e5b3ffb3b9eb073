using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Search;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.WebUtilities;
using Microsoft.Extensions.Primitives;

namespace MeasureEval.Api.Bundles;

/// <summary>
/// Executes a planned transaction (one store session: all or nothing) or batch (one session per entry),
/// following FHIR R4 http.html: DELETE, POST, PUT, GET order; urn:uuid references rewritten to server ids;
/// the response lists entries in the request's order.
/// </summary>
public sealed class BundleProcessor(IResourceStore store, BundlePlanner planner, TimeProvider time)
{
    /// <summary>Returns the response Bundle, or the issues that refused the whole transaction (nothing stored).</summary>
    public async Task<(Bundle? Response, IReadOnlyList<FhirIssue> Issues)> ProcessAsync(Bundle bundle, string baseUrl, bool withResources, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(bundle);
        if (bundle.Type is not (Bundle.BundleType.Transaction or Bundle.BundleType.Batch))
        {
            var hint = bundle.Type is Bundle.BundleType.Collection or Bundle.BundleType.Searchset ? " Post collection and searchset bundles to $ingest." : "";
            return (null, [new FhirIssue(ErrorCatalogue.WrongBundleType, $"POST / takes a transaction or batch Bundle, not '{bundle.Type?.ToString() ?? "(none)"}'.{hint}", "Bundle.type")]);
        }

        var plans = planner.Plan(bundle, baseUrl);
        var ordered = plans.OrderBy(p => p.Phase).ThenBy(p => p.Index).ToList();
        if (bundle.Type == Bundle.BundleType.Transaction)
        {
            var issues = plans.SelectMany(p => p.Issues).ToList();
            if (issues.Count > 0)
            {
                return (null, issues);
            }

            await using var session = await store.BeginWriteAsync(cancellationToken);
            await ExecuteAsync(session, ordered, baseUrl, withResources, cancellationToken);
            issues = [.. ordered.SelectMany(p => p.Issues)];
            if (issues.Count > 0)
            {
                return (null, issues);
            }

            await session.CommitAsync(cancellationToken);
        }
        else
        {
            foreach (var plan in ordered.Where(p => p.Issues.Count == 0))
            {
                await using var session = await store.BeginWriteAsync(cancellationToken);
                await ExecuteAsync(session, [plan], baseUrl, withResources, cancellationToken);
                if (plan.Issues.Count == 0)
                {
                    await session.CommitAsync(cancellationToken);
                }
            }
        }

        var response = new Bundle
        {
            Id = Guid.NewGuid().ToString(),
            Type = bundle.Type == Bundle.BundleType.Transaction ? Bundle.BundleType.TransactionResponse : Bundle.BundleType.BatchResponse,
        };
        response.Entry.AddRange(plans.Select(p => p.Issues.Count > 0 ? ErrorEntry(p) : p.Response!));
        return (response, []);
    }

    private async System.Threading.Tasks.Task ExecuteAsync(IStoreSession session, List<EntryPlan> ordered, string baseUrl, bool withResources, CancellationToken cancellationToken)
    {
        foreach (var plan in ordered.Where(p => p.Method == Bundle.HTTPVerb.DELETE))
        {
            var target = plan.Target!;
            var written = await session.DeleteAsync(target.Type, target.Id!, plan.IfMatch, cancellationToken);
            if (written.VersionConflict)
            {
                plan.Issues.Add(Conflict(plan, written.Stored));
                continue;
            }

            plan.Response = Entry(plan, "204 No Content", written.Stored, null);
        }

        // Ids first, so that references between entries (in any direction) can be rewritten before writing.
        var references = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var plan in ordered.Where(p => p.Method == Bundle.HTTPVerb.PUT))
        {
            if (plan.Entry.FullUrl is { Length: > 0 } fullUrl)
            {
                references[fullUrl] = $"{plan.Target!.Type}/{plan.Target.Id}";
            }
        }

        var posts = ordered.Where(p => p.Method == Bundle.HTTPVerb.POST).ToList();
        while (posts.Count > 0)
        {
            var ready = posts.Where(p => p.DeferredCondition is null || !DependsOnPending(p, posts)).ToList();
            if (ready.Count == 0)
            {
                foreach (var plan in posts)
                {
                    plan.Issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedEntryMethod, "ifNoneExist conditions of these entries name each other; they cannot be resolved.", plan.Path + ".request.ifNoneExist"));
                }

                break;
            }

            var done = ready.ToHashSet();
            posts.RemoveAll(done.Contains);
            foreach (var plan in ready)
            {
                await AssignIdAsync(session, plan, references, cancellationToken);
            }
        }

        foreach (var plan in ordered.Where(p => p.Method is Bundle.HTTPVerb.POST or Bundle.HTTPVerb.PUT))
        {
            foreach (var located in plan.References)
            {
                if (references.TryGetValue(located.Reference.Reference!, out var rewritten))
                {
                    located.Reference.Reference = rewritten;
                }
            }
        }

        foreach (var plan in ordered.Where(p => p.Method == Bundle.HTTPVerb.POST && p.Issues.Count == 0))
        {
            if (plan.Matched is { } matched)
            {
                plan.Response = Entry(plan, "200 OK", matched, withResources ? matched.ToPoco() : null);
                continue;
            }

            var resource = plan.Resource!;
            resource.Id = plan.AssignedId;
            var written = await session.UpdateAsync(resource, null, cancellationToken);
            plan.Response = Entry(plan, "201 Created", written.Stored, withResources ? written.Stored!.ToPoco() : null);
        }

        foreach (var plan in ordered.Where(p => p.Method == Bundle.HTTPVerb.PUT))
        {
            var written = await session.UpdateAsync(plan.Resource!, plan.IfMatch, cancellationToken);
            if (written.VersionConflict)
            {
                plan.Issues.Add(Conflict(plan, written.Stored));
                continue;
            }

            plan.Response = Entry(plan, written.Created ? "201 Created" : "200 OK", written.Stored, withResources ? written.Stored!.ToPoco() : null);
        }

        foreach (var plan in ordered.Where(p => p.Method == Bundle.HTTPVerb.GET))
        {
            await ReadAsync(session, plan, baseUrl, cancellationToken);
        }
    }

    private async System.Threading.Tasks.Task AssignIdAsync(IStoreSession session, EntryPlan plan, Dictionary<string, string> references, CancellationToken cancellationToken)
    {
        if (plan.DeferredCondition is { } deferred)
        {
            var resolved = deferred.ToDictionary(
                kv => kv.Key,
                kv => new StringValues([.. kv.Value.Select(v => v is not null && references.TryGetValue(v, out var id) ? id : v)]));
            planner.ParseCondition(plan, resolved);
        }

        if (plan.Issues.Count > 0)
        {
            return;
        }

        if (plan.Condition is { } condition)
        {
            await session.LockConditionAsync(condition.Query, cancellationToken);
            var existing = await SearchService.RunAsync(condition, session.SearchAsync, cancellationToken);
            if (existing.Total > 1)
            {
                plan.Issues.Add(new FhirIssue(ErrorCatalogue.MultipleMatches, $"ifNoneExist matched {existing.Total} {plan.Target!.Type} resources.", plan.Path + ".request.ifNoneExist"));
                return;
            }

            plan.Matched = existing.Total == 1 ? existing.Matches[0] : null;
        }

        plan.AssignedId = plan.Matched?.Id ?? Guid.CreateVersion7(time.GetUtcNow()).ToString();
        if (plan.Entry.FullUrl is { Length: > 0 } fullUrl)
        {
            references[fullUrl] = $"{plan.Target!.Type}/{plan.AssignedId}";
        }
    }

    private static bool DependsOnPending(EntryPlan plan, List<EntryPlan> pending) =>
        plan.DeferredCondition!.Values.SelectMany(v => v).Any(v => pending.Any(other => other != plan && other.Entry.FullUrl == v));

    private static async System.Threading.Tasks.Task ReadAsync(IStoreSession session, EntryPlan plan, string baseUrl, CancellationToken cancellationToken)
    {
        var target = plan.Target!;
        if (plan.Search is { } search)
        {
            var result = await SearchService.RunAsync(search, session.SearchAsync, cancellationToken);
            plan.Response = Entry(plan, "200 OK", null, SearchService.ToBundle(search, result, baseUrl));
            return;
        }

        var stored = await session.ReadAsync(target.Type, target.Id!, cancellationToken);
        switch (stored)
        {
            case null:
                plan.Issues.Add(new FhirIssue(ErrorCatalogue.NotFound, $"{target.Type}/{target.Id} is not known.", plan.Path + ".request.url"));
                break;
            case { Deleted: true }:
                plan.Issues.Add(new FhirIssue(ErrorCatalogue.Gone, $"{target.Type}/{target.Id} was deleted.", plan.Path + ".request.url"));
                break;
            default:
                plan.Response = Entry(plan, "200 OK", stored, stored.ToPoco());
                break;
        }
    }

    private static FhirIssue Conflict(EntryPlan plan, StoredResource? current)
    {
        var now = current is null ? "it does not exist" : $"the current version is {current.VersionId}";
        return new FhirIssue(ErrorCatalogue.VersionConflict, $"ifMatch asked for version {plan.IfMatch} of {plan.Target!.Type}/{plan.Target.Id} but {now}.", plan.Path + ".request.ifMatch");
    }

    private static Bundle.EntryComponent Entry(EntryPlan plan, string status, StoredResource? stored, Resource? resource) => new()
    {
        Resource = resource,
        Response = new Bundle.ResponseComponent
        {
            Status = status,
            Location = stored is null || stored.Deleted ? null : stored.Location(),
            Etag = stored is null ? null : ETags.Of(stored.VersionId),
            LastModified = stored?.LastUpdated,
        },
    };

    private static Bundle.EntryComponent ErrorEntry(EntryPlan plan)
    {
        var status = OperationOutcomes.StatusOf(plan.Issues);
        return new Bundle.EntryComponent
        {
            Response = new Bundle.ResponseComponent
            {
                Status = $"{status} {ReasonPhrases.GetReasonPhrase(status)}",
                Outcome = OperationOutcomes.From(plan.Issues),
            },
        };
    }
}
