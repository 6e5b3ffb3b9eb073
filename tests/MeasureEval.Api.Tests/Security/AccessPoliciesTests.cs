using System.Net;
using System.Net.Http.Headers;
using MeasureEval.Api.Security;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Core.Security;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Tests.Security;

/// <summary>Every route of the running app (read from its EndpointDataSource, so a new route cannot escape) against bad and wrong-role tokens.</summary>
public sealed class AccessPoliciesTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private static readonly string[] Roles = [AccessPolicies.IngestRole, AccessPolicies.AnalystRole, AccessPolicies.PayerRole, AccessPolicies.AdminRole];

    [Fact]
    public async Task Add_BadTokensOnEveryProtectedRoute_Answer401()
    {
        var routes = ProtectedRoutes();
        Assert.True(routes.Count >= 20, $"only {routes.Count} routes found");
        var other = DevelopmentTokens.NewSigningKey();
        var badTokens = new Dictionary<string, string?>
        {
            ["none"] = null,
            ["expired"] = Token(TestTokens.SigningKey, TestTokens.Issuer, TestTokens.Audience, TimeSpan.FromHours(-1)),
            ["wrong issuer"] = Token(TestTokens.SigningKey, "https://elsewhere.example.org", TestTokens.Audience, TimeSpan.FromHours(1)),
            ["wrong audience"] = Token(TestTokens.SigningKey, TestTokens.Issuer, "another-service", TimeSpan.FromHours(1)),
            ["bad signature"] = Token(other, TestTokens.Issuer, TestTokens.Audience, TimeSpan.FromHours(1)),
        };
        var failures = new List<string>();
        foreach (var (method, path, _) in routes)
        {
            foreach (var (name, token) in badTokens)
            {
                var status = await SendAsync(method, path, token is null ? null : new AuthenticationHeaderValue("Bearer", token));
                if (status != HttpStatusCode.Unauthorized)
                {
                    failures.Add($"{method} {path} with {name} token: {(int)status}");
                }
            }
        }

        Assert.Empty(failures);
    }

    [Fact]
    public async Task Add_RolesOutsideEachRoutesPolicy_Answer403()
    {
        var allowed = new Dictionary<string, string[]>
        {
            [AccessPolicies.Write] = [AccessPolicies.IngestRole, AccessPolicies.AdminRole],
            [AccessPolicies.PatientData] = [AccessPolicies.AnalystRole, AccessPolicies.PayerRole, AccessPolicies.AdminRole],
            [AccessPolicies.Definitions] = Roles,
            [AccessPolicies.Manage] = [AccessPolicies.AdminRole],
        };
        var failures = new List<string>();
        foreach (var (method, path, policy) in ProtectedRoutes())
        {
            Assert.True(policy is not null && allowed.ContainsKey(policy), $"{method} {path} has no role policy");
            foreach (var role in Roles)
            {
                var status = await SendAsync(method, path, TestTokens.Header(role, role == AccessPolicies.PayerRole ? "cedar-valley" : null));
                var expectForbidden = !allowed[policy!].Contains(role);
                if ((status == HttpStatusCode.Forbidden) != expectForbidden || status == HttpStatusCode.Unauthorized)
                {
                    failures.Add($"{method} {path} as {role}: {(int)status}");
                }
            }
        }

        Assert.Empty(failures);
    }

    [Theory]
    [InlineData("/metadata")]
    [InlineData("/health/live")]
    [InlineData("/health/ready")]
    public async Task Add_PublicEndpoints_AnswerWithoutToken(string path)
    {
        Assert.Equal(HttpStatusCode.OK, await SendAsync("GET", path, null));
    }

    [Fact]
    public async Task Add_AnyAnswer_CarriesSecurityHeaders()
    {
        using var client = factory.CreateClient();
        using var response = await client.GetAsync(new Uri("/metadata", UriKind.Relative));

        // OWASP Secure Headers Project (common practice values).
        Assert.Equal("nosniff", response.Headers.GetValues("X-Content-Type-Options").Single());
        Assert.Equal("DENY", response.Headers.GetValues("X-Frame-Options").Single());
        Assert.Equal("no-referrer", response.Headers.GetValues("Referrer-Policy").Single());
    }

    private async Task<HttpStatusCode> SendAsync(string method, string path, AuthenticationHeaderValue? auth)
    {
        using var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = auth;
        using var request = new HttpRequestMessage(new HttpMethod(method), path);
        if (method is "POST" or "PUT")
        {
            request.Content = new StringContent("{}", new MediaTypeHeaderValue("application/fhir+json"));
        }

        using var response = await client.SendAsync(request);
        return response.StatusCode;
    }

    private List<(string Method, string Path, string? Policy)> ProtectedRoutes()
    {
        var source = factory.Services.GetRequiredService<EndpointDataSource>();
        var routes = new List<(string, string, string?)>();
        foreach (var endpoint in source.Endpoints.OfType<RouteEndpoint>())
        {
            if (endpoint.Metadata.GetMetadata<IAllowAnonymous>() is not null)
            {
                continue;
            }

            var path = "/" + (endpoint.RoutePattern.RawText ?? "").TrimStart('/')
                .Replace("{type}", "Patient", StringComparison.Ordinal)
                .Replace("{id}", "no-such-id", StringComparison.Ordinal)
                .Replace("{vid}", "1", StringComparison.Ordinal);
            var policy = endpoint.Metadata.GetOrderedMetadata<IAuthorizeData>().Select(a => a.Policy).LastOrDefault(p => p is not null);
            foreach (var method in endpoint.Metadata.GetMetadata<Microsoft.AspNetCore.Routing.HttpMethodMetadata>()?.HttpMethods ?? ["GET"])
            {
                routes.Add((method, path, policy));
            }
        }

        return routes;
    }

    private static string Token(string key, string issuer, string audience, TimeSpan lifetime) =>
        DevelopmentTokens.Mint(new TokenRequest(key, issuer, audience, "test-analyst", AccessPolicies.AnalystRole, null, lifetime), TimeProvider.System);
}
