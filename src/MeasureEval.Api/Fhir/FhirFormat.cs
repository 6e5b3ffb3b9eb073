using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Fhir;

/// <summary>How to write the response, as negotiated from <c>_format</c>, <c>Accept</c> and <c>_pretty</c>.</summary>
public sealed record FhirFormat(string MediaType, bool Pretty)
{
    public const string FhirJson = "application/fhir+json";
    public const string Json = "application/json";
    public const string FhirNdjson = "application/fhir+ndjson";
    public const string Ndjson = "application/x-ndjson";
    public const string FormUrlEncoded = "application/x-www-form-urlencoded";

    private const string ItemKey = "MeasureEval.FhirFormat";

    public static FhirFormat Default { get; } = new(FhirJson, false);

    /// <summary>The negotiated format, or the default (with <c>_pretty</c> honoured) before negotiation ran or when it failed.</summary>
    public static FhirFormat Of(HttpContext context) =>
        context.Items.TryGetValue(ItemKey, out var value) && value is FhirFormat format
            ? format
            : Default with { Pretty = PrettyRequested(context.Request) };

    public void StoreIn(HttpContext context) => context.Items[ItemKey] = this;

    public static bool PrettyRequested(HttpRequest request) =>
        string.Equals(request.Query["_pretty"].ToString(), "true", StringComparison.OrdinalIgnoreCase);
}
