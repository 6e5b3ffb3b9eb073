using MeasureEval.Api.Errors;
using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.Metadata;
using Microsoft.AspNetCore.Routing;

namespace MeasureEval.Api.Audit;

/// <summary>
/// Records one audit event per audited request, after the handler and before its answer is written, so that a read of
/// patient data whose event cannot be stored is answered 503 instead (fail closed). A write is already committed by
/// then: its answer stands and the failure is logged (a 503 would invite a client to repeat a create).
/// Also keeps the generic <c>/{type}</c> routes away from AuditEvent, which is not a stored resource here.
/// </summary>
public sealed class AuditEndpointFilter(AuditRecorder recorder) : IEndpointFilter
{
    public async ValueTask<object?> InvokeAsync(EndpointFilterInvocationContext context, EndpointFilterDelegate next)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(next);
        var http = context.HttpContext;
        var name = http.GetEndpoint()?.Metadata.GetMetadata<IEndpointNameMetadata>()?.EndpointName;
        if (AuditTrail.Of(http) is not { } trail || !AuditRoutes.TryGet(name, out var route))
        {
            return await next(context);
        }

        var result = http.Request.RouteValues.TryGetValue("type", out var type) && FhirResourceTypes.IsServerKept(type as string)
            ? FhirResult.Outcome(new FhirIssue(ErrorCatalogue.AuditEventNotAResource, "AuditEvent is written by the server only and read with GET /AuditEvent or GET /AuditEvent/{id}."))
            : await next(context);
        var status = Inspect(result, trail);
        if (result is FhirResult { Resource: Hl7.Fhir.Model.Bundle { Type: Hl7.Fhir.Model.Bundle.BundleType.BatchResponse } })
        {
            route = route with { Interaction = "batch" };
        }

        var record = recorder.Build(http, name!, route, status, trail);
        trail.ListedAtAppend = trail.Listed.Count;
        if (await recorder.TryAppendAsync(record))
        {
            trail.EventId = record.Id;
            return result;
        }

        if (!route.PatientRead || status >= 400)
        {
            return result;
        }

        // Marked as handled: the middleware would only fail again on the same store.
        trail.EventId = "";
        return FhirResult.Outcome(new FhirIssue(ErrorCatalogue.AuditUnavailable, $"The audit trail could not record this access, so nothing is returned; retry later (request id {http.TraceIdentifier})."));
    }

    /// <summary>The answer's status, and the patients it names (FHIR answers only; a streamed export names them itself).</summary>
    private static int Inspect(object? result, AuditTrail trail)
    {
        while (result is INestedHttpResult nested)
        {
            result = nested.Result;
        }

        if (result is FhirResult fhir)
        {
            if (fhir.Resource is { } resource)
            {
                AuditPatients.Collect(resource, trail);
            }
            else
            {
                AuditPatients.Collect(fhir.Json, trail);
            }
        }

        return result is IStatusCodeHttpResult { StatusCode: { } code } ? code : StatusCodes.Status200OK;
    }
}
