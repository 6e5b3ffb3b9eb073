using MeasureEval.Core.Audit;
using MeasureEval.Storage.Common;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

/// <summary>The audit trail (<see cref="IAuditStore"/>) of both providers.</summary>
public abstract partial class ResourceStoreContract
{
    [SkippableFact]
    public async Task AppendAsync_Record_ReadsBackEqual()
    {
        await using var store = await CreateStoreAsync();
        var record = Audit("0001", Start, "analyst-1", ["p-2", "p-1"]) with { Payer = "cedar-valley", Address = "10.0.0.5", RequestId = "req-1" };

        await store.AppendAsync(record, default);
        var read = await store.ReadAuditAsync(record.Id, default);

        Assert.NotNull(read);
        Assert.Equal(record with { Patients = [] }, read with { Patients = [] });
        // Listed in patient id order (ordinal), as the store documents.
        Assert.Equal(["p-1", "p-2"], read.Patients);
        Assert.Null(await store.ReadAuditAsync("unknown", default));
    }

    [SkippableFact]
    public async Task SearchAuditAsync_ByPatientAgentAndDate_FiltersNewestFirst()
    {
        await using var store = await CreateStoreAsync();
        await store.AppendAsync(Audit("0001", Start, "analyst-1", ["p-1"]), default);
        await store.AppendAsync(Audit("0002", Start.AddMinutes(1), "admin-1", ["p-1", "p-2"]), default);
        await store.AppendAsync(Audit("0003", Start.AddMinutes(2), "analyst-1", []), default);

        var byPatient = await store.SearchAuditAsync(new AuditQuery { PatientId = "p-1" }, default);
        var byAgent = await store.SearchAuditAsync(new AuditQuery { Agent = "analyst-1" }, default);
        var byDate = await store.SearchAuditAsync(new AuditQuery { From = Start.AddMinutes(1), Until = Start.AddMinutes(2) }, default);
        var paged = await store.SearchAuditAsync(new AuditQuery { Count = 1, Offset = 1 }, default);

        Assert.Equal(["0002", "0001"], byPatient.Matches.Select(m => m.Id));
        Assert.Equal(["0003", "0001"], byAgent.Matches.Select(m => m.Id));
        Assert.Equal(["0002"], byDate.Matches.Select(m => m.Id));
        Assert.Equal(3, paged.Total);
        Assert.Equal(["0002"], paged.Matches.Select(m => m.Id));
    }

    [SkippableFact]
    public async Task AppendAsync_ConcurrentAppends_AllKept()
    {
        await using var store = await CreateStoreAsync();

        // Appends arriving together are written in groups; each caller must still find its own record kept.
        await Task.WhenAll(Enumerable.Range(0, 64).Select(i =>
            Task.Run(() => store.AppendAsync(Audit($"c{i:D3}", Start.AddMilliseconds(i), "agent-" + (i % 4), [$"p-{i}"]), default))));
        var all = await store.SearchAuditAsync(new AuditQuery { Count = 100 }, default);

        Assert.Equal(64, all.Total);
        Assert.Equal(Enumerable.Range(0, 64).Select(i => $"c{i:D3}").Reverse(), all.Matches.Select(m => m.Id));
        Assert.Equal(16, (await store.SearchAuditAsync(new AuditQuery { Agent = "agent-1" }, default)).Total);
        Assert.Equal(["c007"], (await store.SearchAuditAsync(new AuditQuery { PatientId = "p-7" }, default)).Matches.Select(m => m.Id));
    }

    [SkippableFact]
    public async Task CompleteAsync_StreamedEvent_AddsPatientsAndStatus()
    {
        await using var store = await CreateStoreAsync();
        await store.AppendAsync(Audit("0001", Start, "analyst-1", ["p-1"]), default);

        await store.CompleteAsync("0001", ["p-2", "p-3"], 3, 500, default);
        var read = await store.ReadAuditAsync("0001", default);

        Assert.Equal(["p-1", "p-2", "p-3"], read!.Patients);
        Assert.Equal(3, read.PatientCount);
        Assert.Equal(500, read.Status);
        Assert.Equal(1, (await store.SearchAuditAsync(new AuditQuery { PatientId = "p-3" }, default)).Total);
    }

    [SkippableFact]
    public async Task AppendAsync_AuditTables_AreNotResources()
    {
        await using var store = await CreateStoreAsync();
        await store.AppendAsync(Audit("0001", Start, "analyst-1", ["p-1"]), default);

        var search = await store.SearchAsync(new MeasureEval.Core.Storage.SearchQuery("AuditEvent") { Scope = MeasureEval.Core.Security.DataScope.Unrestricted }, default);

        Assert.Equal(0, search.Total);
        Assert.Null(await store.ReadAsync("AuditEvent", "0001", MeasureEval.Core.Security.DataScope.Unrestricted, default));
    }

    private static AuditRecord Audit(string id, DateTimeOffset recorded, string agent, IReadOnlyList<string> patients) => new()
    {
        Id = id,
        Recorded = recorded,
        Agent = agent,
        Role = "analyst",
        Operation = "read",
        Interaction = "read",
        Action = "R",
        Method = "GET",
        Route = "/{type}/{id}",
        Status = 200,
        Patients = patients,
        PatientCount = patients.Count,
    };
}
