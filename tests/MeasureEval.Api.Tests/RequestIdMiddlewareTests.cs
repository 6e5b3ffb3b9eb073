using MeasureEval.Api.Tests.Support;

namespace MeasureEval.Api.Tests;

public sealed class RequestIdMiddlewareTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    private readonly HttpClient _client = factory.CreateClient();

    [Fact]
    public async System.Threading.Tasks.Task Invoke_ClientId_Echoed()
    {
        using var request = new HttpRequestMessage(HttpMethod.Get, "/health/live");
        request.Headers.Add("X-Request-Id", "ehr-batch-42.7");

        var response = await _client.SendAsync(request);

        Assert.Equal("ehr-batch-42.7", response.Headers.GetValues("X-Request-Id").Single());
    }

    [Fact]
    public async System.Threading.Tasks.Task Invoke_UnsafeOrMissingId_Generated()
    {
        using var request = new HttpRequestMessage(HttpMethod.Get, "/metadata");
        request.Headers.TryAddWithoutValidation("X-Request-Id", "name=Jane Doe");

        var unsafeResponse = await _client.SendAsync(request);
        var missingResponse = await _client.GetAsync("/metadata");

        var generated = unsafeResponse.Headers.GetValues("X-Request-Id").Single();
        Assert.Matches("^[0-9a-f]{32}$", generated);
        Assert.Matches("^[0-9a-f]{32}$", missingResponse.Headers.GetValues("X-Request-Id").Single());
    }
}
