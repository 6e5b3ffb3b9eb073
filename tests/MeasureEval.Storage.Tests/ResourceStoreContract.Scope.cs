using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Storage.Common;
using Task = System.Threading.Tasks.Task;

namespace MeasureEval.Storage.Tests;

/// <summary>
/// Payer scoping. Status codes from FHIR R4 Coverage.status (FinancialResourceStatusCodes: active, cancelled, draft,
/// entered-in-error); Group.managingEntity, Group.member.inactive and Group.member.period from FHIR R4 Group. Which payer
/// sees what is our rule (DEVELOPERS.md, Security).
/// </summary>
public abstract partial class ResourceStoreContract
{
    private static readonly DataScope PlanA = DataScope.ForPayer("plan-a");
    private static readonly DataScope PlanB = DataScope.ForPayer("plan-b");

    [SkippableFact]
    public async Task Scope_ActiveCoverage_PayerSeesItsMembersCompartmentOnly()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, Person("pa"), Person("pb"), CoverageOf("cov-a", "pa", "plan-a"), CoverageOf("cov-b", "pb", "plan-b"),
            TestResources.ObservationOf("obs-a", "pa"), TestResources.ObservationOf("obs-b", "pb"), Plan("plan-a"), Plan("plan-b"), new Device { Id = "dev-1" });

        Assert.NotNull(await store.ReadAsync("Patient", "pa", PlanA, default));
        Assert.NotNull(await store.ReadAsync("Observation", "obs-a", PlanA, default));
        Assert.Null(await store.ReadAsync("Patient", "pb", PlanA, default));
        Assert.Null(await store.ReadAsync("Observation", "obs-b", PlanA, default));
        Assert.Null(await store.ReadVersionAsync("Patient", "pb", 1, PlanA, default));
        Assert.Empty(await store.HistoryAsync("Observation", "obs-b", PlanA, default));
        Assert.Single(await store.HistoryAsync("Observation", "obs-a", PlanA, default));

        Assert.Equal(["pa"], await IdsAsync(store, new SearchQuery("Patient") { Scope = PlanA }));
        Assert.Equal(["obs-a"], await IdsAsync(store, new SearchQuery("Observation") { Scope = PlanA }));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Observation") { Scope = PlanA, PatientId = "pb" }));
        Assert.Equal(["cov-a"], await IdsAsync(store, new SearchQuery("Coverage") { Scope = PlanA }));

        // Directories stay readable; a type outside every compartment that is not a directory or definition does not.
        Assert.Equal(["plan-a", "plan-b"], await IdsAsync(store, new SearchQuery("Organization") { Scope = PlanA }));
        Assert.NotNull(await store.ReadAsync("Organization", "plan-b", PlanA, default));
        Assert.Null(await store.ReadAsync("Device", "dev-1", PlanA, default));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Device") { Scope = PlanA }));

        Assert.NotNull(await store.GetPatientFactsAsync("pa", PlanA, default));
        Assert.Null(await store.GetPatientFactsAsync("pb", PlanA, default));
        Assert.Equal(["pa"], (await ToListAsync(store.StreamPatientFactsAsync(null, PlanA, default))).Select(f => f.PatientId));
        Assert.Equal(["pa"], (await ToListAsync(store.StreamPatientFactsAsync(["pb", "pa"], PlanA, default))).Select(f => f.PatientId));

        Assert.Equal(["pa", "pb"], (await ToListAsync(store.StreamPatientFactsAsync(null, DataScope.Unrestricted, default))).Select(f => f.PatientId));
        Assert.NotNull(await store.ReadAsync("Device", "dev-1", DataScope.Unrestricted, default));
    }

    [SkippableFact]
    public async Task Scope_CoverageStatusAndPeriod_DecideMembership()
    {
        await using var store = await CreateStoreAsync();
        var cancelled = CoverageOf("cov-cancelled", "p-cancelled", "plan-a");
        cancelled.Status = FinancialResourceStatusCodes.Cancelled;
        var old = CoverageOf("cov-old", "p-old", "plan-a");

        // A partial end date means its whole year: "2025" ends 2025-12-31 (FHIR R4 datatypes, dateTime precision).
        old.Period = new Period { Start = "2024-03", End = "2025" };
        await WriteAllAsync(store, Person("p-cancelled"), Person("p-old"), cancelled, old);

        Assert.Null(await store.ReadAsync("Patient", "p-cancelled", PlanA, default));
        Assert.NotNull(await store.ReadAsync("Patient", "p-old", PlanA, default));

        // A cancelled Coverage is still the payer's own record, but it makes nobody a member.
        Assert.NotNull(await store.ReadAsync("Coverage", "cov-cancelled", PlanA, default));

        Assert.Empty(await StreamedAsync(store, PlanA.During(new DateOnly(2026, 1, 1), new DateOnly(2026, 12, 31))));
        Assert.Equal(["p-old"], await StreamedAsync(store, PlanA.During(new DateOnly(2025, 12, 31), new DateOnly(2026, 12, 31))));
        Assert.Equal(["p-old"], await StreamedAsync(store, PlanA.During(new DateOnly(2023, 1, 1), new DateOnly(2024, 3, 1))));
        Assert.Empty(await StreamedAsync(store, PlanA.During(new DateOnly(2023, 1, 1), new DateOnly(2024, 2, 29))));
        Assert.Null(await store.GetPatientFactsAsync("p-old", PlanA.During(new DateOnly(2026, 1, 1), new DateOnly(2026, 12, 31)), default));
        Assert.NotNull(await store.GetPatientFactsAsync("p-old", PlanA.During(new DateOnly(2025, 1, 1), new DateOnly(2025, 12, 31)), default));
    }

    [SkippableFact]
    public async Task Scope_ManagedGroup_MembersNotInactiveAndInTheirPeriod()
    {
        await using var store = await CreateStoreAsync();
        var group = new Group
        {
            Id = "attributed-a",
            Type = Group.GroupType.Person,
            Actual = true,
            ManagingEntity = new ResourceReference("Organization/plan-a"),
            Member =
            [
                new Group.MemberComponent { Entity = new ResourceReference("Patient/g-active") },
                new Group.MemberComponent { Entity = new ResourceReference("Patient/g-inactive"), Inactive = true },
                new Group.MemberComponent { Entity = new ResourceReference("Patient/g-2024"), Period = new Period { Start = "2024-01-01", End = "2024-12-31" } },
            ],
        };
        await WriteAllAsync(store, Person("g-active"), Person("g-inactive"), Person("g-2024"), group);

        Assert.NotNull(await store.ReadAsync("Patient", "g-active", PlanA, default));
        Assert.Null(await store.ReadAsync("Patient", "g-inactive", PlanA, default));
        Assert.NotNull(await store.ReadAsync("Patient", "g-2024", PlanA, default));
        Assert.Equal(["g-active"], await StreamedAsync(store, PlanA.During(new DateOnly(2026, 1, 1), new DateOnly(2026, 12, 31))));
        Assert.Equal(["g-2024", "g-active"], await StreamedAsync(store, PlanA.During(new DateOnly(2024, 6, 1), new DateOnly(2024, 6, 30))));

        // The Group itself: readable by the payer that manages it only.
        Assert.NotNull(await store.ReadAsync("Group", "attributed-a", PlanA, default));
        Assert.Null(await store.ReadAsync("Group", "attributed-a", PlanB, default));
        Assert.Empty(await IdsAsync(store, new SearchQuery("Group") { Scope = PlanB }));
        Assert.Empty(await StreamedAsync(store, PlanB));
    }

    [SkippableFact]
    public async Task Scope_CoverageMovedToAnotherPayor_MembershipFollowsTheCurrentVersion()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, Person("pm"), CoverageOf("cov-m", "pm", "plan-a"));
        Assert.NotNull(await store.ReadAsync("Patient", "pm", PlanA, default));

        await WriteAllAsync(store, CoverageOf("cov-m", "pm", "plan-b"));

        Assert.Null(await store.ReadAsync("Patient", "pm", PlanA, default));
        Assert.Null(await store.ReadAsync("Coverage", "cov-m", PlanA, default));
        Assert.Empty(await StreamedAsync(store, PlanA));
        Assert.NotNull(await store.ReadAsync("Patient", "pm", PlanB, default));
        Assert.Equal(["pm"], await StreamedAsync(store, PlanB));

        // Each version is judged by its own body: plan A still sees the version that named it, not the one after.
        Assert.Equal([1], (await store.HistoryAsync("Coverage", "cov-m", PlanA, default)).Select(v => v.VersionId));
        Assert.Equal([2], (await store.HistoryAsync("Coverage", "cov-m", PlanB, default)).Select(v => v.VersionId));
    }

    [SkippableFact]
    public async Task Scope_CoverageDeleted_MembershipRemoved()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, Person("pd"), CoverageOf("cov-d", "pd", "plan-a"), TestResources.ObservationOf("obs-d", "pd"));

        await WriteAsync(store, s => s.DeleteAsync("Coverage", "cov-d", null, default));

        Assert.Null(await store.ReadAsync("Patient", "pd", PlanA, default));
        Assert.Null(await store.ReadAsync("Observation", "obs-d", PlanA, default));
        Assert.Null(await store.GetPatientFactsAsync("pd", PlanA, default));
        Assert.Empty(await StreamedAsync(store, PlanA));

        // The deletion version shows to whom the deleted body showed: the payer reads 410 Gone on its own Coverage.
        var deleted = await store.ReadAsync("Coverage", "cov-d", PlanA, default);
        Assert.True(deleted!.Deleted);
        Assert.Null(await store.ReadAsync("Coverage", "cov-d", PlanB, default));
    }

    [SkippableFact]
    public async Task CountPatientFactsAsync_Payer_CountsItsMembersLikeTheStream()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, Person("pa"), Person("pa2"), Person("pb"), CoverageOf("cov-a", "pa", "plan-a"), CoverageOf("cov-a2", "pa2", "plan-a"),
            CoverageOf("cov-b", "pb", "plan-b"), Person("nobody"), Plan("plan-a"), Plan("plan-b"));

        // The progress total of a payer's job: the members a full stream in that scope yields.
        Assert.Equal(2, await store.CountPatientFactsAsync(PlanA, default));
        Assert.Equal(1, await store.CountPatientFactsAsync(PlanB, default));
        Assert.Equal(4, await store.CountPatientFactsAsync(DataScope.Unrestricted, default));
        Assert.Equal(2, (await ToListAsync(store.StreamPatientFactsAsync(null, PlanA, default))).Count);
    }

    [SkippableFact]
    public async Task Scope_OtherPayersCoverage_HiddenAsResourceAndAsFact()
    {
        await using var store = await CreateStoreAsync();
        var shared = CoverageOf("cov-shared", "px", "plan-b");
        shared.Payor.Add(new ResourceReference("Organization/plan-a"));
        await WriteAllAsync(store, Person("px"), CoverageOf("cov-xa", "px", "plan-a"), CoverageOf("cov-xb", "px", "plan-b"), shared);

        Assert.Equal(["cov-shared", "cov-xa"], await IdsAsync(store, new SearchQuery("Coverage") { Scope = PlanA, PatientId = "px" }));
        Assert.Null(await store.ReadAsync("Coverage", "cov-xb", PlanA, default));

        var facts = (await store.GetPatientFactsAsync("px", PlanA, default))!;
        Assert.Equal(["cov-shared", "cov-xa"], facts.Coverages.Select(c => c.Id).Order(StringComparer.Ordinal));
        Assert.All(facts.Coverages, c => Assert.Equal(["Organization/plan-a"], c.Payors));
        var streamed = Assert.Single(await ToListAsync(store.StreamPatientFactsAsync(null, PlanA, default)));
        Assert.Equal(2, streamed.Coverages.Count);
        Assert.Equal(3, (await store.GetPatientFactsAsync("px", DataScope.Unrestricted, default))!.Coverages.Count);
    }

    [SkippableFact]
    public async Task InitializeAsync_StoreFromBeforePayerScoping_DerivesMemberships()
    {
        await using var store = await CreateStoreAsync();
        await WriteAllAsync(store, Person("pold"), CoverageOf("cov-old", "pold", "plan-a"));
        await ExecuteSqlAsync("DELETE FROM payer_members; DELETE FROM payer_resources; DELETE FROM payer_scope_state");
        Assert.Null(await store.ReadAsync("Patient", "pold", PlanA, default));

        await store.InitializeAsync(default);

        Assert.NotNull(await store.ReadAsync("Patient", "pold", PlanA, default));
        Assert.NotNull(await store.ReadAsync("Coverage", "cov-old", PlanA, default));
        Assert.Equal(["pold"], await StreamedAsync(store, PlanA));
    }

    private static Patient Person(string id) => new() { Id = id, Gender = AdministrativeGender.Female, BirthDate = "1970-01-01" };

    private static Organization Plan(string id) => new() { Id = id, Name = id };

    private static Coverage CoverageOf(string id, string patientId, string payer) => new()
    {
        Id = id,
        Status = FinancialResourceStatusCodes.Active,
        Beneficiary = new ResourceReference($"Patient/{patientId}"),
        Period = new Period { Start = "2026-01-01" },
        Payor = [new ResourceReference($"Organization/{payer}")],
    };

    private static async Task<string[]> StreamedAsync(IResourceStore store, DataScope scope) =>
        [.. (await ToListAsync(store.StreamPatientFactsAsync(null, scope, default))).Select(f => f.PatientId)];
}
