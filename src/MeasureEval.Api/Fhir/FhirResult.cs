using System.Globalization;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Fhir;

/// <summary>
/// A FHIR response: a resource (POCO or stored JSON) or nothing, with the version headers FHIR asks for,
/// written in the negotiated format.
/// </summary>
public sealed class FhirResult : IResult, IStatusCodeHttpResult
{
    private FhirResult(int statusCode, Resource? resource, string? json)
    {
        StatusCode = statusCode;
        Resource = resource;
        Json = json;
    }

    public int StatusCode { get; }

    int? IStatusCodeHttpResult.StatusCode => StatusCode;

    public Resource? Resource { get; }

    public string? Json { get; }

    public string? ETag { get; private init; }

    public DateTimeOffset? LastModified { get; private init; }

    public string? Location { get; private init; }

    /// <summary>Further response headers (Content-Location, X-Progress, Retry-After of the asynchronous pattern).</summary>
    public IReadOnlyList<KeyValuePair<string, string>> Headers { get; private init; } = [];

    public static FhirResult Of(int statusCode, Resource resource) => new(statusCode, resource, null);

    public static FhirResult Empty(int statusCode) => new(statusCode, null, null);

    /// <summary>A stored version; the body is left out when <paramref name="withBody"/> is false (Prefer: return=minimal).</summary>
    public static FhirResult Stored(int statusCode, StoredResource stored, bool withBody = true, bool withLocation = false) =>
        new(statusCode, null, withBody ? stored.Json : null)
        {
            ETag = ETags.Of(stored.VersionId),
            LastModified = stored.LastUpdated,
            Location = withLocation ? $"{stored.ResourceType}/{stored.Id}/_history/{stored.VersionId.ToString(CultureInfo.InvariantCulture)}" : null,
        };

    public static FhirResult Outcome(IReadOnlyList<FhirIssue> issues) => Outcome(OperationOutcomes.StatusOf(issues), issues);

    public static FhirResult Outcome(int statusCode, IReadOnlyList<FhirIssue> issues) => new(statusCode, OperationOutcomes.From(issues), null);

    public static FhirResult Outcome(FhirIssue issue) => Outcome([issue]);

    /// <summary>The same response carrying version headers of <paramref name="stored"/> (a 410 names the deletion's version).</summary>
    public FhirResult WithVersionOf(StoredResource stored) =>
        new(StatusCode, Resource, Json) { ETag = ETags.Of(stored.VersionId), LastModified = stored.LastUpdated, Location = Location, Headers = Headers };

    /// <summary>The same response with one more header.</summary>
    public FhirResult WithHeader(string name, string value) =>
        new(StatusCode, Resource, Json) { ETag = ETag, LastModified = LastModified, Location = Location, Headers = [.. Headers, new(name, value)] };

    public async System.Threading.Tasks.Task ExecuteAsync(HttpContext httpContext)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        var response = httpContext.Response;
        response.StatusCode = StatusCode;
        foreach (var (name, value) in Headers)
        {
            response.Headers[name] = value;
        }

        if (ETag is not null)
        {
            response.Headers.ETag = ETag;
        }

        if (LastModified is { } lastModified)
        {
            response.Headers.LastModified = lastModified.ToUniversalTime().ToString("R", CultureInfo.InvariantCulture);
        }

        if (Location is not null)
        {
            var request = httpContext.Request;
            response.Headers.Location = $"{request.Scheme}://{request.Host}{request.PathBase}/{Location}";
        }

        if (Resource is null && Json is null)
        {
            return;
        }

        var format = FhirFormat.Of(httpContext);
        response.ContentType = format.MediaType + "; charset=utf-8";
        // Relaxed escaping keeps ', & and + readable; the body is JSON, never embedded in HTML.
        var options = new JsonWriterOptions { Indented = format.Pretty, SkipValidation = !format.Pretty, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };
        await using (var writer = new Utf8JsonWriter(response.BodyWriter, options))
        {
            if (Resource is not null)
            {
                FhirJson.Serializer.Serialize(Resource, writer);
            }
            else if (format.Pretty)
            {
                using var document = JsonDocument.Parse(Json!);
                document.WriteTo(writer);
            }
            else
            {
                writer.WriteRawValue(Encoding.UTF8.GetBytes(Json!), skipInputValidation: true);
            }
        }

        await response.BodyWriter.FlushAsync(httpContext.RequestAborted);
    }
}
