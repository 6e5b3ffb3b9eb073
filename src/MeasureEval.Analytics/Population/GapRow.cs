namespace MeasureEval.Analytics.Population;

/// <summary>
/// One patient with an open gap, for a care team's work list: who (the patient id), where (panel, payer) and, for
/// count criteria, what is missing. Never logged.
/// </summary>
public sealed record GapRow(string PatientId, string Panel, string Payer, string AgeBand, IReadOnlyList<GapCount> Missing);

/// <summary>A count criterion short of what it needs (doses of an antigen).</summary>
public sealed record GapCount(string Label, int Counted, int Required);
