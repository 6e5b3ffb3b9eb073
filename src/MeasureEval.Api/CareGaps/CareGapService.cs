using System.Runtime.CompilerServices;
using Hl7.Fhir.Model;
using MeasureEval.Api.Errors;
using MeasureEval.Api.Measures;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Core.Security;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using MeasureEval.Engine.Gaps;
using Microsoft.Extensions.Options;

namespace MeasureEval.Api.CareGaps;

/// <summary>One patient's gaps of the statuses asked for, in the order of the measures.</summary>
public sealed record PatientGaps(PatientFacts Facts, IReadOnlyList<(MeasureDefinition Measure, CareGap Gap)> Gaps);

/// <summary>
/// A resolved request: the measures, for a Patient or Group subject the patient ids, and the caller's scope during the
/// measurement period (the stream reads only those patients).
/// </summary>
public sealed record CareGapSelection(MeasureRepository Repository, IReadOnlyList<MeasureDefinition> Measures, IReadOnlyCollection<string>? PatientIds, DataScope Scope);

/// <summary>
/// Picks the patients (one, a Group's members, everyone), narrows them to a panel or a payer's members, and streams
/// their gaps: each patient's facts are read once for all measures, and nothing grows with the population. Everything is
/// read within the caller's scope: another payer's patient or Group answers as unknown (404), and is never streamed.
/// </summary>
/// <remarks>
/// Patients are analysed in batches on <see cref="EvaluationOptions.Workers"/> threads and yielded in stream order, so
/// the rows are the serial ones in the same order.
/// </remarks>
public sealed class CareGapService(IResourceStore store, MeasureCatalog catalog, IOptions<EvaluationOptions> options)
{
    /// <summary>Patients analysed together in parallel: large enough to share the work, small enough to keep the stream flowing.</summary>
    private const int ParallelBatch = 256;

    public async Task<(CareGapSelection? Selection, IReadOnlyList<FhirIssue> Issues)> SelectAsync(CareGapQuery query, DataScope scope, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(query);
        ArgumentNullException.ThrowIfNull(scope);
        var during = scope.During(query.Period.Start, query.Period.End);
        var repository = await catalog.GetAsync(cancellationToken);
        var issues = new List<FhirIssue>();
        var measures = new List<MeasureDefinition>();
        if (query.MeasureIds.Count == 0)
        {
            measures.AddRange(repository.Measures);
        }

        foreach (var id in query.MeasureIds)
        {
            if (repository.TryGetMeasure(id, out var measure))
            {
                measures.Add(measure);
            }
            else
            {
                issues.Add(new FhirIssue(CareGapErrors.UnknownMeasure, $"no measure '{id}' is loaded", "measureId"));
            }
        }

        IReadOnlyCollection<string>? patientIds = null;
        if (query.SubjectType == "Patient")
        {
            patientIds = [query.SubjectId!];
            if (await store.GetPatientFactsAsync(query.SubjectId!, during, cancellationToken) is null)
            {
                issues.Add(new FhirIssue(CareGapErrors.UnknownSubject, $"nothing is stored for Patient/{query.SubjectId}", "subject"));
            }
        }
        else if (query.SubjectType == "Group")
        {
            patientIds = await GroupMembersAsync(query.SubjectId!, query.Period, scope, cancellationToken);
            if (patientIds is null)
            {
                issues.Add(new FhirIssue(CareGapErrors.UnknownSubject, $"Group/{query.SubjectId} is not stored", "subject"));
            }
        }

        return issues.Count > 0 ? (null, issues) : (new CareGapSelection(repository, measures, patientIds, during), issues);
    }

    public IAsyncEnumerable<PatientGaps> StreamAsync(CareGapSelection selection, CareGapQuery query, CancellationToken cancellationToken) =>
        StreamAsync(selection, query, progress: null, cancellationToken);

    /// <summary>As above, telling <paramref name="progress"/> how many patients were read (asynchronous jobs).</summary>
    public async IAsyncEnumerable<PatientGaps> StreamAsync(
        CareGapSelection selection, CareGapQuery query, IProgress<EvaluationProgress>? progress, [EnumeratorCancellation] CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(selection);
        ArgumentNullException.ThrowIfNull(query);
        var records = new StoreRecordSource(store);
        var evaluator = new MeasureEvaluator(selection.Repository, records);
        var analyzer = new GapAnalyzer(evaluator, records);
        var total = progress is null ? 0 : await MeasureEvaluationService.PatientTotalAsync(store, selection.PatientIds, selection.Scope, cancellationToken);
        var workers = options.Value.EffectiveWorkers;
        var batchSize = workers > 1 ? ParallelBatch : 1;
        var batch = new List<PatientFacts>(batchSize);
        long read = 0;
        await foreach (var facts in store.StreamPatientFactsAsync(selection.PatientIds, selection.Scope, cancellationToken))
        {
            progress?.Report(new EvaluationProgress(++read, total, EvaluationProgress.Patients));
            if (!OnPanel(facts, query.Practitioner) || !CoveredBy(facts, query.Organization, query.Period))
            {
                continue;
            }

            batch.Add(facts);
            if (batch.Count == batchSize)
            {
                foreach (var gaps in Analyze(batch))
                {
                    yield return gaps;
                }

                batch.Clear();
            }
        }

        foreach (var gaps in Analyze(batch))
        {
            yield return gaps;
        }

        // Each patient's gaps land in its own slot, so the order is the stream's whatever thread finished first.
        IEnumerable<PatientGaps> Analyze(List<PatientFacts> patients)
        {
            var found = new PatientGaps?[patients.Count];
            if (patients.Count == 1 || workers <= 1)
            {
                for (var i = 0; i < patients.Count; i++)
                {
                    found[i] = AnalyzeOne(patients[i]);
                }
            }
            else
            {
                Parallel.For(0, patients.Count, new ParallelOptions { MaxDegreeOfParallelism = workers, CancellationToken = cancellationToken }, i => found[i] = AnalyzeOne(patients[i]));
            }

            return found.OfType<PatientGaps>();
        }

        PatientGaps? AnalyzeOne(PatientFacts facts)
        {
            var results = evaluator.EvaluateAll(selection.Measures, facts, query.Period);
            var gaps = new List<(MeasureDefinition, CareGap)>();
            for (var i = 0; i < selection.Measures.Count; i++)
            {
                var gap = analyzer.Analyze(selection.Measures[i], facts, query.Period, results[i], query.Horizon);
                if (query.Statuses.Contains(gap.Status))
                {
                    gaps.Add((selection.Measures[i], gap));
                }
            }

            return gaps.Count > 0 ? new PatientGaps(facts, gaps) : null;
        }
    }

    /// <summary>The primary-care panel: the patient's first generalPractitioner.</summary>
    public static bool OnPanel(PatientFacts facts, string? practitioner) =>
        practitioner is null || (facts.Demographics?.GeneralPractitioner is { } gp && SameReference(gp, practitioner));

    /// <summary>A payer's members: an active Coverage overlapping the period (no period: all of it) whose payor is the Organization.</summary>
    public static bool CoveredBy(PatientFacts facts, string? organization, MeasurementPeriod period)
    {
        ArgumentNullException.ThrowIfNull(facts);
        ArgumentNullException.ThrowIfNull(period);
        if (organization is null)
        {
            return true;
        }

        foreach (var coverage in facts.Coverages)
        {
            var start = StatedTime.TryParse(coverage.PeriodStart, out var s) ? s.First : DateOnly.MinValue;
            var end = StatedTime.TryParse(coverage.PeriodEnd, out var e) ? e.Last : DateOnly.MaxValue;
            if (coverage.Status == "active" && start <= period.End && end >= period.Start && coverage.Payors.Any(p => SameReference(p, organization)))
            {
                return true;
            }
        }

        return false;
    }

    /// <summary>"Organization/x" matches itself and an absolute reference ending in "/Organization/x".</summary>
    private static bool SameReference(string reference, string relative) =>
        reference == relative || reference.EndsWith("/" + relative, StringComparison.Ordinal);

    /// <summary>
    /// The patient ids among the Group's members that are not inactive and whose attribution period (member.period, when
    /// given) overlaps the measurement period; null when no such Group is stored.
    /// </summary>
    private async Task<IReadOnlyCollection<string>?> GroupMembersAsync(string id, MeasurementPeriod period, DataScope scope, CancellationToken cancellationToken)
    {
        var stored = await store.ReadAsync("Group", id, scope, cancellationToken);
        if (stored is not { Deleted: false, Json: { } json })
        {
            return null;
        }

        var group = FhirJson.Parse<Group>(json);
        return [.. group.Member.Where(m => m.Inactive != true && Attributed(m.Period, period)).Select(m => FactExtractor.PatientIdOf(m.Entity)).OfType<string>().Distinct(StringComparer.Ordinal)];
    }

    private static bool Attributed(Period? attribution, MeasurementPeriod period)
    {
        var start = StatedTime.TryParse(attribution?.Start, out var s) ? s.First : DateOnly.MinValue;
        var end = StatedTime.TryParse(attribution?.End, out var e) ? e.Last : DateOnly.MaxValue;
        return start <= period.End && end >= period.Start;
    }
}
