using System.Net;

namespace MeasureEval.Api.Tests.Support;

/// <summary>The client side of the FHIR async pattern (R4 async.html): kick off with "Prefer: respond-async", poll the status URL.</summary>
public static class AsyncPolling
{
    /// <summary>
    /// Kicks off a GET asynchronously, asserts 202 with a Content-Location, and polls that status URL until it stops
    /// answering 202 (60 s at most): the final answer and the status URL.
    /// </summary>
    public static async Task<(HttpResponseMessage Answer, Uri Status)> KickOffAndWaitAsync(HttpClient client, string url)
    {
        ArgumentNullException.ThrowIfNull(client);
        using var kickOff = new HttpRequestMessage(HttpMethod.Get, url);
        kickOff.Headers.TryAddWithoutValidation("Prefer", "respond-async");
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

        return (answer, status);
    }
}
