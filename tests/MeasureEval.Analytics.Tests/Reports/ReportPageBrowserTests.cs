using System.Text.Json;
using MeasureEval.Analytics.Tests.Support;
using Microsoft.Playwright;

namespace MeasureEval.Analytics.Tests.Reports;

/// <summary>
/// The report page of the demo population as a person sees it: rendered by Debian's Chromium (never a downloaded
/// browser), charts counted mark by mark against the JSON numbers, a screenshot written to the test output.
/// </summary>
[Collection(DemoPopulationCollection.Name)]
public class ReportPageBrowserTests(DemoPopulationHost host)
{
    private const string Chromium = "/usr/bin/chromium";
    private const string Measure = "colorectal-cancer-screening";

    public static string ScreenshotDirectory => Path.Combine(AppContext.BaseDirectory, "screenshots");

    [SkippableFact]
    public async Task Render_DemoPopulationChartsInHeadlessChromium()
    {
        Skip.IfNot(File.Exists(Chromium), $"{Chromium} is not installed (.ci/run installs Debian's chromium package)");
        using var client = host.CreateClient();
        var query = $"?{DemoPopulationHost.Period}&target=0.7";
        var html = await client.GetStringAsync(new Uri($"/reports/measures/{Measure}{query}", UriKind.Relative));
        using var json = JsonDocument.Parse(await client.GetStringAsync(new Uri($"/reports/measures/{Measure}{query}&format=json", UriKind.Relative)));
        var report = json.RootElement;
        var ratedStrata = report.GetProperty("summary").GetProperty("stratifiers").EnumerateArray()
            .SelectMany(s => s.GetProperty("strata").EnumerateArray())
            .Count(s => s.GetProperty("rate").GetProperty("n").GetInt32() > 0);
        var comparedPanels = report.GetProperty("panels").GetProperty("panels").EnumerateArray().Count(p => p.GetProperty("limits").ValueKind != JsonValueKind.Null);
        var ratedPeriods = report.GetProperty("trend").GetProperty("points").EnumerateArray().Count(p => p.GetProperty("rate").GetProperty("n").GetInt32() > 0);
        Assert.True(comparedPanels >= 3, "the demo network has several primary-care panels");

        using var playwright = await Playwright.CreateAsync();
        var profile = Directory.CreateTempSubdirectory("measureeval-chromium-").FullName;
        try
        {
            await using var browser = await playwright.Chromium.LaunchPersistentContextAsync(profile, new BrowserTypeLaunchPersistentContextOptions
            {
                ExecutablePath = Chromium,
                Headless = true,
                ChromiumSandbox = false,
                Args = ["--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
                ViewportSize = new ViewportSize { Width = 1000, Height = 1400 },
            });
            var page = browser.Pages.Count > 0 ? browser.Pages[0] : await browser.NewPageAsync();
            var requests = new List<string>();
            page.Request += (_, request) => requests.Add(request.Url);
            await page.SetContentAsync(html);

            // Strata: one bar and one whisker per rated row (overall + strata), a text label on every row.
            var strata = page.Locator("svg[data-chart=strata]");
            Assert.Equal(1 + ratedStrata, await strata.Locator("[data-mark=bar]").CountAsync());
            Assert.Equal(1 + ratedStrata, await strata.Locator("[data-mark=whisker]").CountAsync());
            Assert.True(await strata.Locator("[data-mark=bar-label]").CountAsync() >= 1 + ratedStrata);
            var firstBar = await strata.Locator("[data-mark=bar]").First.BoundingBoxAsync();
            Assert.True(firstBar is { Width: > 10, Height: > 5 }, "the overall bar is drawn with a visible size");

            // Funnel: every compared panel as a labelled marker, the network line, two 95 % and two 99.8 % limit curves.
            var funnel = page.Locator("svg[data-chart=funnel]");
            Assert.Equal(comparedPanels, await funnel.Locator("[data-mark=panel]").CountAsync());
            Assert.Equal(comparedPanels, await funnel.Locator("[data-mark=panel] text").CountAsync());
            Assert.Equal(1, await funnel.Locator("[data-mark=network]").CountAsync());
            Assert.Equal(2, await funnel.Locator("[data-mark='limit-95']").CountAsync());
            Assert.Equal(2, await funnel.Locator("[data-mark='limit-99.8']").CountAsync());

            // Trend: one labelled point per rated quarter.
            var trend = page.Locator("svg[data-chart=trend]");
            Assert.Equal(ratedPeriods, await trend.Locator("[data-mark=trend-point]").CountAsync());
            Assert.Equal(ratedPeriods, await trend.Locator("[data-mark=trend-point] > text").CountAsync());

            Assert.Contains("clinical decisions stay with licensed clinicians", await page.Locator(".caution").InnerTextAsync(), StringComparison.Ordinal);
            Assert.Empty(requests);

            Directory.CreateDirectory(ScreenshotDirectory);
            var screenshot = Path.Combine(ScreenshotDirectory, $"report-{Measure}.png");
            await page.ScreenshotAsync(new PageScreenshotOptions { Path = screenshot, FullPage = true });
            Assert.True(new FileInfo(screenshot).Length > 10_000);

            // Printed, the navigation and download links drop out and the charts stay.
            await page.EmulateMediaAsync(new PageEmulateMediaOptions { Media = Media.Print });
            Assert.False(await page.Locator("nav").IsVisibleAsync());
            Assert.True(await funnel.IsVisibleAsync());
        }
        finally
        {
            Directory.Delete(profile, recursive: true);
        }
    }
}
