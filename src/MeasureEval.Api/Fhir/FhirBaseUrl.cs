using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Fhir;

public static class FhirBaseUrl
{
    /// <summary>The service base (scheme, host, path base) that relative FHIR URLs resolve against.</summary>
    public static string Of(HttpRequest request)
    {
        ArgumentNullException.ThrowIfNull(request);
        return $"{request.Scheme}://{request.Host}{request.PathBase}";
    }
}
