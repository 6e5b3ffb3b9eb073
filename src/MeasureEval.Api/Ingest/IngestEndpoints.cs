using MeasureEval.Api.Capabilities;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.Features;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.Options;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Ingest;

/// <summary>
/// <c>POST /$ingest</c>: bulk load of EHR exports (a collection/searchset Bundle, or NDJSON). Streamed, upsert by id,
/// good resources kept and bad ones reported with their position.
/// </summary>
public static class IngestEndpoints
{
    public const string OperationDefinition = "http://measureeval.example.org/fhir/OperationDefinition/ingest";

    public static IEndpointRouteBuilder MapIngestEndpoints(this IEndpointRouteBuilder app)
    {
        app.MapPost("/$ingest", IngestAsync)
            .WithTags("Ingest")
            .WithName("ingest").RequireAuthorization(AccessPolicies.Write)
            .WithSummary("Bulk upsert of a collection/searchset Bundle or NDJSON, streamed; refused lines reported with positions")
            .WithFhir([FhirFormat.FhirJson, FhirFormat.Json, FhirFormat.FhirNdjson, FhirFormat.Ndjson], [200], 400, 406, 413, 415)
            .WithFhirOperation("ingest", OperationDefinition, null,
                "Bulk upsert by id of a collection or searchset Bundle or NDJSON (application/fhir+ndjson, application/x-ndjson); answers Parameters with counts per type and an OperationOutcome of refused lines/entries.");
        return app;
    }

    public static async Task<FhirResult> IngestAsync(HttpRequest request, IngestProcessor processor, IOptions<IngestOptions> options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(processor);
        ArgumentNullException.ThrowIfNull(options);
        var limits = options.Value;
        if (request.ContentLength > limits.MaxStreamBytes)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.BodyTooLarge, $"The body exceeds the limit of {limits.MaxStreamBytes} bytes (Ingest:MaxStreamBytes)."));
        }

        if (request.ContentLength is 0)
        {
            return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.EmptyBody, "The request has no body; send a Bundle or NDJSON."));
        }

        var sizeFeature = request.HttpContext.Features.Get<IHttpMaxRequestBodySizeFeature>();
        if (sizeFeature is { IsReadOnly: false })
        {
            sizeFeature.MaxRequestBodySize = null;
        }

        var mediaType = (request.ContentType ?? "").Split(';')[0].Trim();
        var ndjson = mediaType.Equals(FhirFormat.FhirNdjson, StringComparison.OrdinalIgnoreCase) || mediaType.Equals(FhirFormat.Ndjson, StringComparison.OrdinalIgnoreCase);
        var items = ndjson
            ? NdjsonIngestReader.ReadAsync(request.BodyReader, limits, cancellationToken)
            : BundleIngestReader.ReadAsync(request.BodyReader, limits, cancellationToken);
        var summary = await processor.IngestAsync(items, cancellationToken);
        return summary.Failure is null
            ? FhirResult.Of(StatusCodes.Status200OK, IngestProcessor.ToParameters(summary))
            : FhirResult.Outcome(summary.Failure.Code.HttpStatus, IngestProcessor.FailureIssues(summary));
    }
}
