using MeasureEval.Core.Storage;

namespace MeasureEval.Cli.Batch;

/// <summary>
/// Loads a directory of FHIR input into a store: every resource is written under its own id (update-as-create), in
/// one write session per batch so a bulk load pays per resource only for its own rows. The input is checked whole
/// first: with any parse issue nothing is written.
/// </summary>
internal static class StoreLoader
{
    /// <summary>
    /// Resources written per committed session: large, so that a session spans several type files and each patient's
    /// index entry is rewritten fewer times (the session bounds the entries it holds in memory itself).
    /// </summary>
    private const int ResourcesPerSession = 250000;

    public static async Task<IReadOnlyList<InputIssue>> CheckAsync(string directory, CancellationToken cancellationToken)
    {
        var issues = new List<InputIssue>();
        await Task.Run(() => FhirInputReader.Read(directory, issues).Sum(batch => batch.Count), cancellationToken).ConfigureAwait(false);
        return issues;
    }

    /// <summary>Writes every resource of the input. Returns the number written.</summary>
    public static async Task<long> LoadAsync(IResourceStore store, string directory, IProgress<long>? written, CancellationToken cancellationToken)
    {
        var issues = new List<InputIssue>();
        long count = 0;
        IStoreSession? session = null;
        var inSession = 0;
        try
        {
            // Parsing runs ahead on the thread pool while this thread writes: the reader hands batches in order.
            var batches = new System.Collections.Concurrent.BlockingCollection<IReadOnlyList<FhirInputReader.ParsedResource>>(boundedCapacity: 4);
            var reader = Task.Run(() =>
            {
                try
                {
                    foreach (var batch in FhirInputReader.Read(directory, issues))
                    {
                        batches.Add(batch, cancellationToken);
                    }
                }
                finally
                {
                    batches.CompleteAdding();
                }
            }, cancellationToken);

            foreach (var batch in batches.GetConsumingEnumerable(cancellationToken))
            {
                foreach (var parsed in batch)
                {
                    session ??= await store.BeginWriteAsync(cancellationToken).ConfigureAwait(false);
                    await session.UpdateAsync(parsed.Resource, null, cancellationToken).ConfigureAwait(false);
                    count++;
                    if (++inSession == ResourcesPerSession)
                    {
                        await session.CommitAsync(cancellationToken).ConfigureAwait(false);
                        await session.DisposeAsync().ConfigureAwait(false);
                        session = null;
                        inSession = 0;
                        written?.Report(count);
                    }
                }
            }

            await reader.ConfigureAwait(false);
            if (issues.Count > 0)
            {
                throw new InvalidDataException($"{issues.Count} input issues appeared while loading; run the check first");
            }

            if (session is not null)
            {
                await session.CommitAsync(cancellationToken).ConfigureAwait(false);
            }

            written?.Report(count);
            return count;
        }
        finally
        {
            if (session is not null)
            {
                await session.DisposeAsync().ConfigureAwait(false);
            }
        }
    }
}
