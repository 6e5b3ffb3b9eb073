using System.Text;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Measures;

/// <summary>
/// The measures the service evaluates: the checked-in definitions plus those users loaded with PUT, which are kept in
/// the store (a Library carrying the definition file, a ValueSet as sent) so that they survive a restart. The repository
/// is immutable; a successful PUT swaps in a rebuilt one.
/// </summary>
public sealed partial class MeasureCatalog(IResourceStore store, IOptions<MeasureCatalogOptions> options, IHostEnvironment environment, ILogger<MeasureCatalog> logger)
{
    /// <summary>Identifier system on stored Library resources that carry a user-loaded definition file (value: the file name).</summary>
    public const string DefinitionFileSystem = "https://measureeval.example.org/fhir/definition-file";

    private readonly SemaphoreSlim _gate = new(1, 1);
    private volatile MeasureRepository? _repository;

    public async Task<MeasureRepository> GetAsync(CancellationToken cancellationToken)
    {
        if (_repository is { } loaded)
        {
            return loaded;
        }

        await _gate.WaitAsync(cancellationToken);
        try
        {
            if (_repository is null)
            {
                var files = LoadDirectory().Concat(await LoadStoredAsync(cancellationToken));
                _repository = Build(files);
            }

            return _repository;
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>
    /// Checks a new or changed definition file against everything loaded; when it has no issue, stores it and swaps the
    /// repository. Returns the issues of that file (empty on success) and whether it was new.
    /// </summary>
    public async Task<(IReadOnlyList<DefinitionIssue> Issues, bool Created)> PutAsync(DefinitionFile file, Resource stored, CancellationToken cancellationToken)
    {
        var current = await GetAsync(cancellationToken);
        await _gate.WaitAsync(cancellationToken);
        try
        {
            current = _repository ?? current;
            var candidate = MeasureRepository.Load([.. current.Files, file], out var issues);
            var own = issues.Where(i => i.File == file.Name).ToList();
            if (own.Count > 0)
            {
                return (own, false);
            }

            var created = !current.Files.Any(f => f.Name == file.Name);
            await using (var session = await store.BeginWriteAsync(cancellationToken))
            {
                await session.UpdateAsync(stored, null, cancellationToken);
                await session.CommitAsync(cancellationToken);
            }

            LogIssues(issues);
            _repository = candidate;
            return ([], created);
        }
        finally
        {
            _gate.Release();
        }
    }

    private MeasureRepository Build(IEnumerable<DefinitionFile> files)
    {
        var repository = MeasureRepository.Load(files, out var issues);
        LogIssues(issues);
        LogLoaded(logger, repository.Measures.Count, repository.ValueSets.Count);
        return repository;
    }

    private void LogIssues(IReadOnlyList<DefinitionIssue> issues)
    {
        foreach (var issue in issues)
        {
            LogIssue(logger, issue.File, issue.Path, issue.Message);
        }
    }

    private IEnumerable<DefinitionFile> LoadDirectory()
    {
        var directory = ResolveDirectory(options.Value.Directory, environment.ContentRootPath);
        if (directory is null)
        {
            LogNoDirectory(logger, options.Value.Directory);
            return [];
        }

        var files = new List<DefinitionFile>();
        foreach (var path in System.IO.Directory.EnumerateFiles(directory, "*.json", SearchOption.AllDirectories).Order(StringComparer.Ordinal))
        {
            if (DefinitionFile.FromName(Path.GetRelativePath(directory, path), File.ReadAllBytes(path)) is { } file)
            {
                files.Add(file);
            }
        }

        return files;
    }

    internal static string? ResolveDirectory(string configured, string contentRoot)
    {
        if (Path.IsPathRooted(configured))
        {
            return System.IO.Directory.Exists(configured) ? configured : null;
        }

        for (var directory = new DirectoryInfo(contentRoot); directory is not null; directory = directory.Parent)
        {
            var candidate = Path.Combine(directory.FullName, configured);
            if (System.IO.Directory.Exists(candidate))
            {
                return candidate;
            }
        }

        return null;
    }

    private async Task<IReadOnlyList<DefinitionFile>> LoadStoredAsync(CancellationToken cancellationToken)
    {
        var files = new List<DefinitionFile>();
        await foreach (var stored in AllAsync("Library", cancellationToken))
        {
            var library = FhirJson.Parse<Library>(stored.Json!);
            var name = library.Identifier.FirstOrDefault(i => i.System == DefinitionFileSystem)?.Value;
            var data = library.Content.FirstOrDefault(c => c.ContentType == MeasureEval.Engine.Reports.ReportExtensions.DefinitionMediaType)?.Data;
            if (name is not null && data is not null && DefinitionFile.FromName(name, data) is { } file)
            {
                files.Add(file);
            }
        }

        await foreach (var stored in AllAsync("ValueSet", cancellationToken))
        {
            files.Add(new DefinitionFile($"valuesets/{stored.Id}.json", DefinitionFileKind.ValueSet, Encoding.UTF8.GetBytes(stored.Json!)));
        }

        return files;
    }

    private async IAsyncEnumerable<StoredResource> AllAsync(string type, [System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken cancellationToken)
    {
        const int page = 200;
        for (var offset = 0; ; offset += page)
        {
            var result = await store.SearchAsync(new SearchQuery(type) { Scope = DataScope.Unrestricted, Count = page, Offset = offset }, cancellationToken);
            foreach (var match in result.Matches.Where(m => m.Json is not null))
            {
                yield return match;
            }

            if (result.Matches.Count < page)
            {
                yield break;
            }
        }
    }

    [LoggerMessage(Level = LogLevel.Information, Message = "Measure definitions loaded: {Measures} measures, {ValueSets} value sets")]
    private static partial void LogLoaded(ILogger logger, int measures, int valueSets);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Measure definition not loaded: {File} {Path}: {Problem}")]
    private static partial void LogIssue(ILogger logger, string file, string path, string problem);

    [LoggerMessage(Level = LogLevel.Warning, Message = "No measures directory found for '{Directory}'")]
    private static partial void LogNoDirectory(ILogger logger, string directory);
}
