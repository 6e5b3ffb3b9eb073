using System.Text.RegularExpressions;
using Hl7.Fhir.Model;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Storage.Common;
using Microsoft.Extensions.Time.Testing;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

/// <summary>
/// The behaviour every <see cref="IResourceStore"/> must show, run once per provider by the derived classes.
/// Expected values come from the input files under Resources/ and from the FHIR R4 specification where noted.
/// </summary>
public abstract partial class ResourceStoreContract
{
    protected static readonly DateTimeOffset Start = new(2026, 5, 4, 8, 30, 0, TimeSpan.Zero);

    protected FakeTimeProvider Time { get; } = new(Start);

    /// <summary>A new, initialized, empty store.</summary>
    protected Task<SqlResourceStore> CreateStoreAsync() => CreateStoreAsync(null);

    /// <summary>A new, initialized, empty store; with <paramref name="batch"/>, sessions keep at most that many index entries and facts in memory.</summary>
    protected abstract Task<SqlResourceStore> CreateStoreAsync(IndexBatch? batch);

    /// <summary>Runs SQL on the last created store's database behind its back (to stage what an older build left).</summary>
    protected abstract Task ExecuteSqlAsync(string sql);

    [SkippableFact]
    public async Task CreateAsync_NewResource_AssignsIdAndFirstVersion()
    {
        await using var store = await CreateStoreAsync();

        var stored = await WriteAsync(store, s => s.CreateAsync(TestResources.Ana(), default));

        // FHIR R4 datatypes, "id": [A-Za-z0-9\-\.]{1,64}.
        Assert.Matches(FhirIdPattern(), stored.Id);
        Assert.NotEqual("pat-ana", stored.Id);
        Assert.Equal(1, stored.VersionId);
        Assert.Equal(Start, stored.LastUpdated);
        var body = FhirJson.Parse<Patient>(stored.Json!);
        Assert.Equal(stored.Id, body.Id);

        // FHIR R4 http.html: versionId is the server's version as a string, lastUpdated the instant of the write.
        Assert.Equal("1", body.Meta!.VersionId);
        Assert.Equal(Start, body.Meta.LastUpdated);
        Assert.Equal("1961-04-12", body.BirthDate);
    }

    [SkippableFact]
    public async Task CreateAsync_TwoResources_GetDistinctIds()
    {
        await using var store = await CreateStoreAsync();

        var first = await WriteAsync(store, s => s.CreateAsync(TestResources.Ana(), default));
        var second = await WriteAsync(store, s => s.CreateAsync(TestResources.Ana(), default));

        Assert.NotEqual(first.Id, second.Id);
    }

    [SkippableFact]
    public async Task ReadAsync_NeverStored_ReturnsNull()
    {
        await using var store = await CreateStoreAsync();

        Assert.Null(await store.ReadAsync("Patient", "nobody", DataScope.Unrestricted, default));
        Assert.Empty(await store.HistoryAsync("Patient", "nobody", DataScope.Unrestricted, default));
        Assert.Null(await store.GetPatientFactsAsync("nobody", DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task UpdateAsync_UnknownId_CreatesResourceUnderThatId()
    {
        await using var store = await CreateStoreAsync();

        var result = await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), null, default));

        Assert.True(result.Created);
        Assert.False(result.VersionConflict);
        Assert.Equal(("pat-ana", 1), (result.Stored!.Id, result.Stored.VersionId));
        var read = await store.ReadAsync("Patient", "pat-ana", DataScope.Unrestricted, default);
        Assert.Equal(result.Stored, read);
    }

    [SkippableFact]
    public async Task UpdateAsync_ExistingResource_IncrementsVersionAndKeepsHistory()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), null, default));
        Time.Advance(TimeSpan.FromMinutes(5));
        var changed = TestResources.Ana();
        changed.BirthDate = "1961-04-13";

        var result = await WriteAsync(store, s => s.UpdateAsync(changed, null, default));

        Assert.False(result.Created);
        Assert.Equal(2, result.Stored!.VersionId);
        Assert.Equal("2", FhirJson.Parse<Patient>(result.Stored.Json!).Meta!.VersionId);
        var history = await store.HistoryAsync("Patient", "pat-ana", DataScope.Unrestricted, default);
        Assert.Equal([2, 1], history.Select(h => h.VersionId));
        Assert.Equal([Start.AddMinutes(5), Start], history.Select(h => h.LastUpdated));
        var first = await store.ReadVersionAsync("Patient", "pat-ana", 1, DataScope.Unrestricted, default);
        Assert.Equal("1961-04-12", FhirJson.Parse<Patient>(first!.Json!).BirthDate);
        Assert.Null(await store.ReadVersionAsync("Patient", "pat-ana", 3, DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task UpdateAsync_IfMatchCurrentVersion_Writes()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), null, default));

        var result = await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), 1, default));

        Assert.False(result.VersionConflict);
        Assert.Equal(2, result.Stored!.VersionId);
    }

    [SkippableFact]
    public async Task UpdateAsync_IfMatchOtherVersion_ReportsConflictAndWritesNothing()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), null, default));
        var changed = TestResources.Ana();
        changed.Gender = AdministrativeGender.Male;

        var result = await WriteAsync(store, s => s.UpdateAsync(changed, 7, default));

        Assert.True(result.VersionConflict);
        Assert.Equal(1, result.Stored!.VersionId);
        Assert.Single(await store.HistoryAsync("Patient", "pat-ana", DataScope.Unrestricted, default));
        Assert.Equal("female", (await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default))!.Demographics!.Gender);
    }

    [SkippableFact]
    public async Task UpdateAsync_IfMatchOnUnknownResource_ReportsConflictAndCreatesNothing()
    {
        await using var store = await CreateStoreAsync();

        var result = await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), 1, default));

        Assert.True(result.VersionConflict);
        Assert.Null(result.Stored);
        Assert.Null(await store.ReadAsync("Patient", "pat-ana", DataScope.Unrestricted, default));
        Assert.Equal(0, (await store.SearchAsync(new SearchQuery("Patient") { Scope = DataScope.Unrestricted }, default)).Total);
    }

    [SkippableFact]
    public async Task UpdateAsync_InvalidId_Throws()
    {
        await using var store = await CreateStoreAsync();
        var patient = TestResources.Ana();

        // FHIR R4 datatypes, "id": at most 64 characters from [A-Za-z0-9\-\.].
        patient.Id = new string('a', 65);

        await using var session = await store.BeginWriteAsync(default);
        await Assert.ThrowsAsync<ArgumentException>(() => session.UpdateAsync(patient, null, default));
    }

    [SkippableFact]
    public async Task DeleteAsync_ExistingResource_AddsDeletedVersion()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.HbA1c(), null, default));
        Time.Advance(TimeSpan.FromSeconds(30));

        var result = await WriteAsync(store, s => s.DeleteAsync("Observation", "obs-a1c", null, default));

        Assert.Equal((2, true, (string?)null), (result.Stored!.VersionId, result.Stored.Deleted, result.Stored.Json));
        var read = await store.ReadAsync("Observation", "obs-a1c", DataScope.Unrestricted, default);
        Assert.True(read!.Deleted);
        Assert.Equal(Start.AddSeconds(30), read.LastUpdated);
        var history = await store.HistoryAsync("Observation", "obs-a1c", DataScope.Unrestricted, default);
        Assert.Equal([(2, true), (1, false)], history.Select(h => (h.VersionId, h.Deleted)));
        Assert.NotNull((await store.ReadVersionAsync("Observation", "obs-a1c", 1, DataScope.Unrestricted, default))!.Json);
        Assert.Equal(0, (await store.SearchAsync(new SearchQuery("Observation") { Scope = DataScope.Unrestricted }, default)).Total);
        Assert.Null(await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task DeleteAsync_AlreadyDeleted_AddsNoVersion()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.HbA1c(), null, default));
        await WriteAsync(store, s => s.DeleteAsync("Observation", "obs-a1c", null, default));

        var again = await WriteAsync(store, s => s.DeleteAsync("Observation", "obs-a1c", null, default));

        Assert.False(again.VersionConflict);
        Assert.Equal(2, again.Stored!.VersionId);
        Assert.Equal(2, (await store.HistoryAsync("Observation", "obs-a1c", DataScope.Unrestricted, default)).Count);
    }

    [SkippableFact]
    public async Task DeleteAsync_NeverStored_SucceedsWithoutVersion()
    {
        await using var store = await CreateStoreAsync();

        var result = await WriteAsync(store, s => s.DeleteAsync("Observation", "missing", null, default));

        Assert.Equal(new WriteResult(null, false, false), result);
        Assert.Null(await store.ReadAsync("Observation", "missing", DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task DeleteAsync_IfMatchOtherVersion_ReportsConflictAndKeepsResource()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.HbA1c(), null, default));

        var result = await WriteAsync(store, s => s.DeleteAsync("Observation", "obs-a1c", 2, default));

        Assert.True(result.VersionConflict);
        Assert.False((await store.ReadAsync("Observation", "obs-a1c", DataScope.Unrestricted, default))!.Deleted);
        Assert.Single((await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default))!.Facts);
    }

    [SkippableFact]
    public async Task UpdateAsync_AfterDelete_RecreatesWithNextVersion()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.HbA1c(), null, default));
        await WriteAsync(store, s => s.DeleteAsync("Observation", "obs-a1c", null, default));

        var result = await WriteAsync(store, s => s.UpdateAsync(TestResources.HbA1c(), null, default));

        Assert.True(result.Created);
        Assert.Equal(3, result.Stored!.VersionId);
        Assert.Single((await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default))!.Facts);
    }

    [SkippableFact]
    public async Task BeginWriteAsync_DisposedWithoutCommit_LeavesNothing()
    {
        await using var store = await CreateStoreAsync();
        await using (var session = await store.BeginWriteAsync(default))
        {
            await session.UpdateAsync(TestResources.Ana(), null, default);
            await session.UpdateAsync(TestResources.HbA1c(), null, default);
            await session.CreateAsync(TestResources.CedarValley(), default);
        }

        Assert.Null(await store.ReadAsync("Patient", "pat-ana", DataScope.Unrestricted, default));
        Assert.Equal(0, (await store.SearchAsync(new SearchQuery("Organization") { Scope = DataScope.Unrestricted }, default)).Total);
        Assert.Null(await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default));
        Assert.Empty(await ToListAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default)));
    }

    [SkippableFact]
    public async Task BeginWriteAsync_UncommittedWrites_VisibleInSessionOnly()
    {
        await using var store = await CreateStoreAsync();
        await using var session = await store.BeginWriteAsync(default);
        await session.UpdateAsync(TestResources.Ana(), null, default);

        var inside = await session.ReadAsync("Patient", "pat-ana", default);
        var found = await session.SearchAsync(new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue(null, "RB-1001")] }, default);
        var outside = await store.ReadAsync("Patient", "pat-ana", DataScope.Unrestricted, default);

        Assert.Equal(1, inside!.VersionId);
        Assert.Equal(["pat-ana"], found.Matches.Select(m => m.Id));
        Assert.Null(outside);
        await session.CommitAsync(default);
        Assert.NotNull(await store.ReadAsync("Patient", "pat-ana", DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task CommitAsync_Twice_Throws()
    {
        await using var store = await CreateStoreAsync();
        await using var session = await store.BeginWriteAsync(default);
        await session.CommitAsync(default);

        await Assert.ThrowsAsync<ObjectDisposedException>(() => session.CommitAsync(default));
    }

    [SkippableFact]
    public async Task InitializeAsync_SecondTime_KeepsData()
    {
        await using var store = await CreateStoreAsync();
        await WriteAsync(store, s => s.UpdateAsync(TestResources.Ana(), null, default));

        await store.InitializeAsync(default);

        Assert.True(await store.IsReadyAsync(default));
        Assert.NotNull(await store.ReadAsync("Patient", "pat-ana", DataScope.Unrestricted, default));
    }

    private static async Task<T> WriteAsync<T>(IResourceStore store, Func<IStoreSession, Task<T>> write)
    {
        await using var session = await store.BeginWriteAsync(default);
        var result = await write(session);
        await session.CommitAsync(default);
        return result;
    }

    private static async Task<List<PatientFacts>> ToListAsync(IAsyncEnumerable<PatientFacts> stream)
    {
        var list = new List<PatientFacts>();
        await foreach (var facts in stream)
        {
            list.Add(facts);
        }

        return list;
    }

    [GeneratedRegex(@"^[A-Za-z0-9\-\.]{1,64}$")]
    private static partial Regex FhirIdPattern();
}
