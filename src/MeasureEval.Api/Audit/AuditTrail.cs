using MeasureEval.Core.Audit;
using Microsoft.AspNetCore.Http;

namespace MeasureEval.Api.Audit;

/// <summary>
/// The request feature an audited request carries: the patients its answer concerned. The audit filter fills it from
/// the FHIR answer; a handler whose answer is streamed (the care-gap export) adds the patients as it writes them.
/// </summary>
public sealed class AuditTrail
{
    private readonly HashSet<string> _patients = new(StringComparer.Ordinal);
    private readonly List<string> _listed = [];

    /// <summary>Distinct patients seen, including those beyond the listed cap.</summary>
    public int PatientCount => _patients.Count;

    /// <summary>The first <see cref="AuditRecord.MaxPatientsListed"/> distinct patients, in the order they were seen.</summary>
    public IReadOnlyList<string> Listed => _listed;

    /// <summary>The id of the event once written (a streamed answer completes it afterwards).</summary>
    internal string? EventId { get; set; }

    /// <summary>True when the handler streams its answer and names patients while writing (set by the handler).</summary>
    public bool Streamed { get; set; }

    internal int ListedAtAppend { get; set; }

    /// <summary>The status the access ended with when it differs from the response's (a streamed answer cut short).</summary>
    public int? FinalStatus { get; set; }

    public static AuditTrail? Of(HttpContext context) => context?.Features.Get<AuditTrail>();

    public void AddPatient(string? patientId)
    {
        // Counting every distinct id keeps the memory of a 100,000-patient export at a few MB of strings it already holds.
        if (!string.IsNullOrEmpty(patientId) && _patients.Add(patientId) && _listed.Count < AuditRecord.MaxPatientsListed)
        {
            _listed.Add(patientId);
        }
    }
}
