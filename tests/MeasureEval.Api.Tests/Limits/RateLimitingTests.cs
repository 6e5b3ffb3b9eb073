using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Testing;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests.Limits;

public sealed class TinyRateLimitApiFactory : ApiFactory
{
    public const int PerMinute = 3;

    protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?> { ["Limits:RequestsPerMinute"] = PerMinute.ToString(System.Globalization.CultureInfo.InvariantCulture) };
}

/// <summary>Requests per client per minute, partitioned by token subject.</summary>
public sealed class RateLimitingTests(TinyRateLimitApiFactory factory) : IClassFixture<TinyRateLimitApiFactory>
{
    [Fact]
    public async System.Threading.Tasks.Task GlobalLimiter_OverTheLimit_Answers429WithRetryAfter()
    {
        var client = factory.CreateClient();
        client.DefaultRequestHeaders.Authorization = new("Bearer", TestTokens.Mint("analyst", subject: "rate-one"));
        var other = factory.CreateClient();
        other.DefaultRequestHeaders.Authorization = new("Bearer", TestTokens.Mint("analyst", subject: "rate-two"));

        var statuses = new List<HttpStatusCode>();
        HttpResponseMessage? refused = null;
        for (var i = 0; i <= TinyRateLimitApiFactory.PerMinute; i++)
        {
            var response = await client.GetAsync("/Patient?_count=1");
            statuses.Add(response.StatusCode);
            refused = response;
        }

        var otherClient = await other.GetAsync("/Patient?_count=1");
        var metadata = new List<HttpStatusCode>();
        for (var i = 0; i < TinyRateLimitApiFactory.PerMinute + 2; i++)
        {
            metadata.Add((await client.GetAsync("/metadata")).StatusCode);
        }

        Assert.Equal([.. Enumerable.Repeat(HttpStatusCode.OK, TinyRateLimitApiFactory.PerMinute), HttpStatusCode.TooManyRequests], statuses);
        // RFC 9110 §10.2.3: Retry-After as delay-seconds; a one-minute window never asks for more than 60.
        var retryAfter = refused!.Headers.RetryAfter?.Delta;
        Assert.NotNull(retryAfter);
        Assert.InRange(retryAfter.Value.TotalSeconds, 1, 60);
        var outcome = await ReadAsync<OperationOutcome>(refused);
        Assert.Equal(OperationOutcome.IssueType.Throttled, Issue(outcome, "MEV-LIMIT-002").Code);
        Assert.Equal(HttpStatusCode.OK, otherClient.StatusCode);
        Assert.All(metadata, s => Assert.Equal(HttpStatusCode.OK, s));
        // The refusal itself is not audited (nothing was read); the three searches are.
        var audited = await ReadAsync<Bundle>(await factory.CreateClient().GetAsync("/AuditEvent?agent=rate-one"));
        Assert.Equal(TinyRateLimitApiFactory.PerMinute, audited.Total);
    }
}
