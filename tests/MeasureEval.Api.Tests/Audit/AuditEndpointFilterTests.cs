using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Core.Audit;
using MeasureEval.Testing;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests.Audit;

/// <summary>An audit store that refuses every write while <see cref="Failing"/> is set (storage hiccup).</summary>
public sealed class FlakyAuditStore(IAuditStore inner) : IAuditStore
{
    public volatile bool Failing;

    public System.Threading.Tasks.Task AppendAsync(AuditRecord record, CancellationToken cancellationToken) =>
        Failing ? throw new TimeoutException("audit store unavailable (test)") : inner.AppendAsync(record, cancellationToken);

    public System.Threading.Tasks.Task CompleteAsync(string id, IReadOnlyList<string> morePatients, int patientCount, int status, CancellationToken cancellationToken) =>
        Failing ? throw new TimeoutException("audit store unavailable (test)") : inner.CompleteAsync(id, morePatients, patientCount, status, cancellationToken);

    public System.Threading.Tasks.Task<AuditRecord?> ReadAuditAsync(string id, CancellationToken cancellationToken) => inner.ReadAuditAsync(id, cancellationToken);

    public System.Threading.Tasks.Task<AuditSearchResult> SearchAuditAsync(AuditQuery query, CancellationToken cancellationToken) => inner.SearchAuditAsync(query, cancellationToken);
}

public sealed class FlakyAuditApiFactory : ApiFactory
{
    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        base.ConfigureWebHost(builder);
        builder.ConfigureTestServices(services =>
            services.AddSingleton<IAuditStore>(s => new FlakyAuditStore((IAuditStore)s.GetRequiredService<MeasureEval.Core.Storage.IResourceStore>())));
    }

    public FlakyAuditStore Audit => (FlakyAuditStore)Services.GetRequiredService<IAuditStore>();
}

/// <summary>Fail closed for reads of patient data, never lose a write's answer.</summary>
public sealed class AuditEndpointFilterTests(FlakyAuditApiFactory factory) : IClassFixture<FlakyAuditApiFactory>
{
    [Fact]
    public async System.Threading.Tasks.Task InvokeAsync_AuditStoreDown_PatientReadAnswers503AndWriteStands()
    {
        var client = factory.CreateClient();
        (await client.PutAsync("/Patient/flaky-1", Json(Patient("flaky-1")))).EnsureSuccessStatusCode();
        factory.Audit.Failing = true;
        try
        {
            var read = await client.GetAsync("/Patient/flaky-1");
            var search = await client.GetAsync("/Patient?_id=flaky-1");
            var write = await client.PutAsync("/Patient/flaky-2", Json(Patient("flaky-2")));

            Assert.Equal(HttpStatusCode.ServiceUnavailable, read.StatusCode);
            var outcome = await ReadAsync<OperationOutcome>(read);
            Assert.Equal(["MEV-AUDIT-001"], Codes(outcome));
            Assert.DoesNotContain("Okafor", outcome.Issue[0].Diagnostics, StringComparison.Ordinal);
            Assert.Equal(HttpStatusCode.ServiceUnavailable, search.StatusCode);
            Assert.Equal(HttpStatusCode.Created, write.StatusCode);
        }
        finally
        {
            factory.Audit.Failing = false;
        }

        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/Patient/flaky-1")).StatusCode);
    }

    [Fact]
    public async System.Threading.Tasks.Task InvokeAsync_SubjectListEvaluation_RecordsEveryPatient()
    {
        var client = factory.CreateClient();
        var patient = Patient("flaky-list-1");
        (await client.PutAsync("/Patient/flaky-list-1", Json(patient))).EnsureSuccessStatusCode();

        var report = await client.GetAsync("/Measure/colorectal-cancer-screening/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31&reportType=subject-list");
        var events = await ReadAsync<Bundle>(await client.GetAsync("/AuditEvent?agent=test-admin&_count=5"));

        Assert.Equal(HttpStatusCode.OK, report.StatusCode);
        var evaluation = events.Entry.Select(e => (AuditEvent)e.Resource).First(e => e.Subtype.Any(c => c.Code == "evaluate-measure"));
        Assert.Equal(AuditEvent.AuditEventAction.E, evaluation.Action);
        // The subject list names exactly the patients of its populations; each is an entity of the event.
        var listed = (await ReadAsync<MeasureReport>(report)).Contained.OfType<List>().SelectMany(l => l.Entry).Select(e => e.Item.Reference).Distinct().Order().ToList();
        Assert.Equal(listed, evaluation.Entity.Where(e => e.What is not null).Select(e => e.What.Reference).Order().ToList());
        Assert.Empty(BaseR4Validator.Shared.Errors(evaluation));
    }
}
