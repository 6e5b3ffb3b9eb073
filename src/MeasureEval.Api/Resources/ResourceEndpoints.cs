using System.Globalization;
using System.Security.Claims;
using Hl7.Fhir.Model;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Ingest;
using MeasureEval.Api.Search;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.AspNetCore.WebUtilities;
using Microsoft.Extensions.Options;
using Interaction = Hl7.Fhir.Model.CapabilityStatement.TypeRestfulInteraction;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Resources;

/// <summary>Instance-level interactions: read, vread, history, update, delete, and type-level create.</summary>
public static class ResourceEndpoints
{
    public static IEndpointRouteBuilder MapResourceEndpoints(this IEndpointRouteBuilder app)
    {
        var group = app.MapGroup("").WithTags("Resources");
        var body = FhirEndpointExtensions.ResourceMediaTypes;
        group.MapGet("/{type}/{id}", ReadAsync).WithName("read").RequireAuthorization(AccessPolicies.PatientData).WithSummary("Read the current version")
            .WithFhir([], [200], 404, 406, 410).WithFhirInteraction(Interaction.Read);
        group.MapGet("/{type}/{id}/_history/{vid}", VersionReadAsync).WithName("vread").RequireAuthorization(AccessPolicies.PatientData).WithSummary("Read one version")
            .WithFhir([], [200], 404, 406, 410).WithFhirInteraction(Interaction.Vread);
        group.MapGet("/{type}/{id}/_history", HistoryAsync).WithName("history-instance").RequireAuthorization(AccessPolicies.PatientData).WithSummary("Every version, newest first")
            .WithFhir([], [200], 404, 406).WithFhirInteraction(Interaction.HistoryInstance);
        group.MapPut("/{type}/{id}", UpdateAsync).WithName("update").RequireAuthorization(AccessPolicies.Write).WithSummary("Update, or create under this id; If-Match for optimistic locking")
            .WithFhir(body, [200, 201], 400, 404, 406, 412, 413, 415).WithFhirInteraction(Interaction.Update);
        group.MapDelete("/{type}/{id}", DeleteAsync).WithName("delete").RequireAuthorization(AccessPolicies.Write).WithSummary("Delete (a new version marks it deleted); If-Match honoured")
            .WithFhir([], [204], 400, 404, 406, 412).WithFhirInteraction(Interaction.Delete);
        group.MapPost("/{type}", CreateAsync).WithName("create").RequireAuthorization(AccessPolicies.Write).WithSummary("Create under a server id; If-None-Exist for conditional create")
            .WithFhir(body, [200, 201], 400, 404, 406, 412, 413, 415).WithFhirInteraction(Interaction.Create);
        return app;
    }

    public static Task<FhirResult> ReadAsync(string type, string id, ClaimsPrincipal user, IResourceStore store, CancellationToken cancellationToken) =>
        ReadInScopeAsync(type, id, CallerScope.Of(user), store, cancellationToken);

    /// <summary>A read within <paramref name="scope"/>: what lies outside it answers 404 like an unknown id.</summary>
    public static async Task<FhirResult> ReadInScopeAsync(string type, string id, DataScope scope, IResourceStore store, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        var stored = await store.ReadAsync(type, id, scope, cancellationToken);
        return Answer(stored, $"{type}/{id}");
    }

    public static async Task<FhirResult> VersionReadAsync(string type, string id, string vid, ClaimsPrincipal user, IResourceStore store, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        if (!int.TryParse(vid, NumberStyles.None, CultureInfo.InvariantCulture, out var version) || version < 1)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.NotFound, $"{type}/{id} has no version '{vid}'; version ids are positive integers."));
        }

        var stored = await store.ReadVersionAsync(type, id, version, CallerScope.Of(user), cancellationToken);
        return Answer(stored, $"{type}/{id}/_history/{vid}");
    }

    public static async Task<FhirResult> HistoryAsync(string type, string id, HttpRequest request, ClaimsPrincipal user, IResourceStore store, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        var versions = await store.HistoryAsync(type, id, CallerScope.Of(user), cancellationToken);
        if (versions.Count == 0)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.NotFound, $"{type}/{id} is not known."));
        }

        var baseUrl = FhirBaseUrl.Of(request);
        var bundle = new Bundle { Id = Guid.NewGuid().ToString(), Type = Bundle.BundleType.History, Total = versions.Count };
        bundle.Link.Add(new Bundle.LinkComponent { Relation = "self", Url = $"{baseUrl}/{type}/{id}/_history" });
        foreach (var version in versions)
        {
            var (method, status) = version switch
            {
                { Deleted: true } => (Bundle.HTTPVerb.DELETE, "204 No Content"),
                { VersionId: 1 } => (Bundle.HTTPVerb.POST, "201 Created"),
                _ => (Bundle.HTTPVerb.PUT, "200 OK"),
            };
            bundle.Entry.Add(new Bundle.EntryComponent
            {
                FullUrl = $"{baseUrl}/{type}/{id}",
                Resource = version.Deleted ? null : version.ToPoco(),
                Request = new Bundle.RequestComponent { Method = method, Url = method == Bundle.HTTPVerb.POST ? type : $"{type}/{id}" },
                Response = new Bundle.ResponseComponent
                {
                    Status = status,
                    Etag = ETags.Of(version.VersionId),
                    LastModified = version.LastUpdated,
                    Location = version.Location(),
                },
            });
        }

        return FhirResult.Of(StatusCodes.Status200OK, bundle);
    }

    public static async Task<FhirResult> UpdateAsync(
        string type, string id, HttpRequest request, IResourceStore store, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(options);
        var issues = new List<FhirIssue>();
        int? ifMatch = ReadIfMatch(request, issues);
        var parsed = await FhirRequestBody.ReadResourceAsync(request, options.Value, cancellationToken);
        issues.AddRange(parsed.Issues);
        if (parsed.Resource is { } resource)
        {
            CheckType(resource, type, issues);
            if (string.IsNullOrEmpty(resource.Id))
            {
                issues.Add(new FhirIssue(ErrorCatalogue.IdMissing, $"An update must carry the id of the URL ('{id}') in the resource.", $"{resource.TypeName}.id"));
            }
            else if (resource.Id != id)
            {
                issues.Add(new FhirIssue(ErrorCatalogue.IdMismatch, $"The resource id '{resource.Id}' differs from the URL id '{id}'.", $"{resource.TypeName}.id"));
            }
        }

        if (issues.Count > 0)
        {
            return FhirResult.Outcome(issues);
        }

        await using var session = await store.BeginWriteAsync(cancellationToken);
        var written = await session.UpdateAsync(parsed.Resource!, ifMatch, cancellationToken);
        if (written.VersionConflict)
        {
            return VersionConflict(type, id, ifMatch, written.Stored);
        }

        await session.CommitAsync(cancellationToken);
        var returnBody = FhirPrefer.Of(request).WantsRepresentation(byDefault: true);
        return FhirResult.Stored(written.Created ? StatusCodes.Status201Created : StatusCodes.Status200OK, written.Stored!, returnBody, withLocation: written.Created);
    }

    public static async Task<FhirResult> DeleteAsync(string type, string id, HttpRequest request, IResourceStore store, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        var issues = new List<FhirIssue>();
        var ifMatch = ReadIfMatch(request, issues);
        if (issues.Count > 0)
        {
            return FhirResult.Outcome(issues);
        }

        await using var session = await store.BeginWriteAsync(cancellationToken);
        var written = await session.DeleteAsync(type, id, ifMatch, cancellationToken);
        if (written.VersionConflict)
        {
            return VersionConflict(type, id, ifMatch, written.Stored);
        }

        await session.CommitAsync(cancellationToken);
        return written.Stored is { } deletion ? FhirResult.Stored(StatusCodes.Status204NoContent, deletion, withBody: false) : FhirResult.Empty(StatusCodes.Status204NoContent);
    }

    public static async Task<FhirResult> CreateAsync(
        string type, HttpRequest request, IResourceStore store, SearchService search, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(search);
        ArgumentNullException.ThrowIfNull(options);
        var parsed = await FhirRequestBody.ReadResourceAsync(request, options.Value, cancellationToken);
        var issues = parsed.Issues.ToList();
        if (parsed.Resource is { } parsedResource)
        {
            CheckType(parsedResource, type, issues);
        }

        ParsedSearch? condition = null;
        var ifNoneExist = request.Headers["If-None-Exist"].ToString();
        if (ifNoneExist.Length > 0)
        {
            // Conditional create runs under the write policy (ingest, admin), whose callers are unscoped.
            if (search.TryParseSearch(type, QueryHelpers.ParseQuery(ifNoneExist), DataScope.Unrestricted, strict: true, out condition, out var conditionIssues))
            {
                condition = condition! with { Query = condition.Query with { Count = 2, Offset = 0 } };
            }
            else
            {
                issues.AddRange(conditionIssues.Select(i => i with { Expression = null, Diagnostics = "If-None-Exist: " + i.Diagnostics }));
            }
        }

        if (issues.Count > 0)
        {
            return FhirResult.Outcome(issues);
        }

        var resource = parsed.Resource!;
        await using var session = await store.BeginWriteAsync(cancellationToken);
        if (condition is not null)
        {
            await session.LockConditionAsync(condition.Query, cancellationToken);
            var existing = await SearchService.RunAsync(condition, session.SearchAsync, cancellationToken);
            if (existing.Total > 1)
            {
                return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.MultipleMatches, $"If-None-Exist matched {existing.Total} {type} resources; refine the criteria."));
            }

            if (existing.Total == 1)
            {
                return FhirResult.Stored(StatusCodes.Status200OK, existing.Matches[0], FhirPrefer.Of(request).WantsRepresentation(byDefault: true), withLocation: true);
            }
        }

        var created = await session.CreateAsync(resource, cancellationToken);
        await session.CommitAsync(cancellationToken);
        return FhirResult.Stored(StatusCodes.Status201Created, created, FhirPrefer.Of(request).WantsRepresentation(byDefault: true), withLocation: true);
    }

    private static FhirResult Answer(StoredResource? stored, string what) => stored switch
    {
        null => FhirResult.Outcome(new FhirIssue(ErrorCatalogue.NotFound, $"{what} is not known.")),
        { Deleted: true } => FhirResult.Outcome(new FhirIssue(ErrorCatalogue.Gone, $"{what} was deleted (version {stored.VersionId}).")).WithVersionOf(stored),
        _ => FhirResult.Stored(StatusCodes.Status200OK, stored),
    };

    private static void CheckType(Resource resource, string type, List<FhirIssue> issues)
    {
        if (resource.TypeName != type)
        {
            issues.Add(new FhirIssue(ErrorCatalogue.ResourceTypeMismatch, $"The body is a {resource.TypeName} but the URL names {type}.", resource.TypeName));
        }
    }

    private static int? ReadIfMatch(HttpRequest request, List<FhirIssue> issues)
    {
        var header = request.Headers.IfMatch.ToString();
        if (header.Length == 0)
        {
            return null;
        }

        if (ETags.TryParseVersion(header, out var version))
        {
            return version;
        }

        issues.Add(new FhirIssue(ErrorCatalogue.InvalidIfMatch, $"If-Match '{header}' is not a version ETag such as W/\"3\"."));
        return null;
    }

    private static FhirResult VersionConflict(string type, string id, int? ifMatch, StoredResource? current)
    {
        var now = current is null ? "it does not exist" : $"the current version is {current.VersionId}";
        var result = FhirResult.Outcome(new FhirIssue(ErrorCatalogue.VersionConflict, $"If-Match asked for version {ifMatch} of {type}/{id} but {now}."));
        return current is null ? result : result.WithVersionOf(current);
    }
}
