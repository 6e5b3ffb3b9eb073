using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Fhir;
using System.Security.Claims;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Primitives;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Search;

/// <summary>Type-level search: <c>GET /{type}?…</c> and <c>POST /{type}/_search</c> (form body).</summary>
public static class SearchEndpoints
{
    public static IEndpointRouteBuilder MapSearchEndpoints(this IEndpointRouteBuilder app)
    {
        var group = app.MapGroup("").WithTags("Search");
        group.MapGet("/{type}", SearchAsync)
            .WithName("search-type").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Search resources of a type")
            .WithFhir([], [200], 400, 404, 406)
            .WithFhirInteraction(Hl7.Fhir.Model.CapabilityStatement.TypeRestfulInteraction.SearchType);
        group.MapPost("/{type}/_search", SearchPostAsync)
            .WithName("search-type-post").RequireAuthorization(AccessPolicies.PatientData)
            .WithSummary("Search resources of a type, parameters in a form body")
            .WithFhir([FhirFormat.FormUrlEncoded], [200], 400, 404, 406, 415);
        return app;
    }

    public static Task<FhirResult> SearchAsync(string type, HttpRequest request, ClaimsPrincipal user, IResourceStore store, SearchService search, CancellationToken cancellationToken) =>
        RunAsync(type, request.Query, request, CallerScope.Of(user), store, search, cancellationToken);

    public static async Task<FhirResult> SearchPostAsync(string type, HttpRequest request, ClaimsPrincipal user, IResourceStore store, SearchService search, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        var parameters = request.Query.ToList();
        if (request.HasFormContentType)
        {
            var form = await request.ReadFormAsync(cancellationToken);
            parameters.AddRange(form);
        }

        return await RunAsync(type, parameters, request, CallerScope.Of(user), store, search, cancellationToken);
    }

    private static async Task<FhirResult> RunAsync(
        string type, IEnumerable<KeyValuePair<string, StringValues>> parameters, HttpRequest request, DataScope scope, IResourceStore store, SearchService search, CancellationToken cancellationToken)
    {
        if (!search.TryParseSearch(type, parameters, scope, FhirPrefer.Of(request).StrictHandling, out var parsed, out var issues))
        {
            return FhirResult.Outcome(issues);
        }

        var result = await SearchService.RunAsync(parsed!, store.SearchAsync, cancellationToken);
        return FhirResult.Of(StatusCodes.Status200OK, SearchService.ToBundle(parsed!, result, FhirBaseUrl.Of(request)));
    }
}
