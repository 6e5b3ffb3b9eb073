using Microsoft.AspNetCore.Authorization;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace MeasureEval.Api.OpenApi;

/// <summary>
/// Declares the bearer JWT requirement on every operation that needs a token (all but the anonymous ones), with the
/// answers every such operation can give: 401, 403 and 429, each an OperationOutcome.
/// </summary>
public sealed class BearerSecurityFilter : IOperationFilter
{
    public const string SchemeName = "bearer";

    public static OpenApiSecurityScheme Scheme { get; } = new()
    {
        Type = SecuritySchemeType.Http,
        Scheme = "bearer",
        BearerFormat = "JWT",
        Description = "A JWT from the configured issuer (HS256 development key or OpenID Connect RS256) with claims sub, role (ingest, analyst, payer, admin) and, for payers, payer.",
    };

    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        ArgumentNullException.ThrowIfNull(operation);
        ArgumentNullException.ThrowIfNull(context);
        var metadata = context.ApiDescription.ActionDescriptor.EndpointMetadata;
        if (metadata.OfType<IAllowAnonymous>().Any())
        {
            return;
        }

        operation.Security ??= [];
        operation.Security.Add(new OpenApiSecurityRequirement { [new OpenApiSecuritySchemeReference(SchemeName, context.Document)] = [] });
        var policies = string.Join(", ", metadata.OfType<IAuthorizeData>().Select(a => a.Policy).OfType<string>().Distinct());
        operation.Responses ??= [];
        operation.Responses.TryAdd("401", new OpenApiResponse { Description = "No valid bearer token (OperationOutcome MEV-AUTH-001)" });
        operation.Responses.TryAdd("403", new OpenApiResponse { Description = $"The token's role is outside policy '{policies}' (OperationOutcome MEV-AUTH-002)" });
        operation.Responses.TryAdd("429", new OpenApiResponse { Description = "Too many requests from this client this minute; see Retry-After (OperationOutcome MEV-LIMIT-002)" });
    }
}
