using Hl7.Fhir.Model;
using Microsoft.AspNetCore.Builder;

namespace MeasureEval.Api.Capabilities;

/// <summary>
/// Declares what an endpoint implements; <c>GET /metadata</c> is built from these declarations on the mapped
/// endpoints, so the CapabilityStatement cannot list what is not mapped.
/// </summary>
public static class FhirCapabilityExtensions
{
    public static RouteHandlerBuilder WithFhirInteraction(this RouteHandlerBuilder builder, CapabilityStatement.TypeRestfulInteraction interaction) =>
        builder.WithMetadata(new FhirTypeInteractionMetadata(interaction));

    public static RouteHandlerBuilder WithFhirSystemInteraction(this RouteHandlerBuilder builder, CapabilityStatement.SystemRestfulInteraction interaction) =>
        builder.WithMetadata(new FhirSystemInteractionMetadata(interaction));

    /// <summary>Lists an operation (e.g. <c>$evaluate-measure</c> on Measure) in the CapabilityStatement.</summary>
    public static RouteHandlerBuilder WithFhirOperation(this RouteHandlerBuilder builder, string name, string definition, string? resourceType, string documentation) =>
        builder.WithMetadata(new FhirOperationMetadata(name, definition, resourceType, documentation));
}
