using Hl7.Fhir.Model;
using MeasureEval.Synthetic.Random;
using static MeasureEval.Synthetic.Population.ClinicalCodes;

namespace MeasureEval.Synthetic.Population;

/// <summary>
/// Simulates one patient of the scenario: demographics, coverage, problem list, visits with vitals and labs,
/// screenings and immunizations, shaped for the measurement year that contains the as-of date.
/// Rates are marked "common practice" or "from memory": plausible for a US community-clinic population,
/// not sourced figures.
/// </summary>
internal sealed class PatientSimulator
{
    private static readonly string[] GivenFemale = ["Ada", "Beatrix", "Celeste", "Dahlia", "Elowen", "Fern", "Greta", "Hazel", "Iris", "Juniper", "Kestrel", "Linnea", "Marisol", "Nell", "Opal", "Posy", "Quinn", "Rosalind", "Saffron", "Tamsin", "Una", "Verity", "Wren", "Xiomara", "Yara", "Zinnia"];
    private static readonly string[] GivenMale = ["Alder", "Bram", "Caspian", "Dorian", "Ellis", "Flint", "Gideon", "Hollis", "Ignatius", "Jasper", "Kit", "Leander", "Milo", "Nico", "Orrin", "Percival", "Quill", "Rowan", "Silas", "Thane", "Ulric", "Vale", "Wilder", "Xander", "Yusuf", "Zeke"];
    private static readonly string[] Family = ["Ashgrove", "Birchwell", "Copperfield", "Dunmore", "Elderberry", "Fairbrook", "Glenhaven", "Hollowell", "Ironside", "Juniperhill", "Kettering", "Larkspur", "Marblehead", "Northcott", "Oakhurst", "Pennywhistle", "Quarrington", "Ravensworth", "Stonebridge", "Thistlewood", "Underhill", "Valemont", "Willowby", "Yarrowdale"];
    private static readonly string[] Streets = ["River Rd", "Mill St", "Heron Way", "Cedar Ln", "Quarry Ave", "Lantern Ct", "Orchard Pl", "Foundry St"];
    private static readonly string[] Towns = ["Riverbend", "Riverbend", "Riverbend", "Mill Creek", "Eastfield", "Cedar Hollow"];

    /// <summary>Age mix at the as-of date, years (from memory: a US-like pyramid, a little younger as community clinics are).</summary>
    private static readonly (( int Min, int Max) Item, double Weight)[] AgeBands =
    [
        ((0, 1), 2.4), ((2, 4), 3.6), ((5, 11), 8.5), ((12, 17), 7.5), ((18, 29), 15), ((30, 44), 20),
        ((45, 49), 6.5), ((50, 64), 18), ((65, 74), 11), ((75, 84), 5.5), ((85, 99), 2),
    ];

    private readonly Pcg32 _rng;
    private readonly ScenarioNetwork _network;
    private readonly DateOnly _asOf;
    private readonly DateOnly _periodStart;
    private readonly DateOnly _periodEnd;
    private readonly ResourceFactory _f;
    private readonly List<Encounter> _visits = [];

    private DateOnly _birth;
    private int _age;
    private bool _female;
    private DateOnly _lastActive;
    private Clinician? _clinician;
    private Organization _site = null!;
    private bool _diabetes;
    private bool _hypertension;
    private bool _depressionHistory;
    private bool _pregnantInPeriod;
    private bool _cervixRemoved;

    private PatientSimulator(Pcg32 rng, Pcg32 ids, ScenarioNetwork network, DateOnly asOf)
    {
        _rng = rng;
        _network = network;
        _asOf = asOf;
        _periodStart = new DateOnly(asOf.Year, 1, 1);
        _periodEnd = new DateOnly(asOf.Year, 12, 31);
        _f = new ResourceFactory(rng, ids, ids.NextUuid());
    }

    /// <summary>Patient number <paramref name="index"/> of the seed: independent of every other patient and of the population size.</summary>
    public static PatientRecord Simulate(ulong seed, int index, ScenarioNetwork network, DateOnly asOf)
    {
        var stream = (ulong)index * 2;
        var simulator = new PatientSimulator(Pcg32.ForStream(seed, stream), Pcg32.ForStream(seed, stream + 1), network, asOf);
        var patient = simulator.Run();
        return new PatientRecord(index, patient, simulator._f.Resources);
    }

    private int AgeOn(DateOnly day)
    {
        var age = day.Year - _birth.Year;
        if (day.Month < _birth.Month || (day.Month == _birth.Month && day.Day < _birth.Day))
        {
            age--;
        }

        return age;
    }

    private DateOnly Birthday(int years) => _birth.AddYears(years);

    /// <summary>A uniform day in [from, to], or null when the interval is empty.</summary>
    private DateOnly? Day(DateOnly from, DateOnly to)
    {
        if (to < from)
        {
            return null;
        }

        return from.AddDays(_rng.NextInt(to.DayNumber - from.DayNumber + 1));
    }

    private DateOnly Max(DateOnly a, DateOnly b) => a > b ? a : b;

    private DateOnly Min(DateOnly a, DateOnly b) => a < b ? a : b;

    private Patient Run()
    {
        var patient = Demographics();
        _f.Add(patient);
        Coverages();
        ProblemList();
        Visits();
        ColorectalScreening();
        BreastScreening();
        CervicalScreening();
        DepressionScreening();
        Influenza();
        ChildhoodSeries();
        HospiceOrPalliative();
        return patient;
    }

    private Patient Demographics()
    {
        var (minAge, maxAge) = _rng.PickWeighted(AgeBands);
        _age = _rng.Between(minAge, maxAge);
        var latest = _asOf.AddYears(-_age);
        var earliest = _asOf.AddYears(-_age - 1).AddDays(1);
        _birth = Day(earliest, latest)!.Value;
        _age = AgeOn(_asOf);

        // Sex recorded: 51 % female (from memory); a few other/unknown.
        var sexDraw = _rng.NextDouble();
        _female = sexDraw < 0.51;
        var gender = sexDraw switch
        {
            < 0.51 => AdministrativeGender.Female,
            < 0.996 => AdministrativeGender.Male,
            < 0.998 => AdministrativeGender.Other,
            _ => AdministrativeGender.Unknown,
        };

        // Annual mortality rising with age (from memory, rough US life-table shape); half of those who died
        // did so in the year before the measurement year.
        var mortality = _age switch { < 45 => 0.001, < 65 => 0.006, < 75 => 0.018, < 85 => 0.045, _ => 0.13 };
        DateOnly? death = null;
        var deceasedWithoutDate = false;
        _lastActive = _asOf;
        if (_rng.Chance(mortality))
        {
            death = _rng.Chance(0.5) ? Day(_periodStart.AddYears(-1), _periodStart.AddDays(-1)) : Day(_periodStart, _asOf);
            deceasedWithoutDate = _rng.Chance(0.1);
            if (death is { } d && d > _birth)
            {
                _lastActive = d.AddDays(-1);
            }
            else
            {
                death = null;
            }
        }
        else if (_rng.Chance(0.06))
        {
            // Moved away or changed clinic 10–18 months ago: records stop (common practice for panel churn).
            _lastActive = Max(_birth, _asOf.AddMonths(-_rng.Between(10, 18)));
        }

        // Panel attribution: about 3 % have no assigned clinician (common practice).
        if (!_rng.Chance(0.03))
        {
            _clinician = _rng.PickWeighted([.. _network.Clinicians.Select(c => (c, c.PanelWeight))]);
            _site = _network.Sites[_clinician.SiteIndex];
        }
        else
        {
            _site = _rng.Pick(_network.Sites);
        }

        var given = _female ? _rng.Pick(GivenFemale) : _rng.Pick(GivenMale);
        var patient = new Patient
        {
            Id = _f.PatientId,
            Identifier = [new Identifier("http://riverbend-health.example.org/fhir/mrn", $"RB{_rng.Between(1000000, 9999999)}")],
            Active = _lastActive == _asOf && death is null,
            Name = [new HumanName { Use = HumanName.NameUse.Official, Family = _rng.Pick(Family), Given = [given] }],
            Gender = gender,
            BirthDate = BirthDateAsRecorded(),
            Address = [new Address { Line = [$"{_rng.Between(1, 2999)} {_rng.Pick(Streets)}"], City = _rng.Pick(Towns), PostalCode = $"9{_rng.Between(7000, 7099):D4}" }],
            ManagingOrganization = new ResourceReference($"Organization/{_site.Id}"),
        };
        if (_clinician is not null)
        {
            patient.GeneralPractitioner = [new ResourceReference($"Practitioner/{_clinician.Id}")];
        }

        if (death is { } died)
        {
            patient.Deceased = deceasedWithoutDate ? new FhirBoolean(true) : new FhirDateTime(ResourceFactory.Date(died));
        }

        return patient;
    }

    /// <summary>A few birth dates are only a year or month (data-quality fault, ~0.3 %).</summary>
    private string BirthDateAsRecorded() => _rng.NextDouble() switch
    {
        < 0.0015 => _birth.ToString("yyyy", System.Globalization.CultureInfo.InvariantCulture),
        < 0.003 => _birth.ToString("yyyy-MM", System.Globalization.CultureInfo.InvariantCulture),
        _ => ResourceFactory.Date(_birth),
    };

    private void Coverages()
    {
        // Payer mix by age (from memory, typical of a community health center).
        var choice = _age switch
        {
            >= 65 => _rng.PickWeighted<PayerKind?>([(PayerKind.MedicareAdvantage, 78), (PayerKind.Commercial, 8), (PayerKind.Medicaid, 4), (null, 10)]),
            < 18 => _rng.PickWeighted<PayerKind?>([(PayerKind.Medicaid, 55), (PayerKind.Commercial, 35), (null, 10)]),
            _ => _rng.PickWeighted<PayerKind?>([(PayerKind.Commercial, 52), (PayerKind.Medicaid, 28), (null, 20)]),
        };
        var end = _lastActive < _asOf ? _lastActive : (DateOnly?)null;
        if (choice is not { } kind)
        {
            // Without a plan: about half are recorded as self-pay, the rest have no Coverage at all.
            if (_rng.Chance(0.45))
            {
                SelfPay(Max(_birth, _periodStart.AddYears(-_rng.Between(0, 4))), end);
            }

            return;
        }

        var start = Min(_asOf, Max(_birth, new DateOnly(_periodStart.Year - _rng.Between(0, 8), _rng.Between(1, 12), 1)));
        if (end is { } stop && stop < start)
        {
            start = stop;
        }

        if (_rng.Chance(0.07) && end is null && _birth < _periodStart.AddYears(-1))
        {
            // Switched plans during the measurement year: the earlier plan ended, the new one began next day.
            var switchDay = Day(_periodStart.AddMonths(1), Min(_asOf, _periodEnd).AddMonths(-1)) ?? _periodStart;
            var previous = _rng.Pick(_network.Payers.Where(p => p.Kind != kind).ToList());
            PlanCoverage(previous, Max(_birth, Min(start, switchDay.AddMonths(-6))), switchDay.AddDays(-1), 1, "active");
            start = switchDay;
        }

        var payer = _network.PayerOf(kind);
        PlanCoverage(payer, start, end, _rng.Chance(0.9) ? 1 : null, "active");

        // Dual eligibility: Medicaid as secondary payer for some Medicare Advantage members.
        if (kind == PayerKind.MedicareAdvantage && _rng.Chance(0.15))
        {
            PlanCoverage(_network.PayerOf(PayerKind.Medicaid), start, end, 2, "active");
        }

        // Cancelled or erroneous coverage records that must not count.
        if (_rng.Chance(0.02))
        {
            PlanCoverage(_rng.Pick(_network.Payers), _periodStart, null, 1, _rng.Chance(0.7) ? "cancelled" : "entered-in-error");
        }
    }

    private void PlanCoverage(Payer payer, DateOnly start, DateOnly? end, int? order, string status)
    {
        var coverage = new Coverage
        {
            Id = _f.NewId(),
            Status = status switch
            {
                "cancelled" => FinancialResourceStatusCodes.Cancelled,
                "entered-in-error" => FinancialResourceStatusCodes.EnteredInError,
                _ => FinancialResourceStatusCodes.Active,
            },
            Type = Concept(new Coding(ActCode, payer.Kind == PayerKind.Commercial ? "HIP" : "PUBLICPOL")),
            SubscriberId = $"{payer.Name[..2].ToUpperInvariant()}{_rng.Between(10000000, 99999999)}",
            Beneficiary = new ResourceReference(_f.PatientReference),
            Relationship = Concept(new Coding(SubscriberRelationship, "self")),
            Period = new Period { Start = ResourceFactory.Date(start), End = end is { } e ? ResourceFactory.Date(e) : null },
            Payor = [new ResourceReference($"Organization/{payer.Id}") { Display = payer.Name }],
            Order = order,
        };
        _f.Add(coverage);
    }

    private void SelfPay(DateOnly start, DateOnly? end)
    {
        if (end is { } stop && stop < start)
        {
            start = stop;
        }

        _f.Add(new Coverage
        {
            Id = _f.NewId(),
            Status = FinancialResourceStatusCodes.Active,
            Type = Concept(new Coding(CoverageSelfPay, "pay")),
            Beneficiary = new ResourceReference(_f.PatientReference),
            Relationship = Concept(new Coding(SubscriberRelationship, "self")),
            Period = new Period { Start = ResourceFactory.Date(start), End = end is { } e ? ResourceFactory.Date(e) : null },
            Payor = [new ResourceReference(_f.PatientReference)],
        });
    }

    /// <summary>Onset some years before the as-of date, never before the given age; or during the measurement year.</summary>
    private DateOnly OnsetDay(int maxYearsAgo, int notBeforeAge, double inPeriodShare)
    {
        var floor = Birthday(notBeforeAge);
        if (_rng.Chance(inPeriodShare) && Day(Max(floor, _periodStart), _lastActive) is { } recent)
        {
            return recent;
        }

        return Day(Max(floor, _periodStart.AddYears(-maxYearsAgo)), Min(_lastActive, _periodStart.AddDays(-1)))
            ?? Min(_lastActive, Max(floor, _periodStart));
    }

    private Condition Problem(IReadOnlyList<Coding> codes, DateOnly onset, DateOnly? abatement = null, string clinicalStatus = "active")
    {
        var missingOnset = _rng.Chance(0.01);
        var condition = _f.Condition(codes, missingOnset ? null : _f.HistoricalDate(onset), abatement is { } a ? ResourceFactory.Date(a) : null, clinicalStatus);
        if (missingOnset)
        {
            // Data-quality fault: onset left out, only the date it was recorded.
            condition.RecordedDate = ResourceFactory.Date(Min(_lastActive, onset.AddDays(_rng.Between(0, 60))));
        }

        return condition;
    }

    /// <summary>ICD-10-CM alone, SNOMED CT alone, or both on one CodeableConcept, as EHR problem lists send them.</summary>
    private Coding[] Coded(Coding icd, Coding sct) => _rng.NextDouble() switch
    {
        < 0.60 => [icd],
        < 0.75 => [sct],
        _ => [icd, sct],
    };

    private void ProblemList()
    {
        if (_age >= 18 || _rng.Chance(0.0025))
        {
            Diabetes();
        }

        if (_age >= 18)
        {
            Hypertension();
            Kidney();
        }

        if (_age >= 12)
        {
            Depression();
        }

        if (_female && _age is >= 16 and <= 45)
        {
            Pregnancy();
        }

        if (_age >= 45)
        {
            ColorectalHistory();
        }

        if (_female && _age >= 40)
        {
            Mastectomy();
        }

        if (_female && _age >= 30)
        {
            Hysterectomy();
        }
    }

    private void Diabetes()
    {
        // Diagnosed diabetes ~10–12 % of adults overall, rising with age (common practice, from memory).
        var prevalence = _age switch { < 18 => 1.0, < 45 => 0.04, < 65 => 0.15, _ => 0.22 };
        if (!_rng.Chance(prevalence))
        {
            return;
        }

        _diabetes = true;
        var type1 = _age < 18 || _rng.Chance(0.06);
        var onset = OnsetDay(20, type1 ? 1 : 18, 0.07);
        Coding[] codes = type1
            ? Coded(DiabetesType1Icd, DiabetesType1Sct)
            : _rng.Chance(0.02) ? Coded(DiabetesOtherIcd, DiabetesSct) : Coded(_rng.Pick(DiabetesType2Icd), DiabetesType2Sct);
        Problem(codes, onset);
    }

    private void Hypertension()
    {
        // Hypertension 30–45 % of adults, rising steeply with age (common practice, from memory).
        var prevalence = _age switch { < 40 => 0.09, < 60 => 0.33, < 75 => 0.58, _ => 0.70 };
        if (!_rng.Chance(prevalence))
        {
            return;
        }

        var onset = OnsetDay(25, 18, 0.06);
        if (_rng.Chance(0.03) && onset < _periodStart.AddYears(-1))
        {
            // Resolved before the measurement year (weight loss, say): abated, does not count.
            Problem(Coded(HypertensionIcd, HypertensionSct), onset, Day(onset.AddMonths(6), _periodStart.AddDays(-1)) ?? _periodStart.AddDays(-1));
            return;
        }

        _hypertension = true;
        // A few marked inactive without an end date: a data-quality finding by the measure rules.
        Problem(Coded(HypertensionIcd, HypertensionSct), onset, null, _rng.Chance(0.01) ? "inactive" : "active");
    }

    private void Kidney()
    {
        // ESRD is rare (~0.2–0.5 % of adults, from memory); most are on dialysis, a few transplanted.
        if (_rng.Chance(_age >= 45 ? 0.005 : 0.0015))
        {
            var onset = OnsetDay(10, 18, 0.1);
            Problem(Coded(EsrdIcd, EsrdSct), onset);
            if (_rng.Chance(0.7))
            {
                Problem([DialysisIcd], onset.AddDays(_rng.Between(0, 90)));
            }
            else if (_rng.Chance(0.3))
            {
                Problem([KidneyTransplantIcd], onset.AddDays(_rng.Between(180, 1500)));
            }
        }
        else if (_age >= 60 && _rng.Chance(0.06))
        {
            Problem([Ckd3Icd], OnsetDay(8, 50, 0.1));
        }
    }

    private void Depression()
    {
        // Depression on the problem list ~9 % of adults, ~5 % of adolescents; bipolar ~1 % (from memory).
        if (_rng.Chance(_age < 18 ? 0.05 : 0.09))
        {
            _depressionHistory = true;
            var onset = OnsetDay(15, 12, 0.15);
            // Often later marked in remission without an end date; exclusion holds whatever the status.
            Problem([_rng.Pick(DepressionIcd)], onset, null, _rng.Chance(0.2) ? "remission" : "active");
        }
        else if (_age >= 18 && _rng.Chance(0.012))
        {
            _depressionHistory = true;
            Problem([BipolarIcd], OnsetDay(20, 16, 0.05));
        }
    }

    private void Pregnancy()
    {
        // ~6 % of women 16–45 pregnant at some time in a year (from memory).
        if (!_rng.Chance(0.06))
        {
            return;
        }

        Coding[] codes = _rng.Chance(0.25) ? [PregnancySct] : [_rng.Pick(PregnancyIcd)];
        if (_rng.Chance(0.1))
        {
            // A stale problem-list entry from an earlier pregnancy, never closed: the 42-week rule ends it before the year.
            Problem(codes, Day(_periodStart.AddYears(-2), _periodStart.AddDays(-(43 * 7))) ?? _periodStart.AddYears(-1));
            return;
        }

        if (Day(_periodStart.AddMonths(-7), _lastActive.AddDays(-30)) is not { } onset || onset < Birthday(15))
        {
            return;
        }

        _pregnantInPeriod = true;
        var delivery = onset.AddDays((39 * 7) + _rng.Between(-14, 10));
        Problem(codes, onset, delivery <= _lastActive ? delivery : null);
        if (_rng.Chance(0.07) && onset.AddDays(26 * 7) <= _lastActive)
        {
            // Gestational diabetes: an O24.* code, which must not make the patient diabetic for the measures.
            Problem([GestationalDiabetesIcd], onset.AddDays(26 * 7), delivery <= _lastActive ? delivery : null);
        }
    }

    private void ColorectalHistory()
    {
        // Colorectal cancer history ~0.6 % at 45+ (from memory); some had a total colectomy.
        if (_rng.Chance(0.006))
        {
            var onset = OnsetDay(12, 40, 0.05);
            Problem(_rng.Chance(0.75) ? [_rng.Pick(ColorectalCancerIcd)] : [ColonCancerSct], onset);
            if (_rng.Chance(0.3))
            {
                _f.Procedure(TotalColectomySct, _f.HistoricalDate(onset.AddDays(_rng.Between(14, 60))));
            }
        }
        else if (_rng.Chance(0.003))
        {
            // Z90.49 (partial bowel resection and the like) never excludes.
            Problem([AbsentDigestivePartIcd], OnsetDay(15, 30, 0.0));
        }
    }

    private void Mastectomy()
    {
        // Bilateral mastectomy ~0.5 % of women 40+, unilateral ~0.6 % (from memory).
        var draw = _rng.NextDouble();
        if (draw < 0.005)
        {
            var when = OnsetDay(15, 30, 0.05);
            var form = _rng.NextDouble();
            if (form < 0.45)
            {
                Problem([BilateralBreastAbsenceIcd], when);
            }
            else if (form < 0.8)
            {
                _f.Procedure(BilateralMastectomySct, _f.HistoricalDate(when));
            }
            else
            {
                Problem([RightBreastAbsenceIcd], when);
                Problem([LeftBreastAbsenceIcd], when.AddDays(_rng.Between(0, 900)) is var l && l <= _lastActive ? l : when);
            }
        }
        else if (draw < 0.011)
        {
            Problem([_rng.Chance(0.5) ? RightBreastAbsenceIcd : LeftBreastAbsenceIcd], OnsetDay(15, 30, 0.05));
        }
    }

    private void Hysterectomy()
    {
        // Hysterectomy rises with age, ~1 in 4 women by 65 (from memory).
        var prevalence = _age switch { < 40 => 0.03, < 50 => 0.10, < 65 => 0.18, _ => 0.25 };
        if (!_rng.Chance(prevalence))
        {
            return;
        }

        var when = OnsetDay(25, 25, 0.03);
        var form = _rng.NextDouble();
        if (form < 0.55)
        {
            Problem([CervixUterusAbsenceIcd], when);
            _cervixRemoved = true;
        }
        else if (form < 0.8)
        {
            _f.Procedure(TotalHysterectomySct, _f.HistoricalDate(when));
            _cervixRemoved = true;
        }
        else if (form < 0.92)
        {
            // Supracervical: the cervix remains, so screening still applies.
            Problem([UterusAbsenceWithCervixIcd], when);
        }
        else
        {
            Problem([CervixAbsenceIcd], when);
            _cervixRemoved = true;
        }
    }

    /// <summary>Visits of the measurement year and the year before, each with the vitals and labs taken there.</summary>
    private void Visits()
    {
        // Visits per year rising with age and chronic disease (from memory, primary-care utilisation).
        var rate = _age switch { < 2 => 7.0, < 5 => 3.0, < 18 => 1.6, < 45 => 1.8, < 65 => 2.8, _ => 3.8 };
        if (_diabetes)
        {
            rate += 1.5;
        }

        if (_hypertension)
        {
            rate += 0.8;
        }

        if (_pregnantInPeriod)
        {
            rate += 1.0;
        }

        var hba1cStarted = false;
        for (var year = _periodStart.Year - 1; year <= _periodStart.Year; year++)
        {
            var yearStart = Max(new DateOnly(year, 1, 1), _birth);
            var yearEnd = Min(new DateOnly(year, 12, 31), _lastActive);
            if (yearEnd < yearStart)
            {
                continue;
            }

            // Binomial(24, rate/24): Poisson-like counts from integer arithmetic only.
            var count = 0;
            for (var i = 0; i < 24; i++)
            {
                if (_rng.Chance(Math.Min(0.9, rate / 24)))
                {
                    count++;
                }
            }

            var days = Enumerable.Range(0, count).Select(_ => Day(yearStart, yearEnd)!.Value).Order().ToList();
            var a1cTarget = _diabetes ? _rng.PickWeighted([(0, 14.0), (1, 26), (2, 30), (3, 22), (4, 8)]) : 0;
            var a1cDone = 0;
            foreach (var day in days)
            {
                var encounter = Visit(day);
                if (!ResourceFactory.IsFinished(encounter))
                {
                    continue;
                }

                var classCode = encounter.Class.Code;
                if (_age >= 18 && (classCode is "AMB" or "HH" ? _rng.Chance(0.85) : classCode == "VR" && _rng.Chance(0.15)))
                {
                    Vitals(encounter, day);
                }

                if (a1cDone < a1cTarget && classCode != "IMP" && _rng.Chance(0.7))
                {
                    HbA1c(encounter, day, ref hba1cStarted);
                    a1cDone++;
                }
                else if (!_diabetes && _age >= 35 && _rng.Chance(0.02))
                {
                    // Screening HbA1c in a non-diabetic adult (median ~5.5 %, from memory).
                    HbA1cObservation(encounter, day, _rng.LogNormal(5.5, 0.06));
                }
            }

            if (a1cDone < a1cTarget && days.Count == 0 && _rng.Chance(0.5))
            {
                // Lab drawn without a recorded visit (standing order).
                if (Day(yearStart, yearEnd) is { } labDay)
                {
                    HbA1c(null, labDay, ref hba1cStarted);
                }
            }
        }
    }

    private Encounter Visit(DateOnly day)
    {
        var classCode = _rng.PickWeighted<string>([("AMB", 83), ("VR", _age < 18 ? 4 : 11), ("HH", _age >= 65 ? 4 : 0.5), ("EMER", 1.5), ("IMP", 1)]);
        var type = classCode is "EMER" or "IMP" ? SymptomVisitSct : _rng.PickWeighted([(CheckUpSct, 35.0), (FollowUpSct, 40), (SymptomVisitSct, 25)]);
        var practitioner = classCode is "AMB" or "VR" or "HH"
            ? (_clinician is not null && _rng.Chance(0.85) ? _clinician.Id : _rng.Pick(_network.Clinicians).Id)
            : null;
        var length = classCode == "IMP" ? Math.Min(_rng.Between(2, 6), _asOf.DayNumber - day.DayNumber) : 0;
        var encounter = _f.Encounter(day, classCode, type, practitioner, _site.Id!, length);
        if (classCode == "IMP" && ResourceFactory.IsFinished(encounter))
        {
            encounter.Hospitalization = new Encounter.HospitalizationComponent
            {
                DischargeDisposition = Concept(new Coding(DischargeDisposition, "home", "Home")),
            };
        }

        _visits.Add(encounter);
        return encounter;
    }

    private string VisitTime(Encounter encounter, DateOnly day, int minutesLater)
    {
        var start = encounter.Period?.Start;
        if (start is not { Length: >= 16 })
        {
            return ResourceFactory.Date(day);
        }

        var hour = int.Parse(start.AsSpan(11, 2), System.Globalization.CultureInfo.InvariantCulture);
        var minute = int.Parse(start.AsSpan(14, 2), System.Globalization.CultureInfo.InvariantCulture) + minutesLater;
        return _f.Stamp(day, Math.Min(23, hour + (minute / 60)), minute % 60);
    }

    private void Vitals(Encounter encounter, DateOnly day)
    {
        // Systolic ~N(130,15), diastolic ~N(80,10) in hypertension (common practice); somewhat lower otherwise.
        var systolic = (int)Math.Round(Math.Clamp(_hypertension ? _rng.Normal(130, 15) : _rng.Normal(119 + (Math.Max(0, _age - 40) * 0.3), 12), 82, 230));
        var diastolic = (int)Math.Round(Math.Clamp(_hypertension ? _rng.Normal(80, 10) : _rng.Normal(75, 9), 40, 135));
        diastolic = Math.Min(diastolic, systolic - 15);
        var separate = _rng.Chance(0.15);
        _f.BloodPressure(VisitTime(encounter, day, 5), encounter, systolic, diastolic, separate);
        if (systolic >= 140 && _rng.Chance(0.5))
        {
            // Re-check after rest, usually a little lower: the lowest of the day is the one that counts.
            var recheck = (int)Math.Round(systolic - Math.Abs(_rng.Normal(6, 4)));
            var recheckDiastolic = (int)Math.Round(diastolic - Math.Abs(_rng.Normal(3, 3)));
            _f.BloodPressure(VisitTime(encounter, day, 15), encounter, recheck, Math.Min(recheckDiastolic, recheck - 15), separate);
        }
    }

    private double _a1cBaseline;

    private void HbA1c(Encounter? encounter, DateOnly day, ref bool started)
    {
        if (!started)
        {
            // HbA1c in diabetes roughly log-normal around 7 % (common practice): a personal level, then visit-to-visit spread.
            _a1cBaseline = _rng.LogNormal(7.0, 0.17);
            started = true;
        }

        HbA1cObservation(encounter, day, _rng.LogNormal(_a1cBaseline, 0.07));
    }

    private void HbA1cObservation(Encounter? encounter, DateOnly day, double percent)
    {
        var time = encounter is null ? _f.StampOrDate(day, 0.3) : VisitTime(encounter, day, 20);
        var tenths = (int)Math.Round(percent * 10);
        var form = _rng.NextDouble();
        if (form < 0.04)
        {
            // Reported in IFCC mmol/mol (LOINC 59261-8): converted by the NGSP master equation inverted.
            var ifcc = (int)Math.Round(((tenths / 10.0) - 2.152) / 0.09148);
            _f.Observation(HbA1cIfccLoinc, "laboratory", time, encounter, ResourceFactory.Ucum(ifcc, "mmol/mol"));
            return;
        }

        if (form < 0.047)
        {
            // Data-quality fault: a percent code carrying an IFCC value and unit.
            var ifcc = (int)Math.Round(((tenths / 10.0) - 2.152) / 0.09148);
            _f.Observation(HbA1cPercentLoinc[0], "laboratory", time, encounter, ResourceFactory.Ucum(ifcc, "mmol/mol"));
            return;
        }

        if (form < 0.05)
        {
            // Data-quality fault: the estimated average glucose (ADAG: 28.7 × A1c − 46.7 mg/dL, Nathan 2008) under the HbA1c code.
            var glucose = (int)Math.Round((28.7 * (tenths / 10.0)) - 46.7);
            _f.Observation(HbA1cPercentLoinc[0], "laboratory", time, encounter, ResourceFactory.Ucum(glucose, "mg/dL"));
            return;
        }

        var code = _rng.PickWeighted([(HbA1cPercentLoinc[0], 88.0), (HbA1cPercentLoinc[1], 8), (HbA1cPercentLoinc[2], 3), (HbA1cPercentLoinc[3], 1)]);
        var quantity = tenths switch
        {
            // Analysers report beyond their range with a comparator.
            > 140 => Comparator(ResourceFactory.Ucum(14.0m, "%"), Quantity.QuantityComparator.GreaterThan),
            < 40 => Comparator(ResourceFactory.Ucum(4.0m, "%"), Quantity.QuantityComparator.LessThan),
            _ => ResourceFactory.Ucum(new decimal(tenths, 0, 0, false, 1), "%"),
        };
        _f.Observation(code, "laboratory", time, encounter, quantity);
    }

    private static Quantity Comparator(Quantity q, Quantity.QuantityComparator comparator)
    {
        q.Comparator = comparator;
        return q;
    }

    private DateOnly? WindowDay(DateOnly from, DateOnly to, int minAge) => Day(Max(from, Birthday(minAge)), Min(to, _lastActive));

    private void ColorectalScreening()
    {
        if (_age < 45)
        {
            return;
        }

        // Up to date ~65–70 % at 50–75 and ~35 % at 45–49 (common practice, from memory).
        var upToDate = _rng.Chance(_age switch { < 50 => 0.35, <= 75 => 0.68, _ => 0.5 });
        if (upToDate)
        {
            var modality = _rng.PickWeighted([("colonoscopy", 58.0), ("fit", 27), ("sdna", 10), ("ctc", 3), ("flexsig", 2)]);
            var day = modality switch
            {
                "colonoscopy" => WindowDay(_periodStart.AddYears(-9), _periodEnd, 40),
                "fit" => WindowDay(_periodStart, _periodEnd, 45),
                "sdna" => WindowDay(_periodStart.AddYears(-2), _periodEnd, 45),
                _ => WindowDay(_periodStart.AddYears(-4), _periodEnd, 45),
            };
            if (day is { } d)
            {
                ColorectalTest(modality, d);
            }

            return;
        }

        if (_rng.Chance(0.45))
        {
            // A test that has aged out of its window.
            var modality = _rng.PickWeighted([("colonoscopy", 50.0), ("fit", 35), ("sdna", 15)]);
            var day = modality switch
            {
                "colonoscopy" => WindowDay(_periodStart.AddYears(-13), _periodStart.AddYears(-9).AddDays(-1), 40),
                "fit" => WindowDay(_periodStart.AddYears(-2), _periodStart.AddDays(-1), 45),
                _ => WindowDay(_periodStart.AddYears(-5), _periodStart.AddYears(-2).AddDays(-1), 45),
            };
            if (day is { } d)
            {
                ColorectalTest(modality, d);
            }
        }
    }

    private void ColorectalTest(string modality, DateOnly day)
    {
        switch (modality)
        {
            case "colonoscopy" when _rng.Chance(0.8):
                _f.Procedure(_rng.Pick(ColonoscopySct), day < _periodStart ? _f.HistoricalDate(day) : _f.StampOrDate(day, 0.3));
                break;
            case "colonoscopy":
                _f.DiagnosticReport(_rng.Pick(ColonoscopySct), "GE", _f.StampOrDate(day, 0.2), "No polyps or masses seen to the cecum.");
                break;
            case "fit" when _rng.Chance(0.85):
                _f.Observation(_rng.PickWeighted([(FecalOccultBloodLoinc[0], 50.0), (FecalOccultBloodLoinc[1], 25), (FecalOccultBloodLoinc[2], 10), (FecalOccultBloodLoinc[3], 10), (FecalOccultBloodLoinc[4], 5)]),
                    "laboratory", _f.StampOrDate(day, 0.3), null, Concept(_rng.Chance(0.93) ? NegativeSct : PositiveSct));
                break;
            case "fit":
                _f.DiagnosticReport(FecalOccultBloodLoinc[0], "LAB", _f.StampOrDate(day, 0.3), "Fecal immunochemical test negative.");
                break;
            case "sdna":
                _f.Observation(_rng.Pick(StoolDnaLoinc), "laboratory", _f.StampOrDate(day, 0.3), null, Concept(_rng.Chance(0.88) ? NegativeSct : PositiveSct));
                break;
            case "ctc":
                _f.Procedure(CtColonographySct, _f.StampOrDate(day, 0.3));
                break;
            default:
                _f.Procedure(FlexibleSigmoidoscopySct, _f.StampOrDate(day, 0.3));
                break;
        }
    }

    private void BreastScreening()
    {
        if (!_female || _age < 40)
        {
            return;
        }

        // Screening mammography within ~2 years ~70 % of women 40–74 (common practice, from memory); fewer after 75.
        if (_rng.Chance(_age <= 74 ? 0.70 : 0.3))
        {
            if (WindowDay(_periodStart.AddMonths(-15), _periodEnd, 40) is { } d)
            {
                Mammogram(d);
            }
        }
        else if (_rng.Chance(0.5) && WindowDay(_periodStart.AddMonths(-36), _periodStart.AddMonths(-15).AddDays(-1), 40) is { } old)
        {
            Mammogram(old);
        }
    }

    private void Mammogram(DateOnly day)
    {
        var form = _rng.NextDouble();
        if (form < 0.45)
        {
            _f.Procedure(_rng.Pick(MammographySct), _f.StampOrDate(day, 0.3));
        }
        else if (form < 0.9)
        {
            _f.DiagnosticReport(_rng.Pick(MammographyLoinc), "RAD", _f.StampOrDate(day, 0.2), "BI-RADS 1: negative.");
        }
        else
        {
            _f.Observation(_rng.Pick(MammographyLoinc), "imaging", _f.StampOrDate(day, 0.2), null, Concept(NegativeSct));
        }
    }

    private void CervicalScreening()
    {
        if (!_female || _age < 21 || _age > 66 || (_cervixRemoved && !_rng.Chance(0.1)))
        {
            return;
        }

        // Screening up to date ~70 % (common practice, from memory): cytology every 3 years, or HPV testing from 30.
        if (_rng.Chance(0.70))
        {
            var form = _rng.NextDouble();
            if (_age < 30 || form < 0.2)
            {
                if (WindowDay(_periodStart.AddYears(-2), _periodEnd, 21) is { } d)
                {
                    Cytology(d);
                }
            }
            else if (WindowDay(_periodStart.AddYears(-4), _periodEnd, 28) is { } d)
            {
                // Co-test or primary HPV test; a few were done before 30 and do not count as HPV screening.
                Hpv(d);
                if (form < 0.65)
                {
                    Cytology(d);
                }
            }
        }
        else if (_rng.Chance(0.4) && WindowDay(_periodStart.AddYears(-5), _periodStart.AddYears(-2).AddDays(-1), 21) is { } old)
        {
            Cytology(old);
        }
    }

    private void Cytology(DateOnly day)
    {
        var code = _rng.PickWeighted([(CervicalCytologyLoinc[0], 60.0), (CervicalCytologyLoinc[1], 25), (CervicalCytologyLoinc[2], 15)]);
        if (_rng.Chance(0.3))
        {
            _f.DiagnosticReport(code, "CP", _f.StampOrDate(day, 0.3), "Negative for intraepithelial lesion or malignancy.");
        }
        else
        {
            // 373887005: negative for intraepithelial lesion or malignancy (SNOMED CT, from memory).
            _f.Observation(code, "laboratory", _f.StampOrDate(day, 0.3), null, Concept(Sct("373887005")));
        }
    }

    private void Hpv(DateOnly day)
    {
        var code = _rng.PickWeighted([(HpvLoinc[0], 30.0), (HpvLoinc[1], 10), (HpvLoinc[2], 15), (HpvLoinc[3], 10), (HpvLoinc[4], 25), (HpvLoinc[5], 10)]);
        _f.Observation(code, "laboratory", _f.StampOrDate(day, 0.3), null, Concept(_rng.Chance(0.9) ? NegativeSct : PositiveSct));
    }

    private void DepressionScreening()
    {
        if (_age < 12)
        {
            return;
        }

        var candidates = _visits.Where(v => ResourceFactory.IsFinished(v) && v.Class.Code is "AMB" or "VR" && StartDay(v) >= _periodStart).ToList();
        if (candidates.Count == 0)
        {
            return;
        }

        // Screened in the year at ~60 % of patients seen (common practice, from memory); a few decline.
        if (!_rng.Chance(0.6))
        {
            if (_rng.Chance(0.04))
            {
                var visit = _rng.Pick(candidates);
                var declined = _f.Observation(Phq9Loinc, "survey", VisitTime(visit, StartDay(visit), 10), visit, null);
                declined.Status = ObservationStatus.Final;
                declined.DataAbsentReason = Concept(new Coding(ClinicalCodes.DataAbsentReason, "asked-declined", "Asked But Declined"));
            }

            return;
        }

        var screenings = _rng.Chance(0.15) && candidates.Count > 1 ? 2 : 1;
        foreach (var visit in candidates.OrderBy(_ => _rng.NextUInt()).Take(screenings).OrderBy(StartDay))
        {
            Screen(visit);
        }
    }

    /// <summary>The stated day an encounter started (callers pass finished encounters, which have a start).</summary>
    private static DateOnly StartDay(Encounter encounter) =>
        DateOnly.Parse(encounter.Period!.Start.AsSpan(0, 10), System.Globalization.CultureInfo.InvariantCulture);

    private void Screen(Encounter visit)
    {
        var day = StartDay(visit);
        var adolescent = _age < 18;
        var riskShift = _depressionHistory ? 2 : 0;
        var positive = false;
        var instrument = adolescent
            ? _rng.PickWeighted([("phq9a", 60.0), ("phq9", 20), ("phq2", 20)])
            : _rng.PickWeighted([("phq2", 55.0), ("phq9", 45)]);
        if (instrument == "phq2")
        {
            // PHQ-2 positive (≥ 3, Kroenke 2003) in ~13 % of primary-care screens (from memory).
            var score = Math.Min(6, _rng.PickWeighted([(0, 60.0), (1, 15), (2, 12), (3, 6), (4, 4), (5, 2), (6, 1)]) + riskShift);
            _f.Observation(Phq2Loinc, "survey", VisitTime(visit, day, 10), visit, ResourceFactory.Score(score));
            positive = score >= 3;
            if (positive && _rng.Chance(0.8))
            {
                var phq9 = (int)Math.Round(Math.Clamp(_rng.Normal(12, 5), 0, 27));
                _f.Observation(Phq9Loinc, "survey", VisitTime(visit, day, 20), visit, ResourceFactory.Score(phq9));
                positive = phq9 >= 10;
            }
        }
        else
        {
            // PHQ-9 positive (≥ 10, Kroenke 2001) in ~15 % (from memory).
            var band = _rng.PickWeighted([((0, 4), 65.0), ((5, 9), 20), ((10, 14), 9), ((15, 19), 4), ((20, 27), 2)]);
            var score = Math.Min(27, _rng.Between(band.Item1, band.Item2) + (riskShift * 2));
            _f.Observation(instrument == "phq9a" ? Phq9AdolescentLoinc : Phq9Loinc, "survey", VisitTime(visit, day, 10), visit, ResourceFactory.Score(score));
            positive = score >= 10;
        }

        if (!positive)
        {
            return;
        }

        // Follow-up the same day or within two days for most positives; some late, some never (from memory).
        var lag = _rng.PickWeighted([(0, 64.0), (1, 8), (2, 8), (_rng.Between(5, 10), 7), (-1, 13)]);
        if (lag < 0)
        {
            return;
        }

        var followUpDay = day.AddDays(lag);
        if (followUpDay > _lastActive)
        {
            return;
        }

        var code = _rng.Pick(DepressionFollowUpSct);
        if (_rng.Chance(0.75))
        {
            _f.ServiceRequest(code, _f.StampOrDate(followUpDay, 0.2), _rng.Chance(0.6) ? RequestStatus.Active : RequestStatus.Completed);
        }
        else
        {
            _f.Procedure(code, _f.StampOrDate(followUpDay, 0.2));
        }
    }

    private void Influenza()
    {
        var sixMonths = _birth.AddMonths(6);
        if (sixMonths > _lastActive)
        {
            return;
        }

        // Seasonal influenza coverage ~45–50 % overall, highest in children and older adults (common practice, from memory).
        var rate = _age switch { < 18 => 0.52, < 50 => 0.33, < 65 => 0.45, _ => 0.68 };
        var codes = _age < 3 ? InfluenzaPediatricCvx : InfluenzaAdultCvx;
        if (_rng.Chance(rate))
        {
            // This autumn's campaign, or last season's late doses (August of the year before onward).
            var day = _rng.Chance(0.75)
                ? WindowDay(new DateOnly(_periodStart.Year, 9, 1), new DateOnly(_periodStart.Year, 12, 15), 0)
                : WindowDay(new DateOnly(_periodStart.Year - 1, 8, 1), new DateOnly(_periodStart.Year, 3, 31), 0);
            if (day is { } d && d >= sixMonths)
            {
                var shot = _f.Immunization(_rng.Pick(codes), _f.StampOrDate(d, 0.5));
                if (_rng.Chance(0.005))
                {
                    shot.IsSubpotent = true;
                }
            }

            return;
        }

        if (_rng.Chance(0.05))
        {
            // Declined, contraindicated or out of stock: a not-done record with its reason.
            if (WindowDay(new DateOnly(_periodStart.Year, 9, 1), new DateOnly(_periodStart.Year, 12, 15), 0) is { } d && d >= sixMonths)
            {
                var refused = _f.Immunization(_rng.Pick(codes), _f.StampOrDate(d, 0.5));
                refused.Status = Immunization.ImmunizationStatusCodes.NotDone;
                refused.StatusReason = Concept(new Coding(ActReason, _rng.PickWeighted([("PATOBJ", 60.0), ("MEDPREC", 25), ("OSTOCK", 15)])));
            }
        }
        else if (_rng.Chance(0.04) && WindowDay(new DateOnly(_periodStart.Year - 1, 6, 1), new DateOnly(_periodStart.Year - 1, 7, 31), 0) is { } early && early >= sixMonths)
        {
            // Given before the window opens: does not count for this year.
            _f.Immunization(_rng.Pick(codes), ResourceFactory.Date(early));
        }
    }

    /// <summary>One scheduled childhood dose: antigen product options and the target age in days.</summary>
    private readonly record struct Dose(string Series, int TargetDays, int LatestDays);

    private void ChildhoodSeries()
    {
        if (_age >= 7)
        {
            return;
        }

        // Combination products: DTaP-HepB-IPV (110), DTaP-IPV/Hib (120), DTaP-IPV-Hib-HepB (146) or single antigens.
        var combo = _rng.PickWeighted([("110", 40.0), ("120", 20), ("146", 10), ("single", 30)]);
        var pcv = _rng.PickWeighted([("133", 40.0), ("215", 30), ("216", 30)]);
        // MMRV (94) at the first birthday for a few; separate MMR and varicella otherwise.
        var mmrv = _rng.Chance(0.1);
        // ~70 % of children complete the series by age 2 (common practice, from memory).
        var onTime = _rng.Chance(0.7);
        Dose[] schedule =
        [
            new("hepb", 0, 2), new("rota", 61, 75), new("infant", 61, 75), new("hepb2", 45, 75), new("rota", 122, 140),
            new("infant", 122, 140), new("infant3", 183, 200), new("hepb3", 183, 540), new("hib4", 365, 456),
            new("pcv4", 365, 456), new("mmr", 365, 456), new("var", 365, 456), new("hepa", 365, 420),
            new("dtap4", 456, 540), new("hepa", 548, 600), new("preschool", 1461, 2190),
        ];
        foreach (var dose in schedule)
        {
            if (!onTime && dose.TargetDays > 0 && _rng.Chance(0.2))
            {
                continue;
            }

            var offset = dose.TargetDays + _rng.NextInt(Math.Max(1, dose.LatestDays - dose.TargetDays));
            if (!onTime && _rng.Chance(0.25))
            {
                offset += _rng.Between(60, 300);
            }
            else if (dose.Series == "infant" && dose.TargetDays == 61 && _rng.Chance(0.03))
            {
                // A first dose given too young (before 42 days): does not count.
                offset = _rng.Between(30, 40);
            }
            else if (dose.Series == "mmr" && _rng.Chance(0.02))
            {
                offset = _rng.Between(330, 360);
            }

            var day = _birth.AddDays(offset);
            if (day > _lastActive)
            {
                continue;
            }

            foreach (var cvx in Products(dose.Series, combo, pcv, mmrv))
            {
                _f.Immunization(cvx, _f.StampOrDate(day, 0.6));
            }
        }
    }

    private static IEnumerable<string> Products(string series, string combo, string pcv, bool mmrv) => series switch
    {
        "hepb" => ["08"],
        "hepb2" => combo is "110" or "146" ? [] : ["08"],
        "hepb3" => combo is "110" or "146" ? [] : ["08"],
        "rota" => ["119"],
        "infant" or "infant3" => combo switch
        {
            "110" => ["110", "49", pcv],
            "120" => ["120", pcv],
            "146" => ["146", pcv],
            _ => ["20", "10", "49", pcv],
        },
        "hib4" => combo == "120" ? [] : ["48"],
        "pcv4" => [pcv],
        "mmr" => mmrv ? ["94"] : ["03"],
        "var" => mmrv ? [] : ["21"],
        "hepa" => ["83"],
        "dtap4" => combo == "120" ? ["120"] : ["20"],
        _ => ["130", "94"],
    };

    private void HospiceOrPalliative()
    {
        // Hospice or palliative care in the year: ~1 % at 65+, rare younger (from memory).
        if (_age < 18 || !_rng.Chance(_age >= 65 ? 0.012 : 0.0015) || WindowDay(_periodStart, Min(_periodEnd, _asOf.AddDays(-10)), 0) is not { } day)
        {
            return;
        }

        var form = _rng.NextDouble();
        if (form < 0.35)
        {
            var stay = _f.Encounter(day, "IMP", SymptomVisitSct, null, _site.Id!, _rng.Between(2, 8));
            stay.Status = Encounter.EncounterStatus.Finished;
            stay.Period ??= new Period { Start = _f.Stamp(day, 10, 0), End = _f.Stamp(day.AddDays(3), 12, 0) };
            stay.Hospitalization = new Encounter.HospitalizationComponent { DischargeDisposition = Concept(new Coding(DischargeDisposition, "hosp", "Hospice")) };
        }
        else if (form < 0.65)
        {
            _f.Procedure(HospiceCareSct, _f.StampOrDate(day, 0.3), _rng.Chance(0.8) ? EventStatus.Completed : EventStatus.InProgress);
        }
        else if (form < 0.8)
        {
            _f.Procedure(PalliativeCareSct, _f.StampOrDate(day, 0.3));
        }
        else if (form < 0.9)
        {
            Problem([PalliativeEncounterIcd], day);
        }
        else
        {
            _f.ServiceRequest(HospiceCareSct, _f.StampOrDate(day, 0.3), RequestStatus.Active);
        }
    }
}
