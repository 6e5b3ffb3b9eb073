using Hl7.Fhir.Model;

namespace MeasureEval.Api.Capabilities;

/// <summary>Endpoint metadata: this endpoint implements a type-level interaction for every resource type.</summary>
public sealed record FhirTypeInteractionMetadata(CapabilityStatement.TypeRestfulInteraction Interaction);

/// <summary>Endpoint metadata: this endpoint implements a whole-system interaction.</summary>
public sealed record FhirSystemInteractionMetadata(CapabilityStatement.SystemRestfulInteraction Interaction);

/// <summary>
/// Endpoint metadata: this endpoint implements an operation. <see cref="ResourceType"/> null means a system-level
/// operation; otherwise it is listed under that resource.
/// </summary>
public sealed record FhirOperationMetadata(string Name, string Definition, string? ResourceType, string Documentation);
