using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using System.Text.Json.Nodes;

namespace MeasureEval.Cluster.Tests.Hosting;

/// <summary>
/// Real node processes (the Api binary) on loopback: Redis membership, one shared store (a SQLite file, read by both
/// nodes; PostgreSQL is the deployment store), a fresh cluster id per run, 1 s probes so a killed node is declared dead in seconds.
/// </summary>
public sealed class ClusterEvaluationTests : IDisposable
{
    private const string Query = "Measure/diabetes-a1c-above-9/$evaluate-measure?periodStart=2025-01-01&periodEnd=2025-12-31&reportType=subject-list";
    private readonly string _root = FindRoot();
    private readonly string _temp = Directory.CreateTempSubdirectory("cluster-test").FullName;
    private readonly List<Process> _processes = [];
    private readonly HttpClient _http = new() { Timeout = TimeSpan.FromSeconds(120) };

    [SkippableFact]
    public async Task SummarizeAsync_TwoNodesAndAKilledNodeGiveTheSingleNodeReport()
    {
        Skip.IfNot(File.Exists("/usr/bin/redis-server"), "redis-server is not installed (apt-get install redis-server)");
        var redisPort = FreePort();
        Start("/usr/bin/redis-server", $"--port {redisPort} --bind 127.0.0.1 --save \"\" --appendonly no --dir {_temp}", []);
        var store = $"Data Source={Path.Combine(_temp, "store.db")}";
        var single = FreePort();
        var singleNode = StartNode(single, store, null);
        await WaitReadyAsync(single);
        foreach (var bundle in Directory.GetFiles(Path.Combine(_root, "fhir-bundles/demo"), "bundle-*.json").Order(StringComparer.Ordinal))
        {
            using var content = new StringContent(await File.ReadAllTextAsync(bundle), System.Text.Encoding.UTF8, "application/fhir+json");
            (await _http.PostAsync(new Uri($"http://127.0.0.1:{single}/"), content)).EnsureSuccessStatusCode();
        }

        var expected = await ReportAsync(single);
        singleNode.Kill(entireProcessTree: true);

        var clusterId = $"test-{Guid.NewGuid():N}";
        var nodes = new[] { FreePort(), FreePort() };
        var processes = nodes.Select(port => StartNode(port, store, (clusterId, redisPort))).ToArray();
        foreach (var port in nodes)
        {
            await WaitReadyAsync(port);
        }

        Assert.Equal(expected, await ReportAsync(nodes[0]));
        // Partitions ran on every node: each node logs the partitions it evaluated.
        foreach (var port in nodes)
        {
            Assert.Contains("evaluated on this node", await File.ReadAllTextAsync(Path.Combine(_temp, $"node-{port}.log")), StringComparison.Ordinal);
        }

        var running = ReportAsync(nodes[0]);
        await Task.Delay(300);
        processes[1].Kill(entireProcessTree: true);
        Assert.Equal(expected, await running);
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

        _http.Dispose();
        Directory.Delete(_temp, recursive: true);
    }

    private async Task<string> ReportAsync(int port)
    {
        var report = JsonNode.Parse(await _http.GetStringAsync(new Uri($"http://127.0.0.1:{port}/{Query}")))!.AsObject();
        report.Remove("id");
        report.Remove("date");
        return report.ToJsonString();
    }

    private Process StartNode(int port, string store, (string ClusterId, int RedisPort)? cluster)
    {
        // Nodes bind loopback only, where the service allows auth to be switched off; the test is about evaluation, not tokens.
        var environment = new Dictionary<string, string> { ["Storage__ConnectionString"] = store, ["Auth__Disabled"] = "true" };
        if (cluster is { } c)
        {
            environment["Cluster__Enabled"] = "true";
            environment["Cluster__ClusterId"] = c.ClusterId;
            environment["Cluster__RedisConnectionString"] = $"127.0.0.1:{c.RedisPort}";
            environment["Cluster__SiloPort"] = FreePort().ToString(System.Globalization.CultureInfo.InvariantCulture);
            environment["Cluster__ProbeTimeout"] = "00:00:01";
            environment["Cluster__MissedProbesLimit"] = "2";
            environment["Cluster__VotesForDeathDeclaration"] = "1";
            environment["Cluster__TableRefreshTimeout"] = "00:00:02";
        }

        var dll = Path.Combine(_root, "src/MeasureEval.Api/bin/Debug/net10.0/MeasureEval.Api.dll");
        return Start("dotnet", $"{dll} --urls http://127.0.0.1:{port}", environment, Path.Combine(_temp, $"node-{port}.log"));
    }

    private Process Start(string file, string arguments, Dictionary<string, string> environment, string? log = null)
    {
        var info = new ProcessStartInfo(file, arguments) { WorkingDirectory = _root, RedirectStandardOutput = true, RedirectStandardError = true };
        foreach (var (key, value) in environment)
        {
            info.Environment[key] = value;
        }

        var process = Process.Start(info)!;
        var writer = log is null ? null : new StreamWriter(log) { AutoFlush = true };
        process.OutputDataReceived += (_, e) => { lock (_processes) { writer?.WriteLine(e.Data); } };
        process.ErrorDataReceived += (_, e) => { lock (_processes) { writer?.WriteLine(e.Data); } };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        _processes.Add(process);
        return process;
    }

    private async Task WaitReadyAsync(int port)
    {
        for (var i = 0; i < 120; i++)
        {
            try
            {
                if ((await _http.GetAsync(new Uri($"http://127.0.0.1:{port}/Measure"))).IsSuccessStatusCode)
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

        throw new TimeoutException($"node on port {port} did not start");
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private static string FindRoot()
    {
        var directory = new DirectoryInfo(AppContext.BaseDirectory);
        while (!File.Exists(Path.Combine(directory!.FullName, "MeasureEval.sln")))
        {
            directory = directory.Parent;
        }

        return directory.FullName;
    }
}
