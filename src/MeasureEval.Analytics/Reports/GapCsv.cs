using System.Globalization;
using System.Text;
using MeasureEval.Analytics.Population;

namespace MeasureEval.Analytics.Reports;

/// <summary>A care team's gap list as CSV: one row per patient with an open gap, what is missing where a count says.</summary>
public static class GapCsv
{
    public static readonly string[] Header = ["patient", "panel", "payer", "age_band", "missing"];

    public static void WriteHeader(StringBuilder csv) => CsvText.Row(csv, Header);

    public static void WriteRow(StringBuilder csv, GapRow row)
    {
        ArgumentNullException.ThrowIfNull(csv);
        ArgumentNullException.ThrowIfNull(row);
        var missing = string.Join("; ", row.Missing.Select(m => string.Create(CultureInfo.InvariantCulture, $"{m.Label}: {m.Counted} of {m.Required}")));
        CsvText.Row(csv, CsvText.Text(row.PatientId), CsvText.Text(row.Panel), CsvText.Text(row.Payer), CsvText.Text(row.AgeBand), CsvText.Text(missing));
    }
}
