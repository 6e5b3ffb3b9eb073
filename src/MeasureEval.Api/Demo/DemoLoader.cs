using MeasureEval.Api.Bundles;
using MeasureEval.Core.Fhir;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.Extensions.Options;
using Bundle = Hl7.Fhir.Model.Bundle;

namespace MeasureEval.Api.Demo;

/// <summary>
/// Posts the demo transaction bundles through the ordinary transaction path once the service has started, then
/// logs where to look first. The demo bundles use PUT with fixed ids, so loading them again changes nothing.
/// </summary>
public sealed partial class DemoLoader(
    IOptions<DemoOptions> options,
    BundleProcessor processor,
    IServer server,
    IHostApplicationLifetime lifetime,
    IHostEnvironment environment,
    ILogger<DemoLoader> logger) : BackgroundService
{
    /// <summary>Completes when the demo has been loaded (or failed to load); tests wait on it.</summary>
    public Task<bool> Loaded => _loaded.Task;

    private readonly TaskCompletionSource<bool> _loaded = new(TaskCreationOptions.RunContinuationsAsynchronously);

    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        if (!options.Value.Load)
        {
            _loaded.TrySetResult(false);
            return;
        }

        try
        {
            await WaitForStartAsync(stoppingToken);
            var loaded = await LoadAsync(stoppingToken);
            _loaded.TrySetResult(loaded);
        }
        catch (OperationCanceledException) when (stoppingToken.IsCancellationRequested)
        {
            _loaded.TrySetCanceled(stoppingToken);
        }
    }

    private Task WaitForStartAsync(CancellationToken stoppingToken)
    {
        var started = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        lifetime.ApplicationStarted.Register(() => started.TrySetResult());
        return started.Task.WaitAsync(stoppingToken);
    }

    private async Task<bool> LoadAsync(CancellationToken cancellationToken)
    {
        var directory = ResolveDirectory();
        if (directory is null)
        {
            LogNoDemoFolder(logger);
            return false;
        }

        // bundle-0000 holds the shared organizations and practitioners the others refer to: ordinal order loads it first.
        var files = System.IO.Directory.GetFiles(directory, "*.json").Order(StringComparer.Ordinal).ToList();
        var resources = 0;
        foreach (var file in files)
        {
            var bundle = FhirJson.Parse<Bundle>(await File.ReadAllTextAsync(file, cancellationToken));
            var (response, issues) = await processor.ProcessAsync(bundle, BaseUrl(), withResources: false, cancellationToken);
            if (response is null)
            {
                LogBundleRefused(logger, Path.GetFileName(file), issues.Count);
                return false;
            }

            resources += response.Entry.Count;
        }

        var baseUrl = BaseUrl();
        LogDemoLoaded(logger, files.Count, resources);
        foreach (var path in TryFirst)
        {
            LogTryUrl(logger, baseUrl + path);
        }

        return true;
    }

    /// <summary>The pages and calls a newcomer should open first (no patient data in them).</summary>
    internal static readonly string[] TryFirst =
    [
        "/metadata",
        "/reports?periodStart=2026-01-01&periodEnd=2026-12-31",
        "/Measure/colorectal-cancer-screening/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31",
        "/Measure/$care-gaps-export?periodStart=2026-01-01&periodEnd=2026-12-31&status=open-gap&_format=csv",
        "/swagger",
    ];

    private string? ResolveDirectory()
    {
        if (!string.IsNullOrWhiteSpace(options.Value.Directory))
        {
            return System.IO.Directory.Exists(options.Value.Directory) ? options.Value.Directory : null;
        }

        // `dotnet run --project src/MeasureEval.Api` runs with the project folder as content root: walk up to the repository.
        for (var dir = new DirectoryInfo(environment.ContentRootPath); dir is not null; dir = dir.Parent)
        {
            var candidate = Path.Combine(dir.FullName, "fhir-bundles", "demo");
            if (System.IO.Directory.Exists(candidate))
            {
                return candidate;
            }
        }

        return null;
    }

    private string BaseUrl()
    {
        var address = server.Features.Get<IServerAddressesFeature>()?.Addresses.FirstOrDefault() ?? "http://localhost";
        return address.TrimEnd('/');
    }

    [LoggerMessage(Level = LogLevel.Warning, Message = "Demo requested, but no fhir-bundles/demo folder was found above the content root; set Demo:Directory")]
    private static partial void LogNoDemoFolder(ILogger logger);

    [LoggerMessage(Level = LogLevel.Error, Message = "Demo bundle {File} was refused with {IssueCount} issues; nothing of it was stored")]
    private static partial void LogBundleRefused(ILogger logger, string file, int issueCount);

    [LoggerMessage(Level = LogLevel.Information, Message = "Demo population loaded: {BundleCount} bundles, {ResourceCount} resources. Try first:")]
    private static partial void LogDemoLoaded(ILogger logger, int bundleCount, int resourceCount);

    [LoggerMessage(Level = LogLevel.Information, Message = "  {Url}")]
    private static partial void LogTryUrl(ILogger logger, string url);

}
