using System.Globalization;
using System.Net;
using System.Text.Json;
using System.Text.Json.Nodes;
using System.Text.RegularExpressions;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>One answer of the status URL.</summary>
public sealed record PollAnswer(HttpStatusCode Status, string? Progress, string? RetryAfter, string? ContentType, string Body);

/// <summary>Client side of the FHIR asynchronous pattern (R4 async.html): kick-off, polling, and result normalisation.</summary>
public static partial class AsyncPoller
{
    /// <summary>Sends the request with <c>Prefer: respond-async</c>; asserts 202, an OperationOutcome body and Content-Location; returns that URL.</summary>
    public static async Task<Uri> KickOffAsync(HttpClient client, HttpRequestMessage request)
    {
        ArgumentNullException.ThrowIfNull(client);
        ArgumentNullException.ThrowIfNull(request);
        request.Headers.TryAddWithoutValidation("Prefer", "respond-async");
        using var response = await client.SendAsync(request);
        var body = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.Accepted, $"kick-off: {(int)response.StatusCode} {body}");
        Assert.Equal("OperationOutcome", JsonNode.Parse(body)!["resourceType"]!.GetValue<string>());
        Assert.Contains("MEV-JOB-002", body, StringComparison.Ordinal);
        var location = response.Content.Headers.ContentLocation ?? (response.Headers.TryGetValues("Content-Location", out var values) ? new Uri(values.Single()) : null);
        Assert.NotNull(location);
        Assert.Matches("/jobs/[0-9a-f]{32}$", location.ToString());
        return location;
    }

    public static async Task<PollAnswer> PollOnceAsync(HttpClient client, Uri status)
    {
        ArgumentNullException.ThrowIfNull(client);
        using var response = await client.GetAsync(status);
        return new PollAnswer(
            response.StatusCode,
            response.Headers.TryGetValues("X-Progress", out var progress) ? progress.Single() : null,
            response.Headers.RetryAfter?.Delta?.TotalSeconds.ToString(CultureInfo.InvariantCulture),
            response.Content.Headers.ContentType?.ToString(),
            await response.Content.ReadAsStringAsync());
    }

    /// <summary>Polls until the answer is not 202 (or the timeout passes); returns every 202 seen and the final answer.</summary>
    public static async Task<(List<PollAnswer> Running, PollAnswer Final)> PollUntilDoneAsync(HttpClient client, Uri status, TimeSpan timeout)
    {
        var running = new List<PollAnswer>();
        var deadline = DateTime.UtcNow + timeout;
        while (true)
        {
            var answer = await PollOnceAsync(client, status);
            if (answer.Status != HttpStatusCode.Accepted)
            {
                return (running, answer);
            }

            running.Add(answer);
            Assert.True(DateTime.UtcNow < deadline, $"job still running after {timeout}: {answer.Progress}");
            await Task.Delay(200);
        }
    }

    /// <summary>Done and total of an X-Progress value "1,234 of 2,000 patients", or null for another form ("queued").</summary>
    public static (long Done, long Total)? Parse(string? progress)
    {
        var match = progress is null ? null : ProgressPattern().Match(progress);
        return match is { Success: true }
            ? (long.Parse(match.Groups[1].Value, NumberStyles.AllowThousands, CultureInfo.InvariantCulture), long.Parse(match.Groups[2].Value, NumberStyles.AllowThousands, CultureInfo.InvariantCulture))
            : null;
    }

    /// <summary>A Bundle of MeasureReports (or one MeasureReport) without what differs between two runs: ids, fullUrls and dates.</summary>
    public static string Normalized(string json)
    {
        var root = JsonNode.Parse(json)!.AsObject();
        Strip(root);
        foreach (var entry in root["entry"]?.AsArray() ?? [])
        {
            entry!.AsObject().Remove("fullUrl");
            Strip(entry["resource"]!.AsObject());
        }

        return root.ToJsonString(new JsonSerializerOptions { WriteIndented = true });

        static void Strip(JsonObject resource)
        {
            resource.Remove("id");
            resource.Remove("date");
        }
    }

    [GeneratedRegex("^([0-9][0-9,]*) of ([0-9][0-9,]*) patients$")]
    private static partial Regex ProgressPattern();
}
