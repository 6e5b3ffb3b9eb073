using MeasureEval.Cluster.Grains;
using MeasureEval.Cluster.Partitions;
using MeasureEval.Core.Security;
using MeasureEval.Engine;
using Microsoft.Extensions.Options;

namespace MeasureEval.Cluster.Hosting;

/// <summary>A population evaluation over the cluster: the same summaries as a single node's, plus which node ran each partition.</summary>
public sealed class ClusterEvaluation(IGrainFactory grains, IOptions<MeasureClusterOptions> options)
{
    /// <summary>The unit of <see cref="EvaluationProgress"/> reported by a cluster run.</summary>
    public const string ProgressUnit = EvaluationProgress.Partitions;

    /// <summary>
    /// Evaluates the population (everyone in <paramref name="scope"/>, or <paramref name="patientIds"/>) partitioned over the live nodes. With
    /// <paramref name="progress"/>, reports 0 of N partitions at the start and then each partition result as it reaches the coordinator.
    /// </summary>
    public async System.Threading.Tasks.Task<(IReadOnlyList<PopulationSummary> Summaries, ClusterRunResult Run)> SummarizeAsync(
        IReadOnlyList<MeasureDefinition> measures, MeasurementPeriod period, IReadOnlyCollection<string>? patientIds, string? practitioner, bool keepSubjects, DataScope scope,
        IProgress<EvaluationProgress>? progress = null)
    {
        ArgumentNullException.ThrowIfNull(measures);
        ArgumentNullException.ThrowIfNull(period);
        ArgumentNullException.ThrowIfNull(scope);

        // The partitions rebuild the scope from the payer id, narrowed to the request's period (ClusterEvaluationRequest.Scope).
        var request = new ClusterEvaluationRequest(
            [.. measures.Select(m => m.Id)], period.Start, period.End, patientIds?.ToArray(), practitioner, keepSubjects, options.Value.Partitions,
            scope.PayerOrganizationId);
        var coordinator = grains.GetGrain<IEvaluationCoordinatorGrain>(Guid.NewGuid());
        ClusterRunResult run;
        if (progress is null)
        {
            run = await coordinator.RunAsync(request, null);
        }
        else
        {
            progress.Report(new EvaluationProgress(0, request.Partitions, ProgressUnit));
            var relay = new ProgressRelay(progress);
            var reference = grains.CreateObjectReference<IPartitionProgressObserver>(relay);
            try
            {
                run = await coordinator.RunAsync(request, reference);
            }
            finally
            {
                grains.DeleteObjectReference<IPartitionProgressObserver>(reference);
            }
        }

        return ([.. measures.Select((m, i) => run.Measures[i].ToSummary(m, period, keepSubjects))], run);
    }

    /// <summary>Passes partition counts on; concurrent calls may overtake each other, so a count below the last one is dropped.</summary>
    private sealed class ProgressRelay(IProgress<EvaluationProgress> progress) : IPartitionProgressObserver
    {
        private int _last;

        public System.Threading.Tasks.Task PartitionsDone(int done, int total)
        {
            int last;
            do
            {
                last = Volatile.Read(ref _last);
                if (done <= last)
                {
                    return System.Threading.Tasks.Task.CompletedTask;
                }
            }
            while (Interlocked.CompareExchange(ref _last, done, last) != last);

            progress.Report(new EvaluationProgress(done, total, ProgressUnit));
            return System.Threading.Tasks.Task.CompletedTask;
        }
    }
}
