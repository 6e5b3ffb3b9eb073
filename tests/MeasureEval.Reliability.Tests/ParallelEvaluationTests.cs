using System.Net;
using MeasureEval.Reliability.Tests.Support;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Hosting;
using Microsoft.Data.Sqlite;

namespace MeasureEval.Reliability.Tests;

/// <summary>Evaluation on several threads (Evaluation:Workers) answers exactly what one thread answers, over the same store.</summary>
public sealed class ParallelEvaluationTests : IDisposable
{
    private readonly string _directory = Directory.CreateTempSubdirectory("measureeval-parallel-").FullName;

    [Fact]
    public async Task Workers_FourAgainstOne_SameReportsAndSameGapRowsInOrder()
    {
        using var factory = new ReliabilityApiFactory();
        using var parallel = factory.WithWebHostBuilder(b => b.UseSetting("Evaluation:Workers", "4"));
        using var loader = Admin(parallel);
        await SyntheticPopulation.IngestAsync(loader, 600, Path.Combine(_directory, "ndjson"));
        var parallelAnswers = await AnswersAsync(loader);
        using var serial = factory.WithWebHostBuilder(b => b.UseSetting("Evaluation:Workers", "1"));
        using var client = Admin(serial);
        var serialAnswers = await AnswersAsync(client);

        Assert.True(serialAnswers[0].Split("\r\n").Length > 600, "the export should hold many rows");
        Assert.Equal(serialAnswers[0], parallelAnswers[0]);
        Assert.Equal(AsyncPoller.Normalized(serialAnswers[1]), AsyncPoller.Normalized(parallelAnswers[1]));
        Assert.Equal(AsyncPoller.Normalized(serialAnswers[2]), AsyncPoller.Normalized(parallelAnswers[2]));
    }

    private static HttpClient Admin(Microsoft.AspNetCore.Mvc.Testing.WebApplicationFactory<Program> host)
    {
        var client = host.CreateClient();
        client.DefaultRequestHeaders.Authorization = TestTokens.Header("admin");
        return client;
    }

    /// <summary>Every gap of every measure as CSV (rows in patient order), a population and a subject-list report.</summary>
    private static async Task<string[]> AnswersAsync(HttpClient client)
    {
        string[] requests =
        [
            "Measure/$care-gaps-export?periodStart=2026-01-01&periodEnd=2026-12-31&status=open-gap&status=closed-gap&status=prospective-gap&status=not-applicable&_format=csv",
            "Measure/colorectal-cancer-screening/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31",
            "Measure/diabetes-a1c-above-9/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31&reportType=subject-list",
        ];
        var answers = new string[requests.Length];
        for (var i = 0; i < requests.Length; i++)
        {
            using var response = await client.GetAsync(new Uri(requests[i], UriKind.Relative));
            answers[i] = await response.Content.ReadAsStringAsync();
            Assert.True(response.StatusCode == HttpStatusCode.OK, $"{requests[i]}: {(int)response.StatusCode} {answers[i]}");
        }

        return answers;
    }

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(_directory, recursive: true);
    }
}
