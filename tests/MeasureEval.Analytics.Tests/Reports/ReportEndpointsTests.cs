using System.Net;
using System.Text.Json;
using MeasureEval.Analytics.Tests.Support;

namespace MeasureEval.Analytics.Tests.Reports;

[Collection(DemoPopulationCollection.Name)]
public class ReportEndpointsTests(DemoPopulationHost host)
{
    private readonly HttpClient _client = host.CreateClient();

    [Fact]
    public async Task GetMeasureReport_JsonCountsAddUp()
    {
        using var json = await GetJsonAsync($"/reports/measures/colorectal-cancer-screening?{DemoPopulationHost.Period}&target=0.7&format=json");
        var root = json.RootElement;
        var overall = root.GetProperty("summary").GetProperty("overall");
        var n = overall.GetProperty("n").GetInt32();
        var numerator = overall.GetProperty("numerator").GetInt32();
        Assert.True(n > 50, "the demo population rates more than 50 patients for colorectal screening");
        Assert.Equal(n, overall.GetProperty("denominator").GetInt32() - overall.GetProperty("exclusions").GetInt32() - overall.GetProperty("exceptions").GetInt32());

        // Every stratifier partitions the initial population: its strata add up to the overall counts.
        foreach (var stratifier in root.GetProperty("summary").GetProperty("stratifiers").EnumerateArray())
        {
            var strata = stratifier.GetProperty("strata").EnumerateArray().Select(s => s.GetProperty("rate")).ToList();
            Assert.Equal(n, strata.Sum(s => s.GetProperty("n").GetInt32()));
            Assert.Equal(numerator, strata.Sum(s => s.GetProperty("numerator").GetInt32()));
        }

        // Each rate carries its interval, and the lower bound is below the rate.
        var interval = overall.GetProperty("interval");
        Assert.True(interval.GetProperty("lower").GetDouble() < overall.GetProperty("rate").GetDouble());
        Assert.Equal(4, root.GetProperty("trend").GetProperty("points").GetArrayLength());
        Assert.Equal(Math.Max(0, (int)Math.Ceiling(0.7m * n) - numerator), root.GetProperty("panels").GetProperty("networkPatientsToGoal").GetInt32());

        // Panels are shown by their clinician's name, read from the stored Practitioner.
        Assert.All(
            root.GetProperty("panels").GetProperty("panels").EnumerateArray().Where(p => p.GetProperty("panel").GetString()!.StartsWith("Practitioner/", StringComparison.Ordinal)),
            p => Assert.DoesNotContain("/", p.GetProperty("label").GetString(), StringComparison.Ordinal));
    }

    [Fact]
    public async Task GetMeasureReport_CsvHasTheSameOverallRate()
    {
        using var json = await GetJsonAsync($"/reports/measures/influenza-vaccination?{DemoPopulationHost.Period}&format=json");
        var rate = json.RootElement.GetProperty("summary").GetProperty("overall").GetProperty("rate").GetDouble();
        using var response = await _client.GetAsync(new Uri($"/reports/measures/influenza-vaccination?{DemoPopulationHost.Period}&format=csv", UriKind.Relative));
        Assert.Equal("text/csv", response.Content.Headers.ContentType?.MediaType);
        var lines = (await response.Content.ReadAsStringAsync()).Split("\r\n");
        var overall = lines[1].Split(',');
        Assert.Equal("overall", overall[1]);
        Assert.Equal(rate, double.Parse(overall[13], System.Globalization.CultureInfo.InvariantCulture), 12);
    }

    [Fact]
    public async Task GetMeasureReport_LinksEachPanelToItsCareGapExport()
    {
        using var json = await GetJsonAsync($"/reports/measures/colorectal-cancer-screening?{DemoPopulationHost.Period}&format=json");
        var panel = json.RootElement.GetProperty("panels").GetProperty("panels").EnumerateArray()
            .First(p => p.GetProperty("limits").ValueKind != JsonValueKind.Null).GetProperty("panel").GetString()!;
        var html = await _client.GetStringAsync(new Uri($"/reports/measures/colorectal-cancer-screening?{DemoPopulationHost.Period}", UriKind.Relative));
        var link = "/Measure/$care-gaps-export?periodStart=2026-01-01&amp;periodEnd=2026-12-31&amp;measureId=colorectal-cancer-screening&amp;status=open-gap"
            + $"&amp;practitioner={Uri.EscapeDataString(panel)}&amp;_format=csv";
        Assert.Contains($"href=\"{link}\"", html, StringComparison.Ordinal);

        // The export behind the link lists exactly the panel's open gaps that the report counts.
        var rate = json.RootElement.GetProperty("panels").GetProperty("panels").EnumerateArray().First(p => p.GetProperty("panel").GetString() == panel).GetProperty("rate");
        var open = rate.GetProperty("n").GetInt32() - rate.GetProperty("numerator").GetInt32();
        using var export = await _client.GetAsync(new Uri(System.Net.WebUtility.HtmlDecode(link), UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, export.StatusCode);
        var rows = (await export.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(open, rows.Length - 1);
    }

    [Fact]
    public async Task GetIndex_ListsEveryMeasure()
    {
        var html = await _client.GetStringAsync(new Uri($"/reports?{DemoPopulationHost.Period}", UriKind.Relative));
        Assert.Equal(9, System.Text.RegularExpressions.Regex.Count(html, "data-measure=\""));
    }

    [Fact]
    public async Task GetMeasureReport_BadParameters_AllReported()
    {
        using var response = await _client.GetAsync(new Uri("/reports/measures/colorectal-cancer-screening?periodStart=2026-13-01&target=1.5&interval=weekly&format=pdf", UriKind.Relative));
        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
        using var outcome = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        var expressions = outcome.RootElement.GetProperty("issue").EnumerateArray().Select(i => i.GetProperty("expression")[0].GetString()).ToList();
        Assert.Equal(["periodStart", "target", "interval", "format"], expressions);
        Assert.All(outcome.RootElement.GetProperty("issue").EnumerateArray(), i => Assert.Equal("MEV-REPORT-001", i.GetProperty("details").GetProperty("coding")[0].GetProperty("code").GetString()));
    }

    [Fact]
    public async Task GetMeasureReport_PeriodEndBeforeStart_BadRequest()
    {
        using var response = await _client.GetAsync(new Uri("/reports/measures/colorectal-cancer-screening?periodStart=2026-06-01&periodEnd=2026-01-01", UriKind.Relative));
        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
    }

    [Fact]
    public async Task GetMeasureReport_UnknownMeasure_NotFound()
    {
        using var response = await _client.GetAsync(new Uri("/reports/measures/no-such-measure", UriKind.Relative));
        Assert.Equal(HttpStatusCode.NotFound, response.StatusCode);
        using var outcome = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        Assert.Equal("MEV-REPORT-002", outcome.RootElement.GetProperty("issue")[0].GetProperty("details").GetProperty("coding")[0].GetProperty("code").GetString());
    }

    private async Task<JsonDocument> GetJsonAsync(string path)
    {
        using var response = await _client.GetAsync(new Uri(path, UriKind.Relative));
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        return JsonDocument.Parse(await response.Content.ReadAsStringAsync());
    }
}
