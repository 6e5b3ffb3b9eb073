using System.Globalization;
using Hl7.Fhir.Model;
using MeasureEval.Engine.Reports;

namespace MeasureEval.Engine.Gaps;

/// <summary>
/// One patient's gaps as FHIR: a collection Bundle holding the individual MeasureReport of each measure reported and one
/// DetectedIssue per measure whose evidence points at that report and the records that decided the gap.
/// </summary>
public sealed class CareGapBundleBuilder(MeasureReportBuilder reports, TimeProvider time)
{
    public Bundle Build(string patientId, IReadOnlyList<(MeasureDefinition Measure, CareGap Gap)> gaps)
    {
        ArgumentNullException.ThrowIfNull(gaps);
        var bundle = new Bundle
        {
            Id = Guid.NewGuid().ToString(),
            Type = Bundle.BundleType.Collection,
            Timestamp = time.GetUtcNow(),
            Identifier = new Identifier("urn:ietf:rfc:3986", $"urn:uuid:{Guid.NewGuid()}"),
        };
        foreach (var (measure, gap) in gaps)
        {
            var report = reports.Individual(measure, gap.Period, gap.Result);
            var reportUrl = $"urn:uuid:{Guid.Parse(report.Id!)}";
            var issue = DetectedIssue(measure, gap, patientId, reportUrl);
            bundle.Entry.Add(new Bundle.EntryComponent { FullUrl = reportUrl, Resource = report });
            bundle.Entry.Add(new Bundle.EntryComponent { FullUrl = $"urn:uuid:{Guid.Parse(issue.Id!)}", Resource = issue });
        }

        return bundle;
    }

    public DetectedIssue DetectedIssue(MeasureDefinition measure, CareGap gap, string patientId, string reportReference)
    {
        ArgumentNullException.ThrowIfNull(measure);
        ArgumentNullException.ThrowIfNull(gap);
        var issue = new DetectedIssue
        {
            Id = Guid.NewGuid().ToString("N"),
            Status = ObservationStatus.Final,
            Code = new CodeableConcept(GapExtensions.ActCodeSystem, GapExtensions.CareGapCode, "Care Gaps"),
            Patient = new ResourceReference($"Patient/{patientId}"),
            Identified = new Period(new FhirDateTime(Day(gap.Period.Start)), new FhirDateTime(Day(gap.Period.End))),
            Detail = Detail(measure, gap),
        };
        issue.Extension.Add(new Extension(GapExtensions.Status, new CodeableConcept(GapStatuses.System, gap.Status.Code(), gap.Status.Display())));
        issue.Extension.Add(new Extension(GapExtensions.Measure, new Canonical(measure.CanonicalReference)));
        issue.Extension.Add(new Extension(GapExtensions.Horizon, DateOf(gap.Horizon)));
        issue.Extension.Add(new Extension(GapExtensions.Panel, new FhirString(gap.Panel)));
        issue.Extension.Add(new Extension(GapExtensions.Payer, new FhirString(gap.Payer)));
        if (gap.DueBy is { } due)
        {
            issue.Extension.Add(new Extension(GapExtensions.DueBy, DateOf(due)));
        }

        if (gap.CountsThrough is { } through)
        {
            issue.Extension.Add(new Extension(GapExtensions.CountsThrough, DateOf(through)));
            issue.Extension.Add(new Extension(GapExtensions.DueAgainFrom, DateOf(gap.DueAgainFrom!.Value)));
        }

        if (gap.Actions.Count > 0)
        {
            issue.Extension.Add(new Extension(GapExtensions.ActionsCombine, new Code(gap.ActionsAllNeeded ? "all" : "any")));
        }

        foreach (var action in gap.Actions)
        {
            var extension = new Extension { Url = GapExtensions.Action };
            extension.Extension.Add(new Extension("text", new FhirString(action.Text)));
            foreach (var type in action.ResourceTypes)
            {
                extension.Extension.Add(new Extension("resourceType", new Code(type)));
            }

            if (action.ValueSetUrl is { } valueSet)
            {
                extension.Extension.Add(new Extension("valueSet", new Canonical(valueSet)));
            }

            foreach (var code in action.Codes)
            {
                extension.Extension.Add(new Extension("code", new Coding(code.System, code.Code)));
            }

            if (action.DueBy is { } actionDue)
            {
                extension.Extension.Add(new Extension("dueBy", DateOf(actionDue)));
            }

            if (action.Missing is { } missing)
            {
                extension.Extension.Add(new Extension("missing", new Integer(missing)));
            }

            issue.Extension.Add(extension);
        }

        foreach (var evidence in gap.Evidence)
        {
            var extension = new Extension { Url = GapExtensions.Evidence };
            extension.Extension.Add(new Extension("text", new FhirString(evidence.Text)));
            if (evidence.Date is { } date)
            {
                extension.Extension.Add(new Extension("date", DateOf(date)));
            }

            foreach (var reference in evidence.References)
            {
                extension.Extension.Add(new Extension("reference", new ResourceReference(reference)));
            }

            extension.Extension.Add(new Extension("counts", new FhirBoolean(evidence.Counts)));
            issue.Extension.Add(extension);
        }

        var detail = new DetectedIssue.EvidenceComponent { Detail = [new ResourceReference(reportReference) { Display = "individual MeasureReport" }] };
        var deciding = gap.Evidence.SelectMany(e => e.References)
            .Concat(gap.Result.EvaluatedResources.TryGetValue(PopulationKind.Numerator, out var numerator) ? numerator : [])
            .Where(r => !r.StartsWith("Patient/", StringComparison.Ordinal))
            .Distinct(StringComparer.Ordinal);
        foreach (var reference in deciding)
        {
            detail.Detail.Add(new ResourceReference(reference));
        }

        issue.Evidence.Add(detail);
        return issue;
    }

    private static string Detail(MeasureDefinition measure, CareGap gap)
    {
        var title = measure.Title ?? measure.Name;
        return gap.Status switch
        {
            GapStatus.Open => $"{title}: open. To close: {gap.ActionText}. Last evidence: {gap.EvidenceText}.",
            GapStatus.Closed => $"{title}: closed. {gap.EvidenceText}{(gap.CountsThrough is { } t ? $"; counts through {Day(t)}, due again from {Day(gap.DueAgainFrom!.Value)}" : "; does not fall due again")}.",
            GapStatus.Prospective => $"{title}: closed until {Day(gap.CountsThrough!.Value)} ({gap.EvidenceText}); to stay closed: {gap.ActionText}.",
            _ => $"{title}: not applicable (not in the denominator, or excluded or excepted).",
        };
    }

    private static string Day(DateOnly date) => date.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    private static Date DateOf(DateOnly date) => new(Day(date));
}
