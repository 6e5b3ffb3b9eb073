using Microsoft.AspNetCore.Builder;
using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.OpenApi;

public static class OpenApiSetup
{
    public const string DocumentName = "v1";

    public static IServiceCollection AddMeasureEvalOpenApi(this IServiceCollection services)
    {
        services.AddEndpointsApiExplorer();
        services.AddSwaggerGen();
        return services;
    }

    public static WebApplication UseMeasureEvalOpenApi(this WebApplication app)
    {
        app.UseSwagger();
        app.UseSwaggerUI();
        return app;
    }
}
