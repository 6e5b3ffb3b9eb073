using Hl7.Fhir.Model;
using MeasureEval.Synthetic.Random;

namespace MeasureEval.Synthetic.Population;

/// <summary>A primary-care clinician with a panel, working at one site.</summary>
internal sealed record Clinician(string Id, int SiteIndex, double PanelWeight);

/// <summary>A payer of the scenario.</summary>
internal sealed record Payer(string Id, string Name, PayerKind Kind);

internal enum PayerKind
{
    Commercial,
    Medicaid,
    MedicareAdvantage,
}

/// <summary>
/// The invented scenario every population lives in: Riverbend Community Health, a network of community clinics,
/// its primary-care clinicians, and three health plans. Resources shared by all patients.
/// </summary>
internal sealed class ScenarioNetwork
{
    /// <summary>A full-time primary-care panel is commonly 2,000–2,500 patients (common practice).</summary>
    public const int FullTimePanel = 2200;

    private static readonly string[] SiteNames = ["Downtown", "Northside", "Eastfield", "Mill Creek"];

    private static readonly string[] ClinicianGiven = ["Amara", "Tobias", "Helena", "Rafael", "Ingrid", "Desmond", "Priya", "Lucas", "Maren", "Olu", "Yvette", "Calder", "Noor", "Bastian", "Leona", "Emeka"];

    private static readonly string[] ClinicianFamily = ["Okafor-Lindqvist", "Brennagh", "Vasquez-Hale", "Thornbury", "Achterberg", "Nakashima-Rowe", "Quillfeather", "Osei-Marlow", "Delacroix-Penn", "Haverstock", "Ivanescu", "Marchetti-Bloom"];

    private ScenarioNetwork(Organization parent, IReadOnlyList<Organization> sites, IReadOnlyList<Clinician> clinicians,
        IReadOnlyList<Practitioner> practitioners, IReadOnlyList<Payer> payers, IReadOnlyList<Organization> payerOrganizations)
    {
        Parent = parent;
        Sites = sites;
        Clinicians = clinicians;
        Practitioners = practitioners;
        Payers = payers;
        PayerOrganizations = payerOrganizations;
    }

    public Organization Parent { get; }

    public IReadOnlyList<Organization> Sites { get; }

    public IReadOnlyList<Clinician> Clinicians { get; }

    public IReadOnlyList<Practitioner> Practitioners { get; }

    public IReadOnlyList<Payer> Payers { get; }

    public IReadOnlyList<Organization> PayerOrganizations { get; }

    public Payer PayerOf(PayerKind kind) => Payers.First(p => p.Kind == kind);

    /// <summary>All shared resources, in a fixed order.</summary>
    public IEnumerable<Resource> Resources() =>
        [Parent, .. Sites, .. PayerOrganizations, .. Practitioners];

    /// <summary>
    /// Builds the network for a population. Clinician count follows realistic panels (one full-time panel per
    /// ~2,200 patients, part-timers carrying smaller panels), with at least one clinician per site so that small
    /// demo populations still show several panels.
    /// </summary>
    public static ScenarioNetwork Create(ulong seed, int patients)
    {
        var rng = Pcg32.ForStream(seed, ulong.MaxValue);
        var parent = new Organization
        {
            Id = rng.NextUuid(),
            Active = true,
            Type = [ClinicalCodes.Concept(new Coding(ClinicalCodes.OrganizationType, "prov", "Healthcare Provider"))],
            Name = "Riverbend Community Health",
            Identifier = [new Identifier("http://riverbend-health.example.org/fhir/organization", "RCH")],
        };

        var sites = SiteNames.Select((name, i) => new Organization
        {
            Id = rng.NextUuid(),
            Active = true,
            Type = [ClinicalCodes.Concept(new Coding(ClinicalCodes.OrganizationType, "prov", "Healthcare Provider"))],
            Name = $"Riverbend {name} Clinic",
            Identifier = [new Identifier("http://riverbend-health.example.org/fhir/organization", $"RCH-{i + 1:D2}")],
            PartOf = new ResourceReference($"Organization/{parent.Id}"),
        }).ToList();

        var payers = new List<Payer>
        {
            new(rng.NextUuid(), "Cedar Valley Health Plan", PayerKind.Commercial),
            new(rng.NextUuid(), "Lakeshore Medicaid Partners", PayerKind.Medicaid),
            new(rng.NextUuid(), "Summit Senior Advantage", PayerKind.MedicareAdvantage),
        };
        var payerOrganizations = payers.Select((p, i) => new Organization
        {
            Id = p.Id,
            Active = true,
            Type = [ClinicalCodes.Concept(new Coding(ClinicalCodes.OrganizationType, "pay", "Payer"))],
            Name = p.Name,
            Identifier = [new Identifier("http://riverbend-health.example.org/fhir/payer", $"PAYER-{i + 1:D2}")],
        }).ToList();

        var fullTimeEquivalents = Math.Max(SiteNames.Length, (patients + FullTimePanel - 1) / FullTimePanel);
        var clinicians = new List<Clinician>();
        var practitioners = new List<Practitioner>();
        for (var i = 0; i < fullTimeEquivalents; i++)
        {
            // One in five clinicians works part-time and carries about half a panel.
            var weight = rng.Chance(0.2) ? 0.5 : 1.0;
            var id = rng.NextUuid();
            var site = i % SiteNames.Length;
            clinicians.Add(new Clinician(id, site, weight));
            practitioners.Add(new Practitioner
            {
                Id = id,
                Active = true,
                Identifier = [new Identifier("http://riverbend-health.example.org/fhir/clinician", $"RCH-C{i + 1:D4}")],
                Name = [new HumanName { Family = rng.Pick(ClinicianFamily), Given = [rng.Pick(ClinicianGiven)], Prefix = ["Dr."] }],
                Gender = rng.Chance(0.55) ? AdministrativeGender.Female : AdministrativeGender.Male,
            });
        }

        return new ScenarioNetwork(parent, sites, clinicians, practitioners, payers, payerOrganizations);
    }
}
