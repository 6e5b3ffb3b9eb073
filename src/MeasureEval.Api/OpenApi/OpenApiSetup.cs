using Microsoft.AspNetCore.Builder;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.OpenApi;

namespace MeasureEval.Api.OpenApi;

/// <summary>Swagger UI at <c>/swagger</c>; the document at <c>/swagger/v1/swagger.json</c> and <c>.yaml</c> (the repository's openapi.yaml).</summary>
public static class OpenApiSetup
{
    public const string DocumentName = "v1";

    public static IServiceCollection AddMeasureEvalOpenApi(this IServiceCollection services)
    {
        services.AddEndpointsApiExplorer();
        services.AddSwaggerGen(options =>
        {
            options.SwaggerDoc(DocumentName, new OpenApiInfo
            {
                Title = "MeasureEval FHIR R4 API",
                Version = DocumentName,
                Description = "FHIR R4 (4.0.1) REST interactions, transactions, bulk $ingest and quality measure operations. Errors are OperationOutcomes with stable MEV-* codes.",
            });
            options.OperationFilter<FhirOperationFilter>();
            options.AddSecurityDefinition(BearerSecurityFilter.SchemeName, BearerSecurityFilter.Scheme);
            // After the FHIR filter, which sets the responses afresh.
            options.OperationFilter<BearerSecurityFilter>();
        });
        return services;
    }

    public static WebApplication UseMeasureEvalOpenApi(this WebApplication app)
    {
        app.UseSwagger();
        app.UseSwaggerUI(options => options.SwaggerEndpoint($"/swagger/{DocumentName}/swagger.json", "MeasureEval FHIR R4 API"));
        return app;
    }
}
