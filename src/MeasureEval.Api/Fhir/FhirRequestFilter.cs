using MeasureEval.Api.Errors;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.Primitives;
using Microsoft.Net.Http.Headers;

namespace MeasureEval.Api.Fhir;

/// <summary>
/// Runs before every FHIR handler: picks the response format (<c>_format</c> over <c>Accept</c>), refuses other FHIR
/// versions, checks the body's media type and that the <c>{type}</c> in the URL is an R4 resource type.
/// </summary>
public sealed class FhirRequestFilter : IEndpointFilter
{
    private static readonly string[] SupportedVersions = ["4.0", "4.0.1"];

    public async ValueTask<object?> InvokeAsync(EndpointFilterInvocationContext context, EndpointFilterDelegate next)
    {
        ArgumentNullException.ThrowIfNull(context);
        ArgumentNullException.ThrowIfNull(next);
        var http = context.HttpContext;
        var issues = new List<FhirIssue>();
        if (TryNegotiate(http.Request, issues, out var format))
        {
            format.StoreIn(http);
        }

        var metadata = http.GetEndpoint()?.Metadata.GetMetadata<FhirEndpointMetadata>();
        if (issues.Count == 0 && metadata is not null && HasBody(http.Request))
        {
            CheckContentType(http.Request, metadata.RequestMediaTypes, issues);
        }

        if (issues.Count == 0 && http.Request.RouteValues.TryGetValue("type", out var type) && !FhirResourceTypes.IsKnown(type as string))
        {
            issues.Add(new FhirIssue(ErrorCatalogue.UnknownResourceType, $"'{type}' is not a FHIR R4 resource type."));
        }

        return issues.Count > 0 ? FhirResult.Outcome(issues) : await next(context);
    }

    private static bool HasBody(HttpRequest request) =>
        request.ContentLength > 0 || (request.ContentLength is null && request.Headers.TransferEncoding.Count > 0);

    private static bool TryNegotiate(HttpRequest request, List<FhirIssue> issues, out FhirFormat format)
    {
        var pretty = FhirFormat.PrettyRequested(request);
        format = FhirFormat.Default with { Pretty = pretty };
        var formatParameter = request.Query["_format"].ToString();
        if (formatParameter.Length > 0)
        {
            var chosen = formatParameter.Trim().ToLowerInvariant() switch
            {
                "json" or FhirFormat.FhirJson or "application/json+fhir" => FhirFormat.FhirJson,
                FhirFormat.Json => FhirFormat.Json,
                _ => null,
            };
            if (chosen is null)
            {
                issues.Add(new FhirIssue(ErrorCatalogue.NotAcceptable, $"_format '{formatParameter}' is not supported; use json, application/fhir+json or application/json.", "_format"));
                return false;
            }

            format = new FhirFormat(chosen, pretty);
            return true;
        }

        var accept = request.Headers.Accept;
        if (StringValues.IsNullOrEmpty(accept) || !MediaTypeHeaderValue.TryParseList(accept, out var ranges) || ranges.Count == 0)
        {
            return true;
        }

        foreach (var range in ranges.OrderByDescending(r => r.Quality ?? 1.0))
        {
            if (range.Quality == 0)
            {
                continue;
            }

            var mediaType = range.MediaType.Value?.ToLowerInvariant();
            string? chosen = mediaType switch
            {
                FhirFormat.FhirJson or "application/json+fhir" or "*/*" or "application/*" => FhirFormat.FhirJson,
                FhirFormat.Json => FhirFormat.Json,
                _ => null,
            };
            if (chosen is null)
            {
                continue;
            }

            if (FhirVersionOf(range) is { } version && !SupportedVersions.Contains(version))
            {
                issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedFhirVersionAccept, $"This server answers in FHIR R4 (fhirVersion=4.0) only, not fhirVersion={version}."));
                return false;
            }

            format = new FhirFormat(chosen, pretty);
            return true;
        }

        issues.Add(new FhirIssue(ErrorCatalogue.NotAcceptable, $"None of the Accept media types can be produced; use {FhirFormat.FhirJson} or {FhirFormat.Json}."));
        return false;
    }

    private static void CheckContentType(HttpRequest request, IReadOnlyList<string> accepted, List<FhirIssue> issues)
    {
        if (accepted.Count == 0)
        {
            return;
        }

        if (!MediaTypeHeaderValue.TryParse(request.ContentType, out var contentType))
        {
            issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedMediaType, $"A Content-Type is required: one of {string.Join(", ", accepted)}."));
            return;
        }

        var mediaType = contentType.MediaType.Value ?? "";
        if (!accepted.Contains(mediaType, StringComparer.OrdinalIgnoreCase))
        {
            issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedMediaType, $"Content-Type '{mediaType}' is not accepted here; use one of {string.Join(", ", accepted)}."));
            return;
        }

        if (FhirVersionOf(contentType) is { } version && !SupportedVersions.Contains(version))
        {
            issues.Add(new FhirIssue(ErrorCatalogue.UnsupportedFhirVersionContent, $"This server accepts FHIR R4 (fhirVersion=4.0) only, not fhirVersion={version}."));
        }
    }

    private static string? FhirVersionOf(MediaTypeHeaderValue value) =>
        value.Parameters.FirstOrDefault(p => p.Name.Equals("fhirVersion", StringComparison.OrdinalIgnoreCase))?.Value.Value?.Trim('"');
}
