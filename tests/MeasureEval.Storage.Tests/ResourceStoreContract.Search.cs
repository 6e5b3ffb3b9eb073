using Hl7.Fhir.Model;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

public abstract partial class ResourceStoreContract
{
    [SkippableFact]
    public async Task SearchAsync_ByPatient_FindsSubjectPatientBeneficiaryAndPatientItself()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.Ana(), TestResources.HbA1c(), TestResources.AnaCoverage(), TestResources.Flu(),
            TestResources.CedarValley(), TestResources.ObservationOf("obs-other", "pat-ben"));

        // FHIR R4 compartmentdefinition-patient: Observation.subject, Immunization.patient, Coverage.beneficiary; the Patient is in its own compartment.
        Assert.Equal(["obs-a1c"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, PatientId = "pat-ana" }));
        Assert.Equal(["imm-flu"], await IdsAsync(store, new SearchQuery("Immunization") { Scope = DataScope.Unrestricted, PatientId = "pat-ana" }));
        Assert.Equal(["cov-ana"], await IdsAsync(store, new SearchQuery("Coverage") { Scope = DataScope.Unrestricted, PatientId = "pat-ana" }));
        Assert.Equal(["pat-ana"], await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, PatientId = "pat-ana" }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Organization") { Scope = DataScope.Unrestricted, PatientId = "pat-ana" }));
    }

    [SkippableFact]
    public async Task SearchAsync_ByIdentifier_MatchesSystemAndValueForms()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.Ana(), TestResources.CedarValley());

        // FHIR R4 search.html, token: system|value, |value (no system), value (any system).
        Assert.Equal(["pat-ana"], await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue("https://riverbend.example.org/mrn", "RB-1001")] }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue("https://other.example.org/mrn", "RB-1001")] }));
        Assert.Equal(["pat-ana"], await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue("", "LOCAL-17")] }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue("", "RB-1001")] }));
        Assert.Equal(["pat-ana"], await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue(null, "RB-1001")] }));
        Assert.Equal(["cedar-valley"], await IdsAsync(store, new SearchQuery("Organization") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue(null, "CVHP")] }));
        Assert.Equal(["pat-ana"], await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue(null, "nope"), new TokenValue(null, "LOCAL-17")] }));
    }

    [SkippableFact]
    public async Task SearchAsync_IdentifierChangedByUpdate_MatchesNewValueOnly()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.Ana());
        var renumbered = TestResources.Ana();
        renumbered.Identifier = [new Identifier("https://riverbend.example.org/mrn", "RB-2002")];

        await WriteAllAsync(store, renumbered);

        Assert.Empty(await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue(null, "RB-1001")] }));
        Assert.Equal(["pat-ana"], await IdsAsync(store, new SearchQuery("Patient") { Scope = DataScope.Unrestricted, Identifiers = [new TokenValue(null, "RB-2002")] }));
    }

    [SkippableFact]
    public async Task SearchAsync_ByIds_ReturnsThoseInIdOrder()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.ObservationOf("c", "p"), TestResources.ObservationOf("a", "p"), TestResources.ObservationOf("b", "p"));

        Assert.Equal(["a", "c"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Ids = ["c", "a", "zz"] }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Ids = [] }));
    }

    [SkippableFact]
    public async Task SearchAsync_ByLastUpdated_AppliesHalfOpenRangesTogether()
    {
        await using var store = await CreateStoreAsync();
        foreach (var id in new[] { "t0", "t1", "t2", "t3" })
        {
            await WriteAllAsync(store, TestResources.ObservationOf(id, "p"));
            Time.Advance(TimeSpan.FromHours(1));
        }

        Assert.Equal(["t1", "t2"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, LastUpdated = [new InstantRange(Start.AddHours(1), Start.AddHours(3))] }));
        Assert.Equal(["t2", "t3"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, LastUpdated = [new InstantRange(Start.AddHours(2), null)] }));
        Assert.Equal(["t0"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, LastUpdated = [new InstantRange(null, Start.AddHours(1))] }));
        Assert.Equal(["t1"], await IdsAsync(store, new SearchQuery("Observation")
        { Scope = DataScope.Unrestricted,
            LastUpdated = [new InstantRange(Start.AddHours(1), null), new InstantRange(null, Start.AddHours(2))],
        }));
    }

    [SkippableFact]
    public async Task SearchAsync_ByLastUpdatedNotIn_ExcludesEachRange()
    {
        await using var store = await CreateStoreAsync();
        foreach (var id in new[] { "t0", "t1", "t2", "t3" })
        {
            await WriteAllAsync(store, TestResources.ObservationOf(id, "p"));
            Time.Advance(TimeSpan.FromHours(1));
        }

        Assert.Equal(["t0", "t3"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, LastUpdatedNotIn = [new InstantRange(Start.AddHours(1), Start.AddHours(3))] }));
        Assert.Equal(["t2"], await IdsAsync(store, new SearchQuery("Observation")
        { Scope = DataScope.Unrestricted,
            LastUpdated = [new InstantRange(Start.AddHours(1), null)],
            LastUpdatedNotIn = [new InstantRange(Start.AddHours(1), Start.AddHours(2)), new InstantRange(Start.AddHours(3), null)],
        }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, LastUpdatedNotIn = [new InstantRange(null, null)] }));
    }

    [SkippableFact]
    public async Task SearchAsync_SeveralCriteria_AllMustHold()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.HbA1c(), TestResources.ObservationOf("obs-ben", "pat-ben"));

        Assert.Equal(["obs-a1c"], await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, PatientId = "pat-ana", Identifiers = [new TokenValue(null, "LAB-77")] }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, PatientId = "pat-ben", Identifiers = [new TokenValue(null, "LAB-77")] }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Observation") { Scope = DataScope.Unrestricted, PatientId = "pat-ana", Ids = ["obs-ben"] }));
    }

    [SkippableFact]
    public async Task SearchAsync_Paging_PagesInIdOrderWithTotal()
    {
        await using var store = await CreateStoreAsync();
        var ids = Enumerable.Range(0, 7).Select(i => $"obs-{i}").ToArray();
        await WriteAllAsync(store, [.. ids.Reverse().Select(id => TestResources.ObservationOf(id, "p"))]);

        var first = await store.SearchAsync(new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Count = 3 }, default);
        var last = await store.SearchAsync(new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Count = 3, Offset = 6 }, default);
        var beyond = await store.SearchAsync(new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Count = 3, Offset = 9 }, default);
        var countOnly = await store.SearchAsync(new SearchQuery("Observation") { Scope = DataScope.Unrestricted, Count = 0 }, default);

        Assert.Equal(["obs-0", "obs-1", "obs-2"], first.Matches.Select(m => m.Id));
        Assert.Equal(["obs-6"], last.Matches.Select(m => m.Id));
        Assert.Equal((7, 7), (first.Total, last.Total));
        Assert.Equal((0, 7), (beyond.Matches.Count, beyond.Total));
        Assert.Equal((0, 7), (countOnly.Matches.Count, countOnly.Total));
        Assert.All(first.Matches, m => Assert.NotNull(m.Json));
    }

    [SkippableFact]
    public async Task SearchAsync_OtherType_FindsNothing()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, TestResources.HbA1c());

        Assert.Equal(0, (await store.SearchAsync(new SearchQuery("Condition") { Scope = DataScope.Unrestricted, Ids = ["obs-a1c"] }, default)).Total);
    }

    private static async Task WriteAllAsync(IResourceStore store, params Resource[] resources)
    {
        await using var session = await store.BeginWriteAsync(default);
        foreach (var resource in resources)
        {
            await session.UpdateAsync(resource, null, default);
        }

        await session.CommitAsync(default);
    }

    private static async Task<string[]> IdsAsync(IResourceStore store, SearchQuery query)
    {
        var result = await store.SearchAsync(query, default);
        Assert.Equal(result.Matches.Count, result.Total);
        return [.. result.Matches.Select(m => m.Id)];
    }
}
