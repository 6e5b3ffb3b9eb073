using System.Net;
using System.Net.Http.Headers;
using MeasureEval.Synthetic.Output;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>A synthetic population (src/MeasureEval.Synthetic, fixed seed) written as NDJSON and loaded through $ingest.</summary>
public static class SyntheticPopulation
{
    /// <summary>Generates <paramref name="patients"/> patients into <paramref name="directory"/> and posts every file to $ingest; returns the resources stored.</summary>
    public static async Task<long> IngestAsync(HttpClient client, int patients, string directory)
    {
        ArgumentNullException.ThrowIfNull(client);
        var summary = NdjsonPopulationWriter.Write(
            new PopulationGenerator(new PopulationOptions { Patients = patients, Seed = 20261201, AsOf = new DateOnly(2026, 11, 30) }), directory);
        foreach (var file in summary.Files)
        {
            using var content = new StreamContent(File.OpenRead(Path.Combine(directory, file)));
            content.Headers.ContentType = MediaTypeHeaderValue.Parse("application/fhir+ndjson");
            using var response = await client.PostAsync(new Uri("$ingest", UriKind.Relative), content);
            Assert.True(response.StatusCode == HttpStatusCode.OK, $"$ingest {file}: {(int)response.StatusCode} {await response.Content.ReadAsStringAsync()}");
        }

        return summary.TotalResources;
    }
}
