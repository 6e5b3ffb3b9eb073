using System.Text;
using Microsoft.AspNetCore.Authentication;
using Microsoft.AspNetCore.Authentication.JwtBearer;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Options;
using Microsoft.IdentityModel.Tokens;

namespace MeasureEval.Api.Security;

public static class SecurityServiceCollectionExtensions
{
    /// <summary>Bearer JWT (HS256 key or OpenID Connect authority), the role policies, and the loopback guard for disabled auth.</summary>
    public static IServiceCollection AddMeasureEvalSecurity(this IServiceCollection services)
    {
        ArgumentNullException.ThrowIfNull(services);
        services.AddOptions<AuthOptions>().BindConfiguration(AuthOptions.Section).ValidateOnStart();
        services.AddSingleton<IValidateOptions<AuthOptions>, AuthOptionsValidator>();
        services.AddHostedService<LoopbackGuard>();
        services.AddAuthentication()
            .AddJwtBearer()
            .AddScheme<AuthenticationSchemeOptions, DisabledAuthenticationHandler>(DisabledAuthenticationHandler.SchemeName, null);
        services.AddOptions<AuthenticationOptions>().Configure<IOptions<AuthOptions>>((o, auth) =>
        {
            o.DefaultScheme = auth.Value.Disabled ? DisabledAuthenticationHandler.SchemeName : JwtBearerDefaults.AuthenticationScheme;
        });
        services.AddOptions<JwtBearerOptions>(JwtBearerDefaults.AuthenticationScheme).Configure<IOptions<AuthOptions>>((o, options) =>
        {
            var auth = options.Value;
            o.MapInboundClaims = false;
            o.Authority = string.IsNullOrWhiteSpace(auth.Authority) ? null : auth.Authority;
            o.TokenValidationParameters = new TokenValidationParameters
            {
                ValidateIssuer = true,
                ValidIssuer = auth.Issuer,
                ValidateAudience = true,
                ValidAudience = auth.Audience,
                ValidateLifetime = true,
                RequireExpirationTime = true,
                ClockSkew = TimeSpan.FromSeconds(30),
                NameClaimType = "sub",
                RoleClaimType = AccessPolicies.RoleClaim,
                ValidAlgorithms = o.Authority is null ? [SecurityAlgorithms.HmacSha256] : [SecurityAlgorithms.RsaSha256],
                IssuerSigningKey = string.IsNullOrWhiteSpace(auth.SigningKey) ? null : new SymmetricSecurityKey(Convert.FromBase64String(auth.SigningKey)),
            };
        });
        services.AddAuthorization(AccessPolicies.Add);
        return services;
    }
}
