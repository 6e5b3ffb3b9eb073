using Hl7.Fhir.Model;

namespace MeasureEval.Synthetic.Population;

/// <summary>One generated patient: the Patient first, then every resource that belongs to them.</summary>
public sealed record PatientRecord(int Index, Patient Patient, IReadOnlyList<Resource> Resources);
