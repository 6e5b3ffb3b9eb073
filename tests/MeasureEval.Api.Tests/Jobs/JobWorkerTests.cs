using System.Net;
using MeasureEval.Api.Tests.Support;

namespace MeasureEval.Api.Tests.Jobs;

/// <summary>The worker in-process: a finished job is deleted once its retention has passed, as its Expires said.</summary>
public sealed class JobWorkerTests : IClassFixture<JobWorkerTests.ShortRetention>
{
    private const string Evaluate = "/Measure/influenza-vaccination/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31";

    private readonly ShortRetention _factory;

    public JobWorkerTests(ShortRetention factory) => _factory = factory;

    [Fact]
    public async Task CleanUp_FinishedJobPastRetention_StatusUrlAnswersUnknown()
    {
        using var client = _factory.CreateClient();
        using var kickOff = new HttpRequestMessage(HttpMethod.Get, Evaluate);
        kickOff.Headers.TryAddWithoutValidation("Prefer", "respond-async");
        var before = DateTimeOffset.UtcNow;
        using var accepted = await client.SendAsync(kickOff);
        Assert.Equal(HttpStatusCode.Accepted, accepted.StatusCode);
        var status = accepted.Content.Headers.ContentLocation!;

        var deadline = DateTime.UtcNow.AddSeconds(60);
        HttpResponseMessage answer;
        while ((answer = await client.GetAsync(status)).StatusCode == HttpStatusCode.Accepted)
        {
            Assert.True(DateTime.UtcNow < deadline, "the job did not finish within 60 s");
            await Task.Delay(100);
        }

        Assert.Equal(HttpStatusCode.OK, answer.StatusCode);
        // Expires (RFC 9111 §5.3, an HTTP-date, whole seconds): when the job ended plus Jobs:Retention (2 s here).
        var expires = answer.Content.Headers.Expires;
        Assert.NotNull(expires);
        Assert.InRange(expires.Value, before.AddSeconds(1), DateTimeOffset.UtcNow.AddSeconds(3));
        answer.Dispose();

        HttpResponseMessage gone;
        while ((gone = await client.GetAsync(status)).StatusCode == HttpStatusCode.OK)
        {
            Assert.True(DateTime.UtcNow < deadline, "the job was not deleted within 60 s");
            await Task.Delay(200);
        }

        Assert.True(DateTimeOffset.UtcNow >= expires.Value.AddSeconds(-1), "deleted before its Expires");
        Assert.Equal(HttpStatusCode.NotFound, gone.StatusCode);
        Assert.Contains("MEV-JOB-001", await gone.Content.ReadAsStringAsync(), StringComparison.Ordinal);
        gone.Dispose();
    }

    public sealed class ShortRetention : ApiFactory
    {
        protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?>
        {
            ["Jobs:Retention"] = "00:00:02",
            ["Jobs:PollInterval"] = "00:00:00.100",
        };
    }
}
