using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

public abstract partial class ResourceStoreContract
{
    protected sealed record IndexBatch(int Entries, int Facts);

    [SkippableFact]
    public async Task GetPatientFactsAsync_AfterWrites_HoldsDemographicsFactsAndCoverage()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c(), TestResources.AnaCoverage(), TestResources.Flu(), TestResources.CedarValley());

        var facts = await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default);

        // Values as written in Resources/patient-ana.json, observation-hba1c.json, coverage-ana.json, immunization-flu.json.
        Assert.NotNull(facts);
        Assert.Equal(("1961-04-12", "female", "Practitioner/prac-lee"), (facts.Demographics!.BirthDate, facts.Demographics.Gender, facts.Demographics.GeneralPractitioner));
        Assert.Equal([("Immunization", "imm-flu"), ("Observation", "obs-a1c")], facts.Facts.Select(f => (f.ResourceType, f.Id)));
        var a1c = facts.Facts.Single(f => f.Id == "obs-a1c");
        Assert.Equal([new FactCoding("http://loinc.org", "4548-4")], a1c.Codes);
        Assert.Equal(new FactQuantity(7.2m, null, "%", "http://unitsofmeasure.org", "%"), a1c.Quantity);
        Assert.Equal(new FactTime(TimeKind.DateTime, "2026-03-02"), a1c.Time);
        Assert.Equal("1", a1c.VersionId);
        var coverage = Assert.Single(facts.Coverages);
        Assert.Equal(("cov-ana", "active", "2026-01-01", "2026-12-31", 1), (coverage.Id, coverage.Status, coverage.PeriodStart, coverage.PeriodEnd, coverage.Order));
        Assert.Equal(["Organization/cedar-valley"], coverage.Payors);
    }

    [SkippableFact]
    public async Task GetPatientFactsAsync_OnlyResourcesOfPatient_HasNoDemographics()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.HbA1c());

        var facts = await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default);

        Assert.Null(facts!.Demographics);
        Assert.Single(facts.Facts);
    }

    [SkippableFact]
    public async Task UpdateAsync_ChangedResource_ReplacesItsFacts()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.HbA1c());
        var amended = TestResources.HbA1c();
        amended.Status = ObservationStatus.Amended;
        amended.Value = new Quantity(6.8m, "%", "http://unitsofmeasure.org");

        await WriteAllAsync(store, amended);

        var fact = Assert.Single((await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default))!.Facts);
        Assert.Equal(("amended", 6.8m, "2"), (fact.Status, fact.Quantity!.Value, fact.VersionId));
    }

    [SkippableFact]
    public async Task UpdateAsync_SubjectChanged_MovesFactsToOtherPatient()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c());
        var moved = TestResources.HbA1c();
        moved.Subject = new ResourceReference("Patient/pat-ben");

        await WriteAllAsync(store, moved);

        Assert.Empty((await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default))!.Facts);
        Assert.Equal(["obs-a1c"], (await store.GetPatientFactsAsync("pat-ben", DataScope.Unrestricted, default))!.Facts.Select(f => f.Id));
        Assert.Equal(["obs-a1c"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, PatientId = "pat-ben" }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, PatientId = "pat-ana" }));
    }

    [SkippableFact]
    public async Task UpdateAsync_SubjectNoLongerPatient_RemovesFacts()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.HbA1c());
        var groupSubject = TestResources.HbA1c();
        groupSubject.Subject = new ResourceReference("Group/riverbend-diabetes-panel");

        await WriteAllAsync(store, groupSubject);

        Assert.Null(await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task DeleteAsync_Patient_KeepsOtherFactsWithoutDemographics()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c(), TestResources.AnaCoverage());

        await using (var session = await store.BeginWriteAsync(default))
        {
            await session.DeleteAsync("Patient", "pat-ana", null, default);
            await session.DeleteAsync("Coverage", "cov-ana", null, default);
            await session.CommitAsync(default);
        }

        var facts = await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default);
        Assert.Null(facts!.Demographics);
        Assert.Empty(facts.Coverages);
        Assert.Single(facts.Facts);
    }

    [SkippableFact]
    public async Task StreamPatientFactsAsync_All_YieldsEveryPatientInOrdinalOrder()
    {
        await using var store = await CreateStoreAsync();
        string[] patients = ["b", "a", "B", "a-1", "10", "9", "a.2"];
        await WriteAllAsync(store, [.. patients.Select(p => TestResources.ObservationOf($"obs-{p}", p)), TestResources.CedarValley()]);

        var streamed = await ToListAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default));

        // Ordinal order compares UTF-16 code units: digits < upper case < lower case; "-" (0x2D) < "." (0x2E).
        Assert.Equal(["10", "9", "B", "a", "a-1", "a.2", "b"], streamed.Select(f => f.PatientId));
        Assert.All(streamed, f => Assert.Equal($"obs-{f.PatientId}", Assert.Single(f.Facts).Id));
    }

    [SkippableFact]
    public async Task StreamPatientFactsAsync_ChosenIds_YieldsThoseInOrderSkippingUnknown()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, [.. Enumerable.Range(0, 30).Select(i => TestResources.ObservationOf($"obs-{i}", $"p{i:D2}"))]);

        var streamed = await ToListAsync(store.StreamPatientFactsAsync(["p17", "p03", "unknown", "p17", "p29"], DataScope.Unrestricted, default));

        Assert.Equal(["p03", "p17", "p29"], streamed.Select(f => f.PatientId));
        Assert.Empty(await ToListAsync(store.StreamPatientFactsAsync([], DataScope.Unrestricted, default)));
    }

    [SkippableFact]
    public async Task UpdateAsync_ManyResourcesInOneSession_IndexesEveryPatient()
    {
        // Fewer entries and facts kept in memory than the session touches, so entries are written back in several batches.
        await using var store = await CreateStoreAsync(new IndexBatch(Entries: 500, Facts: 1500));
        const int patients = 1300;
        await using (var session = await store.BeginWriteAsync(default))
        {
            for (var i = 0; i < patients; i++)
            {
                await session.UpdateAsync(TestResources.ObservationOf($"first-{i}", $"p{i:D5}"), null, default);
            }

            for (var i = 0; i < patients; i++)
            {
                await session.UpdateAsync(TestResources.ObservationOf($"second-{i}", $"p{i:D5}"), null, default);
            }

            await session.CommitAsync(default);
        }

        var streamed = await ToListAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default));
        Assert.Equal(patients, streamed.Count);
        Assert.All(streamed, f => Assert.Equal(2, f.Facts.Count));
        Assert.Equal(2 * patients, (await store.SearchAsync(new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Count = 0 }, default)).Total);
    }

    [SkippableFact]
    public async Task RebuildIndexAsync_AfterWrites_GivesSameEntries()
    {
        await using var store = await CreateStoreAsync();
        await StageMixedHistoryAsync(store);
        var before = await SnapshotAsync(store);

        await store.RebuildIndexAsync(default);

        Assert.Equal(before, await SnapshotAsync(store));
        Assert.Equal(3, before.Count);
    }

    [SkippableFact]
    public async Task InitializeAsync_IndexOfOlderFormat_RebuildsIt()
    {
        await using var store = await CreateStoreAsync();
        await StageMixedHistoryAsync(store);
        var before = await SnapshotAsync(store);
        await ExecuteSqlAsync("UPDATE index_state SET format = 1; DELETE FROM patient_index; UPDATE resources SET index_patient_id = NULL");

        await store.InitializeAsync(default);

        Assert.Equal(before, await SnapshotAsync(store));
        var moved = TestResources.HbA1c();
        moved.Subject = new ResourceReference("Patient/pat-cy");
        await WriteAllAsync(store, moved);
        Assert.DoesNotContain((await store.GetPatientFactsAsync("pat-ben", DataScope.Unrestricted, default))!.Facts, f => f.Id == "obs-a1c");
    }

    /// <summary>Versions, a move to another patient, a deletion and a resource outside any patient.</summary>
    private async Task StageMixedHistoryAsync(IResourceStore store)
    {
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c(), TestResources.AnaCoverage(), TestResources.Flu(), TestResources.CedarValley(),
            TestResources.ObservationOf("obs-ben", "pat-ben"));
        var moved = TestResources.HbA1c();
        moved.Subject = new ResourceReference("Patient/pat-ben");
        await WriteAllAsync(store, moved);
        await WriteAsync(store, s => s.DeleteAsync("Immunization", "imm-flu", null, default));
        await WriteAllAsync(store, TestResources.ObservationOf("obs-dan", "pat-dan"));
    }

    private static async Task<List<string>> SnapshotAsync(IResourceStore store) =>
        [.. (await ToListAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default))).Select(f => System.Text.Json.JsonSerializer.Serialize(f, SnapshotOptions))];

    private static readonly System.Text.Json.JsonSerializerOptions SnapshotOptions = new() { TypeInfoResolver = new System.Text.Json.Serialization.Metadata.DefaultJsonTypeInfoResolver() };

    [SkippableFact]
    public async Task BeginWriteAsync_ConcurrentSessionsOnOneResource_LoseNoVersion()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.HbA1c());
        const int writers = 4;
        const int updatesEach = 10;

        await Task.WhenAll(Enumerable.Range(0, writers).Select(w => Task.Run(async () =>
        {
            for (var i = 0; i < updatesEach; i++)
            {
                await using var session = await store.BeginWriteAsync(default);
                var observation = TestResources.HbA1c();
                observation.Value = new Quantity(w + (i / 100m), "%", "http://unitsofmeasure.org");
                await session.UpdateAsync(observation, null, default);
                await session.UpdateAsync(TestResources.ObservationOf($"obs-{w}-{i}", "pat-ana"), null, default);
                await session.CommitAsync(default);
            }
        })));

        var history = await store.HistoryAsync("Observation", "obs-a1c", DataScope.Unrestricted, default);
        Assert.Equal(Enumerable.Range(1, 1 + (writers * updatesEach)).Reverse(), history.Select(h => h.VersionId));
        var facts = await store.GetPatientFactsAsync("pat-ana", DataScope.Unrestricted, default);
        Assert.Equal(1 + (writers * updatesEach), facts!.Facts.Count);
        Assert.Equal((1 + (writers * updatesEach)).ToString(System.Globalization.CultureInfo.InvariantCulture), facts.Facts.Single(f => f.Id == "obs-a1c").VersionId);
    }
}
