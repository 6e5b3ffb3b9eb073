using System.Globalization;
using System.Net;
using MeasureEval.Reliability.Tests.Support;
using Xunit.Abstractions;

namespace MeasureEval.Reliability.Tests;

/// <summary>Malformed and mutated bundles against the transaction and bulk ingest paths: never a 5xx, never a partial transaction.</summary>
public sealed class IngestFuzzTests(ReliabilityApiFactory factory, ITestOutputHelper output) : IClassFixture<ReliabilityApiFactory>
{
    [Fact]
    public async Task MutatedBundles_No5xxAndNoPartialTransaction()
    {
        var cases = int.TryParse(Environment.GetEnvironmentVariable("FUZZ_CASES"), CultureInfo.InvariantCulture, out var n) ? n : 5000;
        var seed = int.TryParse(Environment.GetEnvironmentVariable("FUZZ_SEED"), CultureInfo.InvariantCulture, out var given) ? given : Environment.TickCount;
        output.WriteLine($"FUZZ_SEED={seed} cases={cases}");
        using var client = factory.Client();
        var statuses = new SortedDictionary<int, int>();
        for (var i = 0; i < cases; i++)
        {
            // One random source per case, so that a failing case replays alone from (seed, case).
            var random = new Random(HashCode.Combine(seed, i));
            var prefix = $"fuzz-{i}";
            var body = BundleMutator.Mutate(Bundles.PutTransaction(prefix, 1 + random.Next(3)), random);
            var path = random.Next(5) == 0 ? "$ingest" : "/";
            using var response = await client.PostAsync(new Uri(path, UriKind.Relative), Bundles.Content(body));
            var status = (int)response.StatusCode;
            statuses[status] = statuses.GetValueOrDefault(status) + 1;
            Assert.True(status < 500, $"FUZZ_SEED={seed} case {i} ({path}): {status} for body {Convert.ToBase64String(body)}");
            if (path == "/" && status != 200)
            {
                // A refused transaction stores nothing, whichever of its entries were still well-formed.
                using var read = await client.GetAsync(new Uri($"Observation/{prefix}-o0", UriKind.Relative));
                Assert.True(read.StatusCode == HttpStatusCode.NotFound, $"FUZZ_SEED={seed} case {i}: refused transaction ({status}) left Observation/{prefix}-o0 stored");
                using var patient = await client.GetAsync(new Uri($"Patient/{prefix}", UriKind.Relative));
                Assert.True(patient.StatusCode == HttpStatusCode.NotFound, $"FUZZ_SEED={seed} case {i}: refused transaction ({status}) left Patient/{prefix} stored");
            }
        }

        output.WriteLine("statuses: " + string.Join(", ", statuses.Select(kv => $"{kv.Key}×{kv.Value}")));
    }
}
