using Hl7.Fhir.Model;
using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using MeasureEval.Api.Ingest;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Bundles;

/// <summary><c>POST /</c>: transaction and batch Bundles.</summary>
public static class BundleEndpoints
{
    public static IEndpointRouteBuilder MapBundleEndpoints(this IEndpointRouteBuilder app)
    {
        app.MapPost("/", ProcessBundleAsync)
            .WithTags("Transactions")
            .WithName("transaction").RequireAuthorization(AccessPolicies.Write)
            .WithSummary("Process a transaction (all or nothing) or batch (independent entries) Bundle")
            .WithFhir(FhirEndpointExtensions.ResourceMediaTypes, [200], 400, 406, 409, 412, 413, 415, 422)
            .WithFhirSystemInteraction(CapabilityStatement.SystemRestfulInteraction.Transaction)
            .WithFhirSystemInteraction(CapabilityStatement.SystemRestfulInteraction.Batch);
        return app;
    }

    public static async Task<FhirResult> ProcessBundleAsync(HttpRequest request, BundleProcessor processor, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(processor);
        ArgumentNullException.ThrowIfNull(options);
        var parsed = await FhirRequestBody.ReadResourceAsync(request, options.Value, cancellationToken);
        if (!parsed.Succeeded)
        {
            return FhirResult.Outcome(parsed.Issues);
        }

        if (parsed.Resource is not Bundle bundle)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.ResourceTypeMismatch, $"POST / takes a Bundle, not a {parsed.Resource!.TypeName}.", parsed.Resource.TypeName));
        }

        if (bundle.Entry.Count > options.Value.MaxBundleEntries)
        {
            return FhirResult.Outcome(new FhirIssue(
                ErrorCatalogue.TooManyEntries,
                $"The Bundle has {bundle.Entry.Count} entries; at most {options.Value.MaxBundleEntries} are accepted in one request (Ingest:MaxBundleEntries). Split it, or send the resources to $ingest.",
                "Bundle.entry"));
        }

        var withResources = FhirPrefer.Of(request).WantsRepresentation(byDefault: false);
        var (response, issues) = await processor.ProcessAsync(bundle, FhirBaseUrl.Of(request), withResources, cancellationToken);
        return response is null ? FhirResult.Outcome(issues) : FhirResult.Of(StatusCodes.Status200OK, response);
    }
}
