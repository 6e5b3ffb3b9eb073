using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Core.Audit;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests.Limits;

/// <summary>A store whose population stream stalls until cancelled: an evaluation that never finishes on its own.</summary>
public sealed class StallingStore(IResourceStore inner) : IResourceStore
{
    public IResourceStore Inner => inner;

    public System.Threading.Tasks.Task InitializeAsync(CancellationToken cancellationToken) => inner.InitializeAsync(cancellationToken);

    public System.Threading.Tasks.Task<bool> IsReadyAsync(CancellationToken cancellationToken) => inner.IsReadyAsync(cancellationToken);

    public System.Threading.Tasks.Task<StoredResource?> ReadAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken) => inner.ReadAsync(resourceType, id, scope, cancellationToken);

    public System.Threading.Tasks.Task<StoredResource?> ReadVersionAsync(string resourceType, string id, int versionId, DataScope scope, CancellationToken cancellationToken) => inner.ReadVersionAsync(resourceType, id, versionId, scope, cancellationToken);

    public System.Threading.Tasks.Task<IReadOnlyList<StoredResource>> HistoryAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken) => inner.HistoryAsync(resourceType, id, scope, cancellationToken);

    public System.Threading.Tasks.Task<SearchResult> SearchAsync(SearchQuery query, CancellationToken cancellationToken) => inner.SearchAsync(query, cancellationToken);

    public System.Threading.Tasks.Task<IStoreSession> BeginWriteAsync(CancellationToken cancellationToken) => inner.BeginWriteAsync(cancellationToken);

    public System.Threading.Tasks.Task<PatientFacts?> GetPatientFactsAsync(string patientId, DataScope scope, CancellationToken cancellationToken) => inner.GetPatientFactsAsync(patientId, scope, cancellationToken);

    public System.Threading.Tasks.Task<long> CountPatientFactsAsync(DataScope scope, CancellationToken cancellationToken) => inner.CountPatientFactsAsync(scope, cancellationToken);

    public IAsyncEnumerable<PatientFacts> StreamPartitionFactsAsync(int partition, int partitionCount, DataScope scope, CancellationToken cancellationToken) =>
        StreamPatientFactsAsync(null, scope, cancellationToken);

    public async IAsyncEnumerable<PatientFacts> StreamPatientFactsAsync(
        IReadOnlyCollection<string>? patientIds, DataScope scope, [System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken cancellationToken)
    {
        await System.Threading.Tasks.Task.Delay(Timeout.Infinite, cancellationToken);
        yield break;
    }
}

public sealed class TinyBudgetApiFactory : ApiFactory
{
    protected override IReadOnlyDictionary<string, string?> Settings => new Dictionary<string, string?> { ["Limits:EvaluationTimeBudget"] = "00:00:00.300" };

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        base.ConfigureWebHost(builder);
        builder.ConfigureTestServices(services =>
        {
            var original = services.Last(d => d.ServiceType == typeof(IResourceStore));
            services.Remove(original);
            services.AddSingleton<IResourceStore>(s => new StallingStore((IResourceStore)original.ImplementationFactory!(s)));
            services.AddSingleton<IAuditStore>(s => (IAuditStore)((StallingStore)s.GetRequiredService<IResourceStore>()).Inner);
        });
    }
}

/// <summary>Synchronous evaluations are cut at Limits:EvaluationTimeBudget and answered 503 with advice.</summary>
public sealed class EvaluationBudgetFilterTests(TinyBudgetApiFactory factory) : IClassFixture<TinyBudgetApiFactory>
{
    [Theory]
    [InlineData("/Measure/colorectal-cancer-screening/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31")]
    [InlineData("/Measure/$care-gaps?periodStart=2026-01-01&periodEnd=2026-12-31")]
    [InlineData("/reports?periodStart=2026-01-01&periodEnd=2026-12-31&format=json")]
    public async System.Threading.Tasks.Task InvokeAsync_OverBudget_Answers503SuggestingRespondAsync(string url)
    {
        var client = factory.CreateClient();
        var started = TimeProvider.System.GetTimestamp();

        var response = await client.GetAsync(url);

        Assert.Equal(HttpStatusCode.ServiceUnavailable, response.StatusCode);
        Assert.True(TimeProvider.System.GetElapsedTime(started) < TimeSpan.FromSeconds(30), "the budget did not cut the evaluation");
        Assert.Equal(TimeSpan.FromSeconds(60), response.Headers.RetryAfter?.Delta);
        var issue = Issue(await ReadAsync<OperationOutcome>(response), "MEV-LIMIT-003");
        Assert.Contains("Prefer: respond-async", issue.Diagnostics, StringComparison.Ordinal);
    }

    [Fact]
    public async System.Threading.Tasks.Task InvokeAsync_OverBudget_IsAudited()
    {
        var client = factory.CreateClient();

        (await client.GetAsync("/Measure/colorectal-cancer-screening/$evaluate-measure?periodStart=2026-01-01&periodEnd=2026-12-31")).Dispose();
        var events = await ReadAsync<Bundle>(await client.GetAsync("/AuditEvent?_count=50"));

        Assert.Contains(events.Entry.Select(e => (AuditEvent)e.Resource), e => e.OutcomeDesc == "HTTP 503" && e.Outcome == AuditEvent.AuditEventOutcome.N8);
    }

    [Fact]
    public async System.Threading.Tasks.Task InvokeAsync_ExportOverBudgetAfterItsHeader_CutsTheConnection()
    {
        var client = factory.CreateClient();

        // The CSV header row is sent before the first patient is evaluated, so the status can no longer change.
        await Assert.ThrowsAsync<HttpRequestException>(() => client.GetStringAsync("/Measure/$care-gaps-export?periodStart=2026-01-01&periodEnd=2026-12-31&_format=csv"));
        var events = await ReadAsync<Bundle>(await client.GetAsync("/AuditEvent?_count=50"));

        Assert.Contains(events.Entry.Select(e => (AuditEvent)e.Resource), e => e.Subtype.Any(c => c.Code == "care-gaps-export") && e.OutcomeDesc == "HTTP 503");
    }
}
