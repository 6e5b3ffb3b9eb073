using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Cluster.Hosting;
using MeasureEval.Cluster.Partitions;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using MeasureEval.Engine.Reports;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.Measures;

/// <summary>Runs $evaluate-measure: picks the patients (one, a Group's members, everyone), streams them once for all measures.</summary>
/// <remarks>
/// In cluster mode (<see cref="ClusterEvaluation"/> registered) a population is evaluated partitioned over the nodes; the reports are the same.
/// Every patient comes from the store within the caller's scope during the measurement period: a payer's report counts
/// its members only, and another payer's patient or Group answers as unknown.
/// A single-node population is evaluated on <see cref="EvaluationOptions.Workers"/> threads; the reports equal the serial ones.
/// </remarks>
public sealed class MeasureEvaluationService(IResourceStore store, TimeProvider time, IOptions<EvaluationOptions> options, ClusterEvaluation? cluster = null)
{
    public Task<EvaluationOutcome> EvaluateAsync(
        MeasureRepository repository, IReadOnlyList<MeasureDefinition> measures, EvaluateParameters parameters, DataScope scope, CancellationToken cancellationToken) =>
        EvaluateAsync(repository, measures, parameters, scope, progress: null, cancellationToken);

    /// <summary>
    /// As above, telling <paramref name="progress"/> how far it is (asynchronous jobs): patients done on a single node,
    /// partitions done in cluster mode.
    /// </summary>
    public async Task<EvaluationOutcome> EvaluateAsync(
        MeasureRepository repository, IReadOnlyList<MeasureDefinition> measures, EvaluateParameters parameters, DataScope scope,
        IProgress<EvaluationProgress>? progress, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(scope);
        var during = scope.During(parameters.Period.Start, parameters.Period.End);
        var builder = new MeasureReportBuilder(time);
        var evaluator = new MeasureEvaluator(repository, new StoreRecordSource(store));
        IReadOnlyCollection<string>? patientIds = null;
        if (parameters.SubjectType == "Patient")
        {
            patientIds = [parameters.SubjectId!];
        }
        else if (parameters.SubjectType == "Group")
        {
            var members = await GroupMembersAsync(parameters.SubjectId!, scope, cancellationToken);
            if (members is null)
            {
                return new([], new FhirIssue(MeasureErrors.UnknownSubject, $"Group/{parameters.SubjectId} is not stored", "subject"));
            }

            patientIds = members;
        }

        if (parameters.ReportKind == ReportKind.Subject)
        {
            var facts = await store.GetPatientFactsAsync(parameters.SubjectId!, during, cancellationToken);
            if (facts is null)
            {
                return new([], new FhirIssue(MeasureErrors.UnknownSubject, $"nothing is stored for Patient/{parameters.SubjectId}", "subject"));
            }

            var results = evaluator.EvaluateAll(measures, facts, parameters.Period);
            progress?.Report(new EvaluationProgress(1, 1, EvaluationProgress.Patients));
            return new([.. measures.Select((m, i) => builder.Individual(m, parameters.Period, results[i]))], null);
        }

        var keepSubjects = parameters.ReportKind == ReportKind.SubjectList;
        IReadOnlyList<PopulationSummary> summaries;
        ClusterRunResult? run = null;
        if (cluster is not null)
        {
            (summaries, run) = await cluster.SummarizeAsync(measures, parameters.Period, patientIds, parameters.PractitionerReference, keepSubjects, scope, progress);
        }
        else
        {
            var total = progress is null ? 0 : await PatientTotalAsync(store, patientIds, scope, cancellationToken);
            summaries = await new PopulationEvaluator(evaluator, options.Value.EffectiveWorkers).SummarizeAsync(
                Filter(store.StreamPatientFactsAsync(patientIds, during, cancellationToken), parameters.PractitionerReference, progress, total, cancellationToken),
                measures, parameters.Period, keepSubjects, cancellationToken);
        }

        return new([.. summaries.Select(s => parameters.ReportKind == ReportKind.SubjectList ? builder.SubjectList(s) : builder.Summary(s))], null, run);
    }

    /// <summary>
    /// The patients a stream will read, for progress: the ids asked for, else every index entry in the scope (for a
    /// payer: its members).
    /// </summary>
    internal static async Task<long> PatientTotalAsync(IResourceStore store, IReadOnlyCollection<string>? patientIds, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(store);
        ArgumentNullException.ThrowIfNull(scope);
        return patientIds?.Count ?? await store.CountPatientFactsAsync(scope, cancellationToken);
    }

    /// <summary>The practitioner's panel; progress counts every patient read (filtered out or not), so it reaches the total.</summary>
    private static async IAsyncEnumerable<PatientFacts> Filter(
        IAsyncEnumerable<PatientFacts> patients, string? practitioner, IProgress<EvaluationProgress>? progress, long total,
        [System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken cancellationToken)
    {
        long read = 0;
        await foreach (var patient in patients.WithCancellation(cancellationToken))
        {
            progress?.Report(new EvaluationProgress(++read, total, EvaluationProgress.Patients));
            if (practitioner is null || patient.Demographics?.GeneralPractitioner == practitioner)
            {
                yield return patient;
            }
        }
    }

    /// <summary>The patient ids among the Group's members (other member types are not patients), or null when no such Group is stored.</summary>
    private async Task<IReadOnlyCollection<string>?> GroupMembersAsync(string id, DataScope scope, CancellationToken cancellationToken)
    {
        var stored = await store.ReadAsync("Group", id, scope, cancellationToken);
        if (stored is not { Deleted: false, Json: { } json })
        {
            return null;
        }

        var group = FhirJson.Parse<Group>(json);
        return [.. group.Member.Where(m => m.Inactive != true).Select(m => FactExtractor.PatientIdOf(m.Entity)).OfType<string>().Distinct(StringComparer.Ordinal)];
    }
}

/// <summary>The reports, or why there are none; <see cref="Cluster"/> says where a cluster run's partitions ran (null on a single node).</summary>
public sealed record EvaluationOutcome(IReadOnlyList<MeasureReport> Reports, FhirIssue? Error, ClusterRunResult? Cluster = null)
{
    public void Deconstruct(out IReadOnlyList<MeasureReport> reports, out FhirIssue? error)
    {
        reports = Reports;
        error = Error;
    }
}
