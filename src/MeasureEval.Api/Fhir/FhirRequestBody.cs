using System.Buffers;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Ingest;
using MeasureEval.Core.Fhir;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.Features;

namespace MeasureEval.Api.Fhir;

/// <summary>The outcome of reading a resource body: the resource, or every issue found in it.</summary>
public sealed record ParsedBody(Resource? Resource, IReadOnlyList<FhirIssue> Issues)
{
    public bool Succeeded => Resource is not null && Issues.Count == 0;
}

/// <summary>Reads a whole (size-limited) FHIR JSON body and parses it strictly.</summary>
public static class FhirRequestBody
{
    public static async Task<ParsedBody> ReadResourceAsync(HttpRequest request, IngestOptions options, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        ArgumentNullException.ThrowIfNull(options);
        var tooLarge = new FhirIssue(ErrorCatalogue.BodyTooLarge, $"The body exceeds the limit of {options.MaxBodyBytes} bytes (Ingest:MaxBodyBytes); send large exports to $ingest.");
        if (request.ContentLength > options.MaxBodyBytes)
        {
            return new ParsedBody(null, [tooLarge]);
        }

        // This service applies its own, configurable limit instead of the server's fixed default.
        var sizeFeature = request.HttpContext.Features.Get<IHttpMaxRequestBodySizeFeature>();
        if (sizeFeature is { IsReadOnly: false })
        {
            sizeFeature.MaxRequestBodySize = null;
        }

        var reader = request.BodyReader;
        while (true)
        {
            var read = await reader.ReadAsync(cancellationToken);
            if (read.Buffer.Length > options.MaxBodyBytes)
            {
                reader.AdvanceTo(read.Buffer.End);
                return new ParsedBody(null, [tooLarge]);
            }

            if (read.IsCompleted)
            {
                var parsed = Parse(read.Buffer, options.MaxJsonDepth);
                reader.AdvanceTo(read.Buffer.End);
                return parsed;
            }

            reader.AdvanceTo(read.Buffer.Start, read.Buffer.End);
        }
    }

    /// <summary>
    /// Reads the body as a resource of type <typeparamref name="T"/>: the resource, or the OperationOutcome to answer
    /// (every parse issue, or a type mismatch located at the expected type).
    /// </summary>
    public static async Task<(T? Resource, FhirResult? Refusal)> ReadResourceAsync<T>(HttpRequest request, IngestOptions options, CancellationToken cancellationToken)
        where T : Resource
    {
        var parsed = await ReadResourceAsync(request, options, cancellationToken);
        if (!parsed.Succeeded)
        {
            return (null, FhirResult.Outcome(parsed.Issues));
        }

        var expected = typeof(T).Name; // the model classes carry the FHIR type names
        return parsed.Resource is T resource
            ? (resource, null)
            : (null, FhirResult.Outcome(new FhirIssue(ErrorCatalogue.ResourceTypeMismatch, $"the body is a {parsed.Resource!.TypeName}, not {expected}", expected)));
    }

    public static ParsedBody Parse(ReadOnlySequence<byte> body, int maxDepth)
    {
        if (IsBlank(body))
        {
            return new ParsedBody(null, [new FhirIssue(ErrorCatalogue.EmptyBody, "The request has no body; a FHIR resource was expected.")]);
        }

        var ok = FhirJson.TryParseResource(body, maxDepth, out var resource, out var parseIssues);
        return new ParsedBody(ok ? resource : null, [.. parseIssues.Select(i => FhirIssue.FromParse(i))]);
    }

    private static bool IsBlank(ReadOnlySequence<byte> body)
    {
        foreach (var segment in body)
        {
            foreach (var b in segment.Span)
            {
                if (b is not ((byte)' ' or (byte)'\t' or (byte)'\r' or (byte)'\n'))
                {
                    return false;
                }
            }
        }

        return true;
    }
}
