using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Fhir;

/// <summary>The parts of the RFC 7240 <c>Prefer</c> header that FHIR defines.</summary>
public sealed record FhirPrefer(string? Return, bool StrictHandling)
{
    public static FhirPrefer Of(HttpRequest request)
    {
        string? returnPreference = null;
        var strict = false;
        foreach (var header in request.Headers["Prefer"])
        {
            foreach (var part in (header ?? "").Split([',', ';'], StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
            {
                var eq = part.IndexOf('=', StringComparison.Ordinal);
                if (eq < 0)
                {
                    continue;
                }

                var name = part[..eq].Trim();
                var value = part[(eq + 1)..].Trim().Trim('"');
                if (name.Equals("return", StringComparison.OrdinalIgnoreCase))
                {
                    returnPreference = value;
                }
                else if (name.Equals("handling", StringComparison.OrdinalIgnoreCase))
                {
                    strict = value.Equals("strict", StringComparison.OrdinalIgnoreCase);
                }
            }
        }

        return new FhirPrefer(returnPreference, strict);
    }

    public bool WantsRepresentation(bool byDefault) => Return switch
    {
        "representation" => true,
        "minimal" or "OperationOutcome" => false,
        _ => byDefault,
    };
}
