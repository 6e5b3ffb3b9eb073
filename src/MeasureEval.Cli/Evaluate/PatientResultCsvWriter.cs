using System.Text;
using MeasureEval.Engine;

namespace MeasureEval.Cli.Evaluate;

/// <summary>
/// Per-patient results as CSV (RFC 4180 quoting), one row per patient and measure, for patients in the initial population
/// or with a data-quality finding. Columns: ids, the five populations (1/0), whether the patient has a care gap, the
/// strata and the finding codes. Patient ids only: no names or other identifying data.
/// </summary>
internal sealed class PatientResultCsvWriter : IDisposable
{
    private static readonly StratifierKind[] StrataColumns = [StratifierKind.AgeBand, StratifierKind.Gender, StratifierKind.Payer, StratifierKind.Panel];
    private readonly StreamWriter _writer;
    private readonly IReadOnlyList<MeasureDefinition> _measures;

    public PatientResultCsvWriter(string path, IReadOnlyList<MeasureDefinition> measures)
    {
        _measures = measures;
        _writer = new StreamWriter(path, append: false, new UTF8Encoding(false), 1 << 16) { NewLine = "\n" };
        _writer.WriteLine("patient_id,measure_id,initial_population,denominator,denominator_exclusion,denominator_exception,numerator,gap,age_band,gender,payer,panel,findings");
    }

    public long Rows { get; private set; }

    public void Write(IReadOnlyList<PatientResult> results)
    {
        for (var i = 0; i < results.Count; i++)
        {
            var r = results[i];
            if (!r.InitialPopulation && r.Findings.Count == 0)
            {
                continue;
            }

            var measure = _measures[i];
            var line = new StringBuilder(160);
            line.Append(Quote(r.PatientId)).Append(',').Append(Quote(r.MeasureId));
            foreach (var flag in new[] { r.InitialPopulation, r.Denominator, r.DenominatorExclusion, r.DenominatorException, r.Numerator, r.HasGap(measure.ImprovementNotation) })
            {
                line.Append(',').Append(flag ? '1' : '0');
            }

            foreach (var kind in StrataColumns)
            {
                var stratifier = measure.Stratifiers.FirstOrDefault(s => s.Kind == kind);
                line.Append(',').Append(Quote(stratifier is not null && r.Strata.TryGetValue(stratifier.Id, out var code) ? code : string.Empty));
            }

            line.Append(',').Append(Quote(string.Join(';', r.Findings.Select(f => f.Code).Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal))));
            _writer.WriteLine(line.ToString());
            Rows++;
        }
    }

    public void Dispose() => _writer.Dispose();

    private static string Quote(string value) =>
        value.AsSpan().IndexOfAny(",\"\r\n") < 0 ? value : "\"" + value.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"";
}
