using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;

namespace MeasureEval.Api.Ingest;

/// <summary>
/// One unit read from an ingest body: a parsed resource, or the issues that refused it. <see cref="Root"/> is the
/// FHIRPath of the resource in the body ("Bundle.entry[3].resource"; for NDJSON the resource type), <see cref="Line"/>
/// the NDJSON line.
/// </summary>
public sealed record IngestItem(Resource? Resource, IReadOnlyList<FhirIssue> Issues, string Root, long? Line);

/// <summary>A problem with the body as a whole (unreadable framing, too large): reading stops there.</summary>
public sealed record IngestFailure(FhirIssue Issue);
