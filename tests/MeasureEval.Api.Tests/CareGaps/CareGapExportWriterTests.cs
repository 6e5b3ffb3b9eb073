using System.Globalization;
using System.Text;
using CsvHelper;
using MeasureEval.Api.CareGaps;
using MeasureEval.Engine;
using MeasureEval.Engine.Gaps;

namespace MeasureEval.Api.Tests.CareGaps;

public sealed class CareGapExportWriterTests
{
    [Fact]
    public async System.Threading.Tasks.Task WriteAsync_CsvQuotesCommasQuotesAndLineBreaks()
    {
        using var output = new MemoryStream();
        await using (var writer = new CareGapExportWriter(output, ExportFormat.Csv))
        {
            await writer.WriteHeaderAsync(CancellationToken.None);
            await writer.WriteAsync(Gap("say \"hi\", then\r\nleave"), CancellationToken.None);
        }

        var text = Encoding.UTF8.GetString(output.ToArray());
        // RFC 4180 §2: fields with commas, quotes or line breaks are enclosed in quotes, quotes doubled, CRLF between records.
        Assert.StartsWith(string.Join(",", CareGapExportWriter.Columns) + "\r\n", text, StringComparison.Ordinal);
        Assert.Contains("\"say \"\"hi\"\", then\r\nleave by 2026-12-31\"", text, StringComparison.Ordinal);
        using var csv = new CsvReader(new StringReader(text), CultureInfo.InvariantCulture);
        var row = Assert.Single(csv.GetRecords<dynamic>().Cast<IDictionary<string, object>>());
        Assert.Equal("say \"hi\", then\r\nleave by 2026-12-31", row["what_closes_it"]);
        Assert.Equal("", row["counts_through"]);
    }

    private static CareGap Gap(string what) => new()
    {
        PatientId = "p-1",
        MeasureId = "m",
        Period = MeasurementPeriod.CalendarYear(2026),
        Status = GapStatus.Open,
        Horizon = new DateOnly(2027, 12, 31),
        Panel = "unattributed",
        Payer = "none",
        Result = new PatientResult { PatientId = "p-1", MeasureId = "m" },
        Actions = [new GapAction($"{what} by 2026-12-31", what, ["Procedure"], null, [], new DateOnly(2026, 12, 31))],
        DueBy = new DateOnly(2026, 12, 31),
    };
}
