using MeasureEval.Api.Tests.Support;
using Microsoft.AspNetCore.Hosting;

namespace MeasureEval.Api.Tests;

public sealed class ProductionApiFactory : ApiFactory
{
    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        base.ConfigureWebHost(builder);
        builder.UseEnvironment("Production");
    }
}

/// <summary>The pipeline outside development: HSTS on HTTPS answers.</summary>
public sealed class ApiApplicationExtensionsTests(ProductionApiFactory factory) : IClassFixture<ProductionApiFactory>
{
    [Fact]
    public async System.Threading.Tasks.Task UseMeasureEvalApi_ProductionOverHttps_SendsHsts()
    {
        // Not a loopback name: the HSTS middleware leaves localhost out (ASP.NET Core HstsOptions.ExcludedHosts).
        using var client = factory.CreateClient(new() { BaseAddress = new Uri("https://measureeval.example.org/") });

        using var response = await client.GetAsync(new Uri("/metadata", UriKind.Relative));

        // RFC 6797 §6.1: Strict-Transport-Security: max-age=<seconds>; 365 days = 31536000 s.
        Assert.Equal("max-age=31536000", response.Headers.GetValues("Strict-Transport-Security").Single());
    }
}
