using Hl7.Fhir.Model;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Synthetic.Tests.Population;

public class PopulationGeneratorTests
{
    private static readonly DateOnly AsOf = new(2026, 11, 30);

    private static readonly Lazy<(IReadOnlyList<Resource> Shared, IReadOnlyList<PatientRecord> Patients)> Sample = new(() =>
    {
        var generator = new PopulationGenerator(new PopulationOptions { Patients = 4000, Seed = 99, AsOf = AsOf });
        return (generator.SharedResources(), generator.Patients().ToList());
    });

    private static IEnumerable<Resource> All => Sample.Value.Shared.Concat(Sample.Value.Patients.SelectMany(p => p.Resources));

    private static IEnumerable<Base> Descendants(Base node)
    {
        foreach (var (_, value) in node.EnumerateElements())
        {
            IEnumerable<Base> children = value switch
            {
                Base single => [single],
                IEnumerable<Base> many => many,
                _ => [],
            };
            foreach (var child in children)
            {
                yield return child;
                foreach (var grandchild in Descendants(child))
                {
                    yield return grandchild;
                }
            }
        }
    }

    private static int AgeAt(Patient p, DateOnly day)
    {
        // A partial birth date is taken at its first day.
        var stated = p.BirthDate!;
        var birth = DateOnly.Parse(stated.Length switch { 4 => stated + "-01-01", 7 => stated + "-01", _ => stated }, System.Globalization.CultureInfo.InvariantCulture);
        var age = day.Year - birth.Year;
        return day.Month < birth.Month || (day.Month == birth.Month && day.Day < birth.Day) ? age - 1 : age;
    }

    private static bool HasCode(Condition c, string system, string prefix) =>
        c.Code!.Coding.Any(x => x.System == system && x.Code!.StartsWith(prefix, StringComparison.Ordinal));

    private static double ShareOfAdultsWith(Func<PatientRecord, bool> predicate)
    {
        var adults = Sample.Value.Patients.Where(p => AgeAt(p.Patient, AsOf) >= 18).ToList();
        return (double)adults.Count(predicate) / adults.Count;
    }

    [Fact]
    public void Patients_Diabetes_AtAdultPrevalenceOfAboutATenth()
    {
        // Diagnosed diabetes ~10–12 % of US adults (common practice, from memory); a wider band for sampling.
        var share = ShareOfAdultsWith(p => p.Resources.OfType<Condition>().Any(c =>
            HasCode(c, "http://hl7.org/fhir/sid/icd-10-cm", "E1") || c.Code!.Coding.Any(x => x.Code is "44054006" or "46635009" or "73211009")));
        Assert.InRange(share, 0.08, 0.15);
    }

    [Fact]
    public void Patients_Hypertension_AtAdultPrevalenceOfAThirdOrMore()
    {
        // Hypertension ~30–45 % of adults (common practice, from memory).
        var share = ShareOfAdultsWith(p => p.Resources.OfType<Condition>().Any(c => c.Code!.Coding.Any(x => x.Code is "I10" or "59621000")));
        Assert.InRange(share, 0.28, 0.47);
    }

    [Fact]
    public void Patients_Gender_RoughlyHalfFemale()
    {
        var female = Sample.Value.Patients.Count(p => p.Patient.Gender == AdministrativeGender.Female) / (double)Sample.Value.Patients.Count;
        Assert.InRange(female, 0.48, 0.54);
    }

    [Fact]
    public void Patients_InfluenzaVaccination_NearHalfOfThoseSixMonthsOrOlder()
    {
        // Seasonal influenza vaccination ~45–50 % (common practice, from memory).
        var eligible = Sample.Value.Patients.Where(p => AgeAt(p.Patient, AsOf) >= 1).ToList();
        var vaccinated = eligible.Count(p => p.Resources.OfType<Immunization>().Any(i =>
            i.Status == Immunization.ImmunizationStatusCodes.Completed && i.VaccineCode.Coding.Any(c => c.Code is "150" or "158" or "171" or "185" or "197" or "205" or "88" or "320" or "333" or "161")));
        Assert.InRange(vaccinated / (double)eligible.Count, 0.38, 0.55);
    }

    [Fact]
    public void Patients_HbA1cInDiabetes_MedianNearSevenPercent()
    {
        // HbA1c in treated diabetes is commonly centred near 7 % (common practice).
        var values = Sample.Value.Patients
            .Where(p => p.Resources.OfType<Condition>().Any(c => HasCode(c, "http://hl7.org/fhir/sid/icd-10-cm", "E1")))
            .SelectMany(p => p.Resources.OfType<Observation>())
            .Where(o => o.Code.Coding.Any(c => c.Code == "4548-4"))
            .Select(o => o.Value as Quantity)
            .Where(q => q is { Code: "%", Comparator: null, Value: not null })
            .Select(q => q!.Value!.Value)
            .Order()
            .ToList();
        Assert.True(values.Count > 100, $"{values.Count} results");
        Assert.InRange(values[values.Count / 2], 6.6m, 7.5m);
    }

    [Fact]
    public void Patients_DataQualityFaults_AtAFewPercentOfClinicalRecords()
    {
        // Real extracts carry faults in roughly 1–2 % of records (common practice, from memory).
        var clinical = Sample.Value.Patients.SelectMany(p => p.Resources).Where(r => r is Observation or Procedure or Immunization or Encounter or Condition or DiagnosticReport).ToList();
        var faulty = clinical.Count(r => r switch
        {
            Observation o => o.Status == ObservationStatus.EnteredInError || (o.Effective is null && o.DataAbsentReason is null) || o.Effective is FhirDateTime { Value.Length: < 10 },
            Procedure p => p.Status == EventStatus.EnteredInError || p.Performed is null || p.Performed is FhirDateTime { Value.Length: < 10 },
            Immunization i => i.Status == Immunization.ImmunizationStatusCodes.EnteredInError,
            Encounter e => e.Status == Encounter.EncounterStatus.EnteredInError || e.Period is null,
            Condition c => c.VerificationStatus?.Coding.Any(x => x.Code == "entered-in-error") == true || c.Onset is null || c.Onset is FhirDateTime { Value.Length: < 10 },
            DiagnosticReport d => d.Status == DiagnosticReport.DiagnosticReportStatus.EnteredInError || d.Effective is null,
            _ => false,
        });
        Assert.InRange(faulty / (double)clinical.Count, 0.005, 0.03);
    }

    [Fact]
    public void Patients_EveryReference_ResolvesWithinThePopulation()
    {
        var known = All.Select(r => $"{r.TypeName}/{r.Id}").ToHashSet(StringComparer.Ordinal);
        var references = All.SelectMany(r => Descendants(r).OfType<ResourceReference>()).Select(r => r.Reference).ToList();
        Assert.NotEmpty(references);
        Assert.All(references, reference => Assert.Contains(reference!, known));
    }

    [Fact]
    public void Patients_Ids_AreUniqueUuids()
    {
        var ids = All.Select(r => r.Id).ToList();
        Assert.Equal(ids.Count, ids.Distinct(StringComparer.Ordinal).Count());
        Assert.All(ids, id => Assert.True(Guid.TryParse(id, out _), id));
    }

    [Fact]
    public void Patients_Dates_NeverAfterTheAsOfDate()
    {
        var limit = AsOf.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture);
        var dates = All.SelectMany(r => Descendants(r)).Select(e => e switch
        {
            FhirDateTime dt => dt.Value,
            Date d => d.Value,
            _ => null,
        }).OfType<string>().ToList();
        Assert.NotEmpty(dates);
        Assert.All(dates, d => Assert.True(string.CompareOrdinal(d.Length >= 10 ? d[..10] : d, limit) <= 0, d));
    }

    [Fact]
    public void Patients_SameSeed_PatientDoesNotDependOnPopulationSize()
    {
        var small = new PopulationGenerator(new PopulationOptions { Patients = 3, Seed = 99, AsOf = AsOf }).Patients().Last();
        var large = Sample.Value.Patients[2];
        Assert.Equal(large.Patient.Id, small.Patient.Id);
        Assert.Equal(large.Resources.Count, small.Resources.Count);
    }

}
