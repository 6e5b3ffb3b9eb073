using System.Diagnostics;
using System.Globalization;
using System.Text.Json.Nodes;
using Hl7.Fhir.Model;
using MeasureEval.Cluster.Hosting;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using MeasureEval.Storage;
using MeasureEval.Testing;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Xunit.Abstractions;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Cluster.Tests.Hosting;

/// <summary>
/// Real node processes (the Api binary) on loopback: a throwaway PostgreSQL as the one shared store, Redis membership,
/// three nodes with a fresh cluster id per run and 1 s probes so a killed node is declared dead in seconds.
/// </summary>
public sealed class ClusterEvaluationTests(PostgresServer postgres, ITestOutputHelper output) : IClassFixture<PostgresServer>, IDisposable
{
    // The demo population is shaped for the 2026 measurement year (fhir-bundles/demo/README.md).
    private const string Query = "Measure/diabetes-a1c-above-9/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31&reportType=subject-list";
    private const int Partitions = 64;
    private const int NodeCount = 3;
    private readonly NodeProcesses _nodes = new();

    [SkippableFact]
    public async Task SummarizeAsync_ThreeNodesOnPostgresAndAKilledNodeGiveTheSingleNodeReport()
    {
        Skip.IfNot(postgres.IsAvailable, postgres.UnavailableReason);
        Skip.IfNot(File.Exists(NodeProcesses.RedisServer), "redis-server is not installed (apt-get install redis-server)");
        var store = await postgres.CreateSchemaAsync();
        var redisPort = _nodes.StartRedis();

        var single = _nodes.StartNode(store, cluster: null);
        await _nodes.WaitReadyAsync(single);
        await _nodes.LoadDemoAsync(single);
        var (expected, _) = await _nodes.ReportAsync(single, Query);
        Assert.True(InitialPopulation(expected) > 0, "the demo population must give the measure something to count");
        _nodes.Kill(single);

        // Every partition holds 2 s after it has started, so the kill below lands while the victim's partitions are in flight
        // (the margin covers the log reaching this process on a loaded machine).
        var cluster = new ClusterSettings($"test-{Guid.NewGuid():N}", redisPort, Partitions, TimeSpan.FromSeconds(2));
        var nodes = Enumerable.Range(0, NodeCount).Select(_ => _nodes.StartNode(store, cluster)).ToArray();
        foreach (var node in nodes)
        {
            await _nodes.WaitReadyAsync(node);
        }

        // The receiving node learns of the others' joins by gossip and table refresh (2 s here): ask until it places on all three.
        Dictionary<int, int> placed = [];
        for (var attempt = 0; attempt < 20 && placed.Count < NodeCount; attempt++)
        {
            var (report, headers) = await _nodes.ReportAsync(nodes[0], Query);
            Assert.Equal(expected, report);
            Assert.Equal("0", headers.Retries);
            placed = PartitionsBySiloPort(headers.PartitionsByNode);
            Assert.Equal(Partitions, placed.Values.Sum());
            output.WriteLine($"run {attempt}: {headers.PartitionsByNode}");
        }

        // Partitions ran on every node, spread round-robin by partition number (PartitionSpreadPlacement, our rule):
        // 64 over 3 nodes is 22 + 21 + 21.
        Assert.Equal(nodes.Select(n => n.SiloPort).Order(), placed.Keys.Order());
        Assert.Equal([21, 21, 22], placed.Values.Order());

        var victim = nodes[2];
        var startedBefore = _nodes.CountInLog(victim, "started on this node");
        var running = _nodes.ReportAsync(nodes[0], Query);
        await _nodes.WaitForLogAsync(victim, "started on this node", startedBefore + 1);
        _nodes.Kill(victim);

        var stopwatch = Stopwatch.StartNew();
        var (afterKill, killHeaders) = await running;
        output.WriteLine($"after the kill: {killHeaders.PartitionsByNode}; retries {killHeaders.Retries}; completed {stopwatch.Elapsed.TotalSeconds:F1} s after the kill");
        Assert.Equal(expected, afterKill);
        var survivors = PartitionsBySiloPort(killHeaders.PartitionsByNode);
        Assert.Equal(Partitions, survivors.Values.Sum());
        Assert.DoesNotContain(victim.SiloPort, survivors.Keys);

        // Each of the victim's partitions failed at least once and ran again on a survivor.
        Assert.True(
            int.Parse(killHeaders.Retries!, CultureInfo.InvariantCulture) >= placed[victim.SiloPort],
            $"retries {killHeaders.Retries}, partitions on the killed node {placed[victim.SiloPort]}");
    }

    [SkippableFact]
    public async Task SummarizeAsync_WithProgress_CountsPartitionsUpToTheTotalAndMatchesOneNode()
    {
        Skip.IfNot(postgres.IsAvailable, postgres.UnavailableReason);
        Skip.IfNot(File.Exists(NodeProcesses.RedisServer), "redis-server is not installed (apt-get install redis-server)");
        var repository = MeasureRepository.Load(Path.Combine(NodeProcesses.FindRoot(), "measures"), out _);
        var builder = Host.CreateApplicationBuilder();
        builder.Configuration.AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Storage:Provider"] = "Postgres",
            ["Storage:ConnectionString"] = await postgres.CreateSchemaAsync(),
            ["Cluster:Enabled"] = "true",
            ["Cluster:ClusterId"] = $"test-{Guid.NewGuid():N}",
            ["Cluster:RedisConnectionString"] = $"127.0.0.1:{_nodes.StartRedis()}",
            ["Cluster:SiloPort"] = NodeProcesses.FreePort().ToString(CultureInfo.InvariantCulture),
            ["Cluster:Partitions"] = "16",
        });
        builder.Logging.ClearProviders();
        builder.Services.AddMeasureEvalStorage();
        builder.AddMeasureEvalCluster((_, _) => Task.FromResult(repository));
        using var host = builder.Build();
        await host.StartAsync();
        var store = host.Services.GetRequiredService<IResourceStore>();
        await using (var session = await store.BeginWriteAsync(default))
        {
            for (var i = 0; i < 40; i++)
            {
                var patient = new Patient { Id = $"p{i}", Gender = i % 2 == 0 ? AdministrativeGender.Female : AdministrativeGender.Male, BirthDate = $"{1950 + i}-03-01" };
                await session.UpdateAsync(patient, null, default);
            }

            await session.CommitAsync(default);
        }

        var measures = repository.Measures.ToArray();
        var period = new MeasurementPeriod(new DateOnly(2026, 1, 1), new DateOnly(2026, 12, 31));
        var progress = new RecordingProgress();

        var (summaries, run) = await host.Services.GetRequiredService<ClusterEvaluation>().SummarizeAsync(measures, period, null, null, false, DataScope.Unrestricted, progress);

        var single = await new PopulationEvaluator(new MeasureEvaluator(repository, new StoreRecordSource(store)))
            .SummarizeAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default), measures, period, false, default);
        Assert.Equal(single.Select(s => (s.PatientsEvaluated, s.Counts.ToCounts())), summaries.Select(s => (s.PatientsEvaluated, s.Counts.ToCounts())), new CountsComparer());
        Assert.All(summaries, s => Assert.Equal(40, s.PatientsEvaluated));
        Assert.Equal(16, run.PartitionSilos.Count);
        var reports = progress.Reports;
        Assert.Equal(new EvaluationProgress(0, 16, "partitions"), reports[0]);
        Assert.Equal(new EvaluationProgress(16, 16, "partitions"), reports[^1]);
        Assert.Equal(reports.Select(r => r.Done).Order(), reports.Select(r => r.Done));
        await host.StopAsync();
    }

    public void Dispose() => _nodes.Dispose();

    /// <summary>Records synchronously (Progress&lt;T&gt; would post to the thread pool and may report after the call returned).</summary>
    private sealed class RecordingProgress : IProgress<EvaluationProgress>
    {
        private readonly List<EvaluationProgress> _reports = [];

        public IReadOnlyList<EvaluationProgress> Reports
        {
            get
            {
                lock (_reports)
                {
                    return [.. _reports];
                }
            }
        }

        public void Report(EvaluationProgress value)
        {
            lock (_reports)
            {
                _reports.Add(value);
            }
        }
    }

    private sealed class CountsComparer : IEqualityComparer<(int, int[])>
    {
        public bool Equals((int, int[]) x, (int, int[]) y) => x.Item1 == y.Item1 && x.Item2.SequenceEqual(y.Item2);

        public int GetHashCode((int, int[]) obj) => obj.Item1;
    }

    private static int InitialPopulation(string report) =>
        JsonNode.Parse(report)!["group"]![0]!["population"]!.AsArray()
            .Single(p => (string?)p!["code"]!["coding"]![0]!["code"] == "initial-population")!["count"]!.GetValue<int>();

    /// <summary>Parses <c>X-Partitions-By-Node</c> (<c>ip:port@generation=count, …</c>) into silo port → partitions.</summary>
    private static Dictionary<int, int> PartitionsBySiloPort(string? header)
    {
        Assert.NotNull(header);
        return header.Split(", ").Select(part => part.Split('=')).ToDictionary(
            kv => int.Parse(kv[0].Split('@')[0].Split(':')[^1], CultureInfo.InvariantCulture),
            kv => int.Parse(kv[1], CultureInfo.InvariantCulture));
    }
}

internal sealed record ClusterSettings(string ClusterId, int RedisPort, int Partitions, TimeSpan PartitionStartDelay);

internal sealed record Node(Process Process, int HttpPort, int SiloPort, string Log);

internal sealed record ClusterResponseHeaders(string? PartitionsByNode, string? Retries);

/// <summary>Starts redis-server and Api node processes in a temporary folder; kills what it started on dispose.</summary>
internal sealed class NodeProcesses : IDisposable
{
    public const string RedisServer = "/usr/bin/redis-server";

    private readonly string _root = FindRoot();
    private readonly string _temp = Directory.CreateTempSubdirectory("cluster-test").FullName;
    private readonly List<Process> _processes = [];
    private readonly List<StreamWriter> _logs = [];
    private readonly HttpClient _http = new() { Timeout = TimeSpan.FromSeconds(120) };

    public int StartRedis()
    {
        var port = FreePort();
        Start(RedisServer, $"--port {port} --bind 127.0.0.1 --save \"\" --appendonly no --dir {_temp}", [], Path.Combine(_temp, "redis.log"));
        return port;
    }

    public Node StartNode(string postgresConnectionString, ClusterSettings? cluster)
    {
        var httpPort = FreePort();
        var siloPort = FreePort();

        // Nodes bind loopback only, where the service allows auth to be switched off; the test is about evaluation, not tokens.
        var environment = new Dictionary<string, string>
        {
            ["Storage__Provider"] = "Postgres",
            ["Storage__ConnectionString"] = postgresConnectionString,
            ["Auth__Disabled"] = "true",
        };
        if (cluster is not null)
        {
            environment["Cluster__Enabled"] = "true";
            environment["Cluster__ClusterId"] = cluster.ClusterId;
            environment["Cluster__RedisConnectionString"] = $"127.0.0.1:{cluster.RedisPort}";
            environment["Cluster__SiloPort"] = siloPort.ToString(CultureInfo.InvariantCulture);
            environment["Cluster__Partitions"] = cluster.Partitions.ToString(CultureInfo.InvariantCulture);
            environment["Cluster__PartitionStartDelay"] = cluster.PartitionStartDelay.ToString("c", CultureInfo.InvariantCulture);

            // Seconds, not Orleans' defaults: 1 s probes, 2 missed, 1 vote declare a dead node in about 3 s.
            environment["Cluster__ProbeTimeout"] = "00:00:01";
            environment["Cluster__MissedProbesLimit"] = "2";
            environment["Cluster__VotesForDeathDeclaration"] = "1";
            environment["Cluster__TableRefreshTimeout"] = "00:00:02";
        }

        var dll = Path.Combine(_root, "src/MeasureEval.Api/bin/Debug/net10.0/MeasureEval.Api.dll");
        var log = Path.Combine(_temp, $"node-{httpPort}.log");
        var process = Start("dotnet", $"{dll} --urls http://127.0.0.1:{httpPort}", environment, log);
        return new Node(process, httpPort, siloPort, log);
    }

    public async Task LoadDemoAsync(Node node)
    {
        foreach (var bundle in Directory.GetFiles(Path.Combine(_root, "fhir-bundles/demo"), "bundle-*.json").Order(StringComparer.Ordinal))
        {
            using var content = new StringContent(await File.ReadAllTextAsync(bundle), System.Text.Encoding.UTF8, "application/fhir+json");
            (await _http.PostAsync(new Uri($"http://127.0.0.1:{node.HttpPort}/"), content)).EnsureSuccessStatusCode();
        }
    }

    /// <summary>The report without id and date (the only parts allowed to differ), and the cluster headers.</summary>
    public async Task<(string Report, ClusterResponseHeaders Headers)> ReportAsync(Node node, string query)
    {
        using var response = await _http.GetAsync(new Uri($"http://127.0.0.1:{node.HttpPort}/{query}"));
        var body = await response.Content.ReadAsStringAsync();
        Assert.True(response.IsSuccessStatusCode, $"{(int)response.StatusCode}: {body}");
        var report = JsonNode.Parse(body)!.AsObject();
        report.Remove("id");
        report.Remove("date");
        return (report.ToJsonString(), new ClusterResponseHeaders(Header(response, "X-Partitions-By-Node"), Header(response, "X-Partition-Retries")));
    }

    /// <summary>SIGKILL (what <see cref="Process.Kill(bool)"/> sends on Unix): no shutdown, no goodbye to the cluster.</summary>
    public void Kill(Node node)
    {
        node.Process.Kill(entireProcessTree: true);
        node.Process.WaitForExit();
    }

    public int CountInLog(Node node, string text)
    {
        lock (_processes)
        {
            var log = File.ReadAllText(node.Log);
            var count = 0;
            for (var at = log.IndexOf(text, StringComparison.Ordinal); at >= 0; at = log.IndexOf(text, at + text.Length, StringComparison.Ordinal))
            {
                count++;
            }

            return count;
        }
    }

    public async Task WaitForLogAsync(Node node, string text, int count)
    {
        var stopwatch = Stopwatch.StartNew();
        while (CountInLog(node, text) < count)
        {
            Assert.True(stopwatch.Elapsed < TimeSpan.FromSeconds(60), $"'{text}' did not appear {count} times in {node.Log}");
            await Task.Delay(20);
        }
    }

    public async Task WaitReadyAsync(Node node)
    {
        for (var i = 0; i < 240; i++)
        {
            Assert.False(node.Process.HasExited, $"node on port {node.HttpPort} exited: {File.ReadAllText(node.Log)}");
            try
            {
                if ((await _http.GetAsync(new Uri($"http://127.0.0.1:{node.HttpPort}/health/ready"))).IsSuccessStatusCode)
                {
                    return;
                }
            }
            catch (HttpRequestException)
            {
                // not listening yet
            }

            await Task.Delay(500);
        }

        throw new TimeoutException($"node on port {node.HttpPort} did not start");
    }

    public void Dispose()
    {
        foreach (var process in _processes)
        {
            if (!process.HasExited)
            {
                process.Kill(entireProcessTree: true);
                process.WaitForExit();
            }

            process.Dispose();
        }

        foreach (var log in _logs)
        {
            log.Dispose();
        }

        _http.Dispose();
        Directory.Delete(_temp, recursive: true);
    }

    private static string? Header(HttpResponseMessage response, string name) =>
        response.Headers.TryGetValues(name, out var values) ? string.Join(", ", values) : null;

    private Process Start(string file, string arguments, Dictionary<string, string> environment, string log)
    {
        var info = new ProcessStartInfo(file, arguments) { WorkingDirectory = _root, RedirectStandardOutput = true, RedirectStandardError = true };
        foreach (var (key, value) in environment)
        {
            info.Environment[key] = value;
        }

        var process = Process.Start(info)!;
        var writer = new StreamWriter(log) { AutoFlush = true };
        _logs.Add(writer);
        process.OutputDataReceived += (_, e) => { lock (_processes) { writer.WriteLine(e.Data); } };
        process.ErrorDataReceived += (_, e) => { lock (_processes) { writer.WriteLine(e.Data); } };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        _processes.Add(process);
        return process;
    }

    public static int FreePort()
    {
        using var listener = new System.Net.Sockets.TcpListener(System.Net.IPAddress.Loopback, 0);
        listener.Start();
        return ((System.Net.IPEndPoint)listener.LocalEndpoint).Port;
    }

    public static string FindRoot()
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (!File.Exists(Path.Combine(directory!.FullName, "MeasureEval.sln")))
        {
            directory = directory.Parent;
        }

        return directory.FullName;
    }
}
