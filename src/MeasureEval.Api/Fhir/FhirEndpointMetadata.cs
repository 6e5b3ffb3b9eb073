namespace MeasureEval.Api.Fhir;

/// <summary>
/// Declares what a FHIR endpoint reads and answers: request media types (empty: no body), success statuses
/// and error statuses. The request filter enforces the media types; the OpenAPI filter documents all of it.
/// </summary>
public sealed record FhirEndpointMetadata(IReadOnlyList<string> RequestMediaTypes, IReadOnlyList<int> SuccessStatuses, IReadOnlyList<int> ErrorStatuses);
