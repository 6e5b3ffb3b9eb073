using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Fhir;

public static class FhirEndpointExtensions
{
    public static readonly string[] ResourceMediaTypes = [FhirFormat.FhirJson, FhirFormat.Json];

    /// <summary>Marks an endpoint as FHIR: format negotiation, body media type check, resource type check, OpenAPI description.</summary>
    public static RouteHandlerBuilder WithFhir(this RouteHandlerBuilder builder, string[] requestMediaTypes, int[] success, params int[] errors) =>
        builder
            .WithMetadata(new FhirEndpointMetadata(requestMediaTypes, success, errors))
            .AddEndpointFilter<FhirRequestFilter>();
}
