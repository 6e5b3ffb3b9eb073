using MeasureEval.Api.Audit;
using MeasureEval.Api.Security;
using MeasureEval.Api.Tests.Support;
using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;

namespace MeasureEval.Api.Tests.Audit;

/// <summary>Every route that writes or reads patient data is audited (read from the app's own route table).</summary>
public sealed class AuditRoutesTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    [Fact]
    public void TryGet_EveryWriteOrPatientDataRoute_IsListed()
    {
        var audited = new[] { AccessPolicies.Write, AccessPolicies.PatientData, AccessPolicies.Manage };
        var endpoints = factory.Services.GetRequiredService<EndpointDataSource>().Endpoints.OfType<RouteEndpoint>().ToList();
        var names = endpoints
            .Where(e => e.Metadata.GetOrderedMetadata<IAuthorizeData>().Any(a => audited.Contains(a.Policy)))
            .Select(e => e.Metadata.GetMetadata<IEndpointNameMetadata>()?.EndpointName ?? e.RoutePattern.RawText)
            .ToList();

        Assert.True(names.Count >= 20, $"only {names.Count} routes found");
        Assert.All(names, n => Assert.True(AuditRoutes.TryGet(n, out _), $"route {n} is not audited"));
        var mapped = endpoints.Select(e => e.Metadata.GetMetadata<IEndpointNameMetadata>()?.EndpointName).ToHashSet();
        Assert.All(AuditRoutes.Names, n => Assert.Contains(n, mapped));
    }
}
