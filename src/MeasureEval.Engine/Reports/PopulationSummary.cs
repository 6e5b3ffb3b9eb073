namespace MeasureEval.Engine;

/// <summary>Counts of the five populations.</summary>
public sealed class PopulationTally
{
    private readonly int[] _counts = new int[PopulationKinds.All.Count];

    public int this[PopulationKind population] => _counts[(int)population];

    public int InitialPopulation => this[PopulationKind.InitialPopulation];

    public int Denominator => this[PopulationKind.Denominator];

    public int DenominatorExclusion => this[PopulationKind.DenominatorExclusion];

    public int DenominatorException => this[PopulationKind.DenominatorException];

    public int Numerator => this[PopulationKind.Numerator];

    /// <summary>denominator − exclusions − exceptions: the n of the rate.</summary>
    public int RateDenominator => Denominator - DenominatorExclusion - DenominatorException;

    /// <summary>numerator / (denominator − exclusions − exceptions); null when that is 0.</summary>
    public double? Score => RateDenominator > 0 ? (double)Numerator / RateDenominator : null;

    public RateInterval? Interval => Statistics.Wilson(Numerator, RateDenominator);

    public void Add(PatientResult result)
    {
        foreach (var population in PopulationKinds.All)
        {
            if (result.Is(population))
            {
                _counts[(int)population]++;
            }
        }
    }

    /// <summary>The counts in <see cref="PopulationKind"/> order, to ship a partition's tally to another node.</summary>
    public int[] ToCounts() => [.. _counts];

    /// <summary>Adds counts of other patients (in <see cref="PopulationKind"/> order): partial tallies merge exactly.</summary>
    public void AddCounts(IReadOnlyList<int> counts)
    {
        ArgumentNullException.ThrowIfNull(counts);
        for (var i = 0; i < _counts.Length; i++)
        {
            _counts[i] += counts[i];
        }
    }
}

/// <summary>
/// One measure's aggregate over a population: counts, strata counts and, only when asked, the patient ids per population.
/// Memory grows with the number of strata, not with the number of patients (unless subjects are kept).
/// </summary>
public sealed class PopulationSummary
{
    private readonly Dictionary<string, SortedDictionary<string, PopulationTally>> _strata = new(StringComparer.Ordinal);
    private readonly Dictionary<PopulationKind, List<string>>? _subjects;
    private readonly SortedDictionary<string, int> _findings = new(StringComparer.Ordinal);

    public PopulationSummary(MeasureDefinition measure, MeasurementPeriod period, bool keepSubjects)
    {
        Measure = measure;
        Period = period;
        foreach (var stratifier in measure.Stratifiers)
        {
            _strata[stratifier.Id] = new SortedDictionary<string, PopulationTally>(StringComparer.Ordinal);
        }

        if (keepSubjects)
        {
            _subjects = PopulationKinds.All.ToDictionary(p => p, _ => new List<string>());
        }
    }

    public MeasureDefinition Measure { get; }

    public MeasurementPeriod Period { get; }

    public PopulationTally Counts { get; } = new();

    /// <summary>Patients evaluated (in the initial population or not).</summary>
    public int PatientsEvaluated { get; private set; }

    /// <summary>Stratifier id → stratum code → counts, strata in ordinal order.</summary>
    public IReadOnlyDictionary<string, SortedDictionary<string, PopulationTally>> Strata => _strata;

    /// <summary>Patient ids per population, in evaluation order; null unless subjects were kept.</summary>
    public IReadOnlyDictionary<PopulationKind, List<string>>? Subjects => _subjects;

    /// <summary>Data-quality finding code → number of findings.</summary>
    public IReadOnlyDictionary<string, int> FindingCounts => _findings;

    public void Add(PatientResult result)
    {
        PatientsEvaluated++;
        foreach (var finding in result.Findings)
        {
            _findings[finding.Code] = _findings.GetValueOrDefault(finding.Code) + 1;
        }

        if (!result.InitialPopulation)
        {
            return;
        }

        Counts.Add(result);
        foreach (var (stratifier, code) in result.Strata)
        {
            if (_strata.TryGetValue(stratifier, out var strata))
            {
                if (!strata.TryGetValue(code, out var counts))
                {
                    counts = new PopulationTally();
                    strata[code] = counts;
                }

                counts.Add(result);
            }
        }

        if (_subjects is not null)
        {
            foreach (var population in PopulationKinds.All)
            {
                if (result.Is(population))
                {
                    _subjects[population].Add(result.PatientId);
                }
            }
        }
    }

    /// <summary>Adds another summary of the same measure and period over other patients (a parallel worker's).</summary>
    public void Merge(PopulationSummary other)
    {
        ArgumentNullException.ThrowIfNull(other);
        AddPartial(
            other.PatientsEvaluated,
            other.Counts.ToCounts(),
            other._strata.ToDictionary(s => s.Key, s => s.Value.ToDictionary(c => c.Key, c => c.Value.ToCounts(), StringComparer.Ordinal), StringComparer.Ordinal),
            other._findings,
            other._subjects);
    }

    /// <summary>
    /// Adds the aggregate of patients evaluated elsewhere (a cluster partition's): counts, strata, findings and subjects
    /// add up, so merging the partitions of a population gives the summary of the whole.
    /// </summary>
    public void AddPartial(
        int patientsEvaluated, IReadOnlyList<int> counts, IReadOnlyDictionary<string, Dictionary<string, int[]>> strata,
        IReadOnlyDictionary<string, int> findings, IReadOnlyDictionary<PopulationKind, List<string>>? subjects)
    {
        ArgumentNullException.ThrowIfNull(strata);
        ArgumentNullException.ThrowIfNull(findings);
        PatientsEvaluated += patientsEvaluated;
        Counts.AddCounts(counts);
        foreach (var (stratifier, codes) in strata)
        {
            if (!_strata.TryGetValue(stratifier, out var mine))
            {
                continue;
            }

            foreach (var (code, stratumCounts) in codes)
            {
                if (!mine.TryGetValue(code, out var tally))
                {
                    tally = new PopulationTally();
                    mine[code] = tally;
                }

                tally.AddCounts(stratumCounts);
            }
        }

        foreach (var (code, count) in findings)
        {
            _findings[code] = _findings.GetValueOrDefault(code) + count;
        }

        if (_subjects is not null && subjects is not null)
        {
            foreach (var (population, ids) in subjects)
            {
                _subjects[population].AddRange(ids);
            }
        }
    }
}
