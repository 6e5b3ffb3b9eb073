using System.Diagnostics;
using System.Net;
using System.Net.Sockets;

namespace MeasureEval.Reliability.Tests.Support;

/// <summary>The built MeasureEval.Api.dll run as its own process on a free loopback port, so that it can be killed for real.</summary>
public sealed class ServiceProcess : IDisposable
{
    private readonly Process _process;

    private ServiceProcess(Process process, Uri baseAddress)
    {
        _process = process;
        BaseAddress = baseAddress;
    }

    public Uri BaseAddress { get; }

    /// <summary>The one place a client of the process gets its address (and, with auth on, its credentials).</summary>
    public HttpClient Client() => new() { BaseAddress = BaseAddress, Timeout = TimeSpan.FromSeconds(60) };

    public static Task<ServiceProcess> StartAsync(string databasePath) => StartAsync(databasePath, new Dictionary<string, string>());

    /// <summary>As above, with more settings as environment variables (<c>Jobs__PatientDelay</c>, …).</summary>
    public static async Task<ServiceProcess> StartAsync(string databasePath, IReadOnlyDictionary<string, string> settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var port = FreePort();
        var start = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = RepositoryRoot.Path,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.ArgumentList.Add(ApiDll());
        start.ArgumentList.Add("--urls");
        start.ArgumentList.Add($"http://127.0.0.1:{port}");
        start.Environment["Storage__Provider"] = "Sqlite";
        start.Environment["Storage__ConnectionString"] = $"Data Source={databasePath}";
        // Loopback only: the service refuses this switch on any other address.
        start.Environment["Auth__Disabled"] = "true";
        start.Environment["ASPNETCORE_ENVIRONMENT"] = "Production";
        foreach (var (key, value) in settings)
        {
            start.Environment[key] = value;
        }

        var process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start");
        // Drain the pipes so that a chatty log never blocks the service.
        process.OutputDataReceived += (_, _) => { };
        process.ErrorDataReceived += (_, _) => { };
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        var service = new ServiceProcess(process, new Uri($"http://127.0.0.1:{port}/"));
        await service.WaitReadyAsync();
        return service;
    }

    public void Kill()
    {
        // SIGKILL: no shutdown hooks, no flush — what a crash or an OOM kill does.
        _process.Kill(entireProcessTree: true);
        _process.WaitForExit();
    }

    public void Dispose()
    {
        if (!_process.HasExited)
        {
            Kill();
        }

        _process.Dispose();
    }

    private async Task WaitReadyAsync()
    {
        using var client = Client();
        var deadline = Stopwatch.StartNew();
        while (deadline.Elapsed < TimeSpan.FromSeconds(60))
        {
            if (_process.HasExited)
            {
                throw new InvalidOperationException($"The service exited with code {_process.ExitCode} before it was ready.");
            }

            try
            {
                using var response = await client.GetAsync(new Uri("health/ready", UriKind.Relative));
                if (response.StatusCode == HttpStatusCode.OK)
                {
                    return;
                }
            }
            catch (HttpRequestException)
            {
                // Not listening yet.
            }

            await Task.Delay(100);
        }

        throw new TimeoutException("The service was not ready within 60 s.");
    }

    private static string ApiDll()
    {
        // The test binary sits in tests/X/bin/<Configuration>/<tfm>/; the service was built beside it in the same configuration.
        var output = new DirectoryInfo(AppContext.BaseDirectory.TrimEnd(Path.DirectorySeparatorChar));
        var dll = Path.Combine(RepositoryRoot.Path, "src", "MeasureEval.Api", "bin", output.Parent!.Name, output.Name, "MeasureEval.Api.dll");
        return File.Exists(dll) ? dll : throw new FileNotFoundException("Build src/MeasureEval.Api first", dll);
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }
}
