namespace MeasureEval.Engine.Gaps;

/// <summary>
/// Our extensions on DetectedIssue carrying a care gap in machine-readable form (none is a modifier). Complex ones list
/// their parts as sub-extensions with the relative urls given here.
/// </summary>
public static class GapExtensions
{
    public const string Base = "https://measureeval.example.org/fhir/StructureDefinition/";

    /// <summary>valueCodeableConcept: the DEQM gaps-status code (<see cref="GapStatuses.System"/>).</summary>
    public const string Status = Base + "gap-status";

    /// <summary>valueCanonical: the measure (url|version) the gap is about.</summary>
    public const string Measure = Base + "gap-measure";

    /// <summary>valueDate: the latest date by which an action must happen to count in the period.</summary>
    public const string DueBy = Base + "gap-due-by";

    /// <summary>valueDate: the horizon a closed gap was judged against.</summary>
    public const string Horizon = Base + "gap-horizon";

    /// <summary>valueDate: the last day on which the closing evidence still counts (closed or prospective).</summary>
    public const string CountsThrough = Base + "gap-counts-through";

    /// <summary>valueDate: the day from which the measure falls due again (closed or prospective).</summary>
    public const string DueAgainFrom = Base + "gap-due-again-from";

    /// <summary>valueCode <c>any</c> (one action is enough) or <c>all</c> (every action is needed).</summary>
    public const string ActionsCombine = Base + "gap-actions-combine";

    /// <summary>Complex, repeating: one closing action — text, resourceType*, valueSet, code*, dueBy, missing.</summary>
    public const string Action = Base + "gap-action";

    /// <summary>Complex, repeating: one piece of evidence — text, date, reference*, counts.</summary>
    public const string Evidence = Base + "gap-evidence";

    /// <summary>valueString: the patient's primary-care panel ("Practitioner/x" or "unattributed").</summary>
    public const string Panel = Base + "gap-panel";

    /// <summary>valueString: the patient's payer ("Organization/x", "self-pay" or "none").</summary>
    public const string Payer = Base + "gap-payer";

    /// <summary>DetectedIssue.code: "care gap" in HL7 v3 ActCode.</summary>
    public const string ActCodeSystem = "http://terminology.hl7.org/CodeSystem/v3-ActCode";

    public const string CareGapCode = "CAREGAP";
}
