using System.Net;
using Hl7.Fhir.Model;
using MeasureEval.Api.Tests.Support;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using Microsoft.AspNetCore.TestHost;
using Microsoft.Extensions.DependencyInjection;
using static MeasureEval.Api.Tests.Support.Fhir;

namespace MeasureEval.Api.Tests;

public sealed class FhirExceptionHandlerTests(ApiFactory factory) : IClassFixture<ApiFactory>
{
    [Fact]
    public async System.Threading.Tasks.Task TryHandle_StoreThrows_Returns500OperationOutcomeWithoutDetails()
    {
        using var failing = factory.WithWebHostBuilder(builder => builder.ConfigureTestServices(services =>
        {
            var real = services.Single(d => d.ServiceType == typeof(IResourceStore));
            services.Remove(real);
            services.AddSingleton<IResourceStore>(sp => new ReadFailsStore((IResourceStore)real.ImplementationFactory!(sp)));
            // The audit trail stays on the real store: only the read under test fails.
            services.AddSingleton<MeasureEval.Core.Audit.IAuditStore>(sp => (MeasureEval.Core.Audit.IAuditStore)((ReadFailsStore)sp.GetRequiredService<IResourceStore>()).Inner);
        }));
        var client = failing.CreateClient();

        var response = await client.GetAsync("/Patient/secret-mrn-123");

        Assert.Equal(HttpStatusCode.InternalServerError, response.StatusCode);
        var outcome = await ReadAsync<OperationOutcome>(response);
        var issue = outcome.Issue.Single();
        Assert.Equal(OperationOutcome.IssueType.Exception, issue.Code);
        Assert.Equal(["MEV-SRV-001"], Codes(outcome));
        Assert.DoesNotContain("disk on fire", issue.Diagnostics, StringComparison.Ordinal);
    }

    /// <summary>The real store, except that reads fail as a broken disk would.</summary>
    private sealed class ReadFailsStore(IResourceStore inner) : IResourceStore
    {
        public IResourceStore Inner => inner;

        public System.Threading.Tasks.Task InitializeAsync(CancellationToken cancellationToken) => inner.InitializeAsync(cancellationToken);

        public System.Threading.Tasks.Task<bool> IsReadyAsync(CancellationToken cancellationToken) => inner.IsReadyAsync(cancellationToken);

        public System.Threading.Tasks.Task<StoredResource?> ReadAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken) =>
            throw new IOException("disk on fire");

        public System.Threading.Tasks.Task<StoredResource?> ReadVersionAsync(string resourceType, string id, int versionId, DataScope scope, CancellationToken cancellationToken) =>
            inner.ReadVersionAsync(resourceType, id, versionId, scope, cancellationToken);

        public System.Threading.Tasks.Task<IReadOnlyList<StoredResource>> HistoryAsync(string resourceType, string id, DataScope scope, CancellationToken cancellationToken) =>
            inner.HistoryAsync(resourceType, id, scope, cancellationToken);

        public System.Threading.Tasks.Task<SearchResult> SearchAsync(SearchQuery query, CancellationToken cancellationToken) => inner.SearchAsync(query, cancellationToken);

        public System.Threading.Tasks.Task<IStoreSession> BeginWriteAsync(CancellationToken cancellationToken) => inner.BeginWriteAsync(cancellationToken);

        public System.Threading.Tasks.Task<PatientFacts?> GetPatientFactsAsync(string patientId, DataScope scope, CancellationToken cancellationToken) => inner.GetPatientFactsAsync(patientId, scope, cancellationToken);

        public System.Threading.Tasks.Task<long> CountPatientFactsAsync(DataScope scope, CancellationToken cancellationToken) => inner.CountPatientFactsAsync(scope, cancellationToken);

        public IAsyncEnumerable<PatientFacts> StreamPatientFactsAsync(IReadOnlyCollection<string>? patientIds, DataScope scope, CancellationToken cancellationToken) =>
            inner.StreamPatientFactsAsync(patientIds, scope, cancellationToken);

        public IAsyncEnumerable<PatientFacts> StreamPartitionFactsAsync(int partition, int partitionCount, DataScope scope, CancellationToken cancellationToken) =>
            inner.StreamPartitionFactsAsync(partition, partitionCount, scope, cancellationToken);
    }
}
