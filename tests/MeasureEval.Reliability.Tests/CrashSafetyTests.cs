using System.Globalization;
using System.Net;
using System.Text.Json;
using MeasureEval.Reliability.Tests.Support;
using Microsoft.Data.Sqlite;
using Xunit.Abstractions;

namespace MeasureEval.Reliability.Tests;

/// <summary>SIGKILL of the real service while transactions are posted: after a restart each transaction is wholly there or wholly absent.</summary>
public sealed class CrashSafetyTests(ITestOutputHelper output) : IDisposable
{
    private const int ObservationsPerTransaction = 9;
    private readonly string _directory = Directory.CreateTempSubdirectory("measureeval-crash-").FullName;

    [Fact]
    public async Task KillDuringTransactions_EveryTransactionWhollyPresentOrAbsent()
    {
        // 20 rounds in CI; SOAK_ROUNDS=500 for a soak run.
        var rounds = int.TryParse(Environment.GetEnvironmentVariable("SOAK_ROUNDS"), CultureInfo.InvariantCulture, out var soak) ? soak : 20;
        var seed = int.TryParse(Environment.GetEnvironmentVariable("CRASH_SEED"), CultureInfo.InvariantCulture, out var given) ? given : Environment.TickCount;
        output.WriteLine($"CRASH_SEED={seed} rounds={rounds}");
        var random = new Random(seed);
        var database = Path.Combine(_directory, "store.db");
        var attempted = new List<string>();
        var confirmed = new HashSet<string>();
        for (var round = 0; round < rounds; round++)
        {
            using var service = await ServiceProcess.StartAsync(database);
            // The round before was cut off by a kill: its transactions are checked right after the restart that recovers them.
            var previous = attempted.Where(p => p.StartsWith($"crash-r{round - 1}-", StringComparison.Ordinal)).ToList();
            await CheckAllAsync(service, previous, confirmed, seed, round);
            using var client = service.Client();
            var killAfter = TimeSpan.FromMilliseconds(random.Next(50, 1200));
            using var stop = new CancellationTokenSource();
            var posting = PostLoopAsync(client, round, attempted, confirmed, stop.Token);
            await Task.Delay(killAfter);
            service.Kill();
            await stop.CancelAsync();
            await posting;
        }

        using var last = await ServiceProcess.StartAsync(database);
        await CheckAllAsync(last, attempted, confirmed, seed, rounds);
        output.WriteLine($"transactions attempted {attempted.Count}, acknowledged {confirmed.Count}");
        Assert.NotEmpty(confirmed);
    }

    private static async Task PostLoopAsync(HttpClient client, int round, List<string> attempted, HashSet<string> confirmed, CancellationToken cancellationToken)
    {
        for (var n = 0; !cancellationToken.IsCancellationRequested; n++)
        {
            var prefix = $"crash-r{round}-t{n}";
            attempted.Add(prefix);
            try
            {
                using var response = await client.PostAsync(new Uri("/", UriKind.Relative), Bundles.Content(Bundles.PutTransaction(prefix, ObservationsPerTransaction)), cancellationToken);
                Assert.True(response.StatusCode == HttpStatusCode.OK, $"{prefix}: {(int)response.StatusCode}");
                confirmed.Add(prefix);
            }
            catch (Exception e) when (e is HttpRequestException or OperationCanceledException or IOException)
            {
                // The kill cut the connection: this transaction's fate is what the check after restart decides.
                return;
            }
        }
    }

    private static async Task CheckAllAsync(ServiceProcess service, List<string> attempted, HashSet<string> confirmed, int seed, int round)
    {
        using var client = service.Client();
        foreach (var prefix in attempted)
        {
            var ids = string.Join(",", Enumerable.Range(0, ObservationsPerTransaction).Select(k => $"{prefix}-o{k}"));
            var observations = await TotalAsync(client, $"Observation?_id={ids}&_count=0");
            var patients = await TotalAsync(client, $"Patient?_id={prefix}&_count=0");
            var whole = (patients, observations) is (1, ObservationsPerTransaction) or (0, 0);
            Assert.True(whole, $"seed {seed}, before round {round}: {prefix} partly stored (patients {patients}, observations {observations})");
            Assert.True(!confirmed.Contains(prefix) || patients == 1, $"seed {seed}, before round {round}: acknowledged {prefix} lost");
        }
    }

    private static async Task<int> TotalAsync(HttpClient client, string query)
    {
        using var response = await client.GetAsync(new Uri(query, UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        using var json = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        return json.RootElement.GetProperty("total").GetInt32();
    }

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(_directory, recursive: true);
    }
}
