using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using MeasureEval.Api.Security;

namespace MeasureEval.Api.Capabilities;

public static class CapabilityEndpoints
{
    public static IEndpointRouteBuilder MapCapabilityEndpoints(this IEndpointRouteBuilder app)
    {
        app.MapGet("/metadata", GetCapabilityStatement)
            .WithTags("Capabilities")
            .WithName("capabilities").AllowAnonymous()
            .WithSummary("The CapabilityStatement: what this server implements")
            .WithFhir([], [200], 406);
        return app;
    }

    public static FhirResult GetCapabilityStatement(HttpRequest request, CapabilityStatementBuilder builder) =>
        FhirResult.Of(StatusCodes.Status200OK, builder.Build(FhirBaseUrl.Of(request)));
}
