using MeasureEval.Api.Fhir;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Errors;

/// <summary>Answers the routing layer's empty 404/405 with an OperationOutcome, so every error is FHIR.</summary>
public static class StatusCodeOutcomes
{
    public static IApplicationBuilder UseFhirStatusCodeOutcomes(this IApplicationBuilder app) =>
        app.UseStatusCodePages(async context =>
        {
            var http = context.HttpContext;
            var code = http.Response.StatusCode switch
            {
                StatusCodes.Status404NotFound => ErrorCatalogue.NoSuchEndpoint,
                StatusCodes.Status405MethodNotAllowed => ErrorCatalogue.MethodNotAllowed,
                StatusCodes.Status401Unauthorized => ErrorCatalogue.Unauthenticated,
                StatusCodes.Status403Forbidden => ErrorCatalogue.Forbidden,
                _ => null,
            };
            if (code is not null)
            {
                var issue = new FhirIssue(code, code.HttpStatus is 404 or 405 ? $"{http.Request.Method} is not implemented at this path." : code.Title);
                await FhirResult.Outcome(code.HttpStatus, [issue]).ExecuteAsync(http);
            }
        });
}
