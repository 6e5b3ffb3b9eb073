using MeasureEval.Cluster.Grains;
using MeasureEval.Cluster.Partitions;
using MeasureEval.Core.Security;
using MeasureEval.Engine;
using Microsoft.Extensions.Options;

namespace MeasureEval.Cluster.Hosting;

/// <summary>A population evaluation over the cluster: the same summaries as a single node's, plus which node ran each partition.</summary>
public sealed class ClusterEvaluation(IGrainFactory grains, IOptions<MeasureClusterOptions> options)
{
    public async System.Threading.Tasks.Task<(IReadOnlyList<PopulationSummary> Summaries, ClusterRunResult Run)> SummarizeAsync(
        IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, IReadOnlyCollection<string>? patientIds, string? practitioner, bool keepSubjects, DataScope scope)
    {
        ArgumentNullException.ThrowIfNull(measures);
        ArgumentNullException.ThrowIfNull(period);
        ArgumentNullException.ThrowIfNull(scope);

        // The partitions rebuild the scope from the payer id, narrowed to the request's period (ClusterEvaluationRequest.Scope).
        var request = new ClusterEvaluationRequest(
            [.. measures.Select(m => m.Id)], period.Start, period.End, patientIds?.ToArray(), practitioner, keepSubjects, options.Value.Partitions,
            scope.PayerOrganizationId);
        var run = await grains.GetGrain<IEvaluationCoordinatorGrain>(Guid.NewGuid()).RunAsync(request);
        return ([.. measures.Select((m, i) => run.Measures[i].ToSummary(m, period, keepSubjects))], run);
    }
}
