using Hl7.Fhir.Model;
using MeasureEval.Cli;
using MeasureEval.Core.Fhir;
using MeasureEval.Synthetic.Population;
using MeasureEval.Testing;

namespace MeasureEval.Synthetic.Tests.Cli;

public class EvaluateCommandTests
{
    private static async System.Threading.Tasks.Task<(int Exit, string Out)> RunAsync(params string[] args)
    {
        var output = new StringWriter();
        var original = Console.Out;
        Console.SetOut(output);
        try
        {
            var exit = await CliApplication.Build(TimeProvider.System).Parse(args).InvokeAsync();
            return (exit, output.ToString());
        }
        finally
        {
            Console.SetOut(original);
        }
    }

    [Fact]
    public async System.Threading.Tasks.Task Evaluate_DemoBundles_WritesValidSummaryReportsAndPatientCsv()
    {
        using var dir = new TempDirectory();
        var (exit, _) = await RunAsync("evaluate", "--measures", Path.Combine(RepositoryRoot.Path, "measures"),
            "--period-start", "2026-01-01", "--period-end", "2026-12-31",
            "--input", Path.Combine(RepositoryRoot.Path, DemoPopulation.RelativeDirectory), "--out", dir.Path);
        Assert.Equal(0, exit);

        var reports = Directory.GetFiles(dir.Path, "*.measure-report.json").Select(f => FhirJson.Parse<MeasureReport>(File.ReadAllText(f))).ToList();
        Assert.Equal(9, reports.Count);
        Assert.All(reports, r =>
        {
            Assert.Equal(MeasureReport.MeasureReportType.Summary, r.Type);
            Assert.Empty(BaseR4Validator.Shared.Errors(r));
        });

        var rows = File.ReadAllLines(Path.Combine(dir.Path, "patient-results.csv"));
        Assert.StartsWith("patient_id,measure_id,initial_population", rows[0], StringComparison.Ordinal);
        var initialPopulation = reports.Sum(r => r.Group[0].Population.Single(p => p.Code!.Coding[0].Code == "initial-population").Count ?? 0);
        Assert.Equal(initialPopulation, rows.Skip(1).Count(r => r.Split(',')[2] == "1"));
    }

    [Fact]
    public async System.Threading.Tasks.Task Evaluate_StoreLoadedWithTheDemo_SameCountsAsFromTheFiles()
    {
        using var dir = new TempDirectory();
        var demo = Path.Combine(RepositoryRoot.Path, DemoPopulation.RelativeDirectory);
        var measures = Path.Combine(RepositoryRoot.Path, "measures");
        var store = "sqlite:" + Path.Combine(dir.Path, "demo.db");
        Assert.Equal(0, (await RunAsync("load", "--input", demo, "--store", store)).Exit);
        Assert.Equal(0, (await RunAsync("evaluate", "--measures", measures, "--period-start", "2026-01-01", "--period-end", "2026-12-31", "--store", store, "--out", Path.Combine(dir.Path, "store"))).Exit);
        Assert.Equal(0, (await RunAsync("evaluate", "--measures", measures, "--period-start", "2026-01-01", "--period-end", "2026-12-31", "--input", demo, "--out", Path.Combine(dir.Path, "files"))).Exit);

        static IEnumerable<string> Counts(string directory) => Directory.GetFiles(directory, "*.measure-report.json").Order(StringComparer.Ordinal)
            .Select(f => FhirJson.Parse<MeasureReport>(File.ReadAllText(f)))
            .SelectMany(r => r.Group[0].Population.Select(p => $"{r.Measure} {p.Code!.Coding[0].Code} {p.Count}"));
        Assert.Equal(Counts(Path.Combine(dir.Path, "files")), Counts(Path.Combine(dir.Path, "store")));
        Assert.NotEmpty(Counts(Path.Combine(dir.Path, "store")));
    }

    [Fact]
    public async System.Threading.Tasks.Task Evaluate_InputAndStoreBothGiven_RefusesWithUsageError()
    {
        using var dir = new TempDirectory();
        var (exit, _) = await RunAsync("evaluate", "--period-start", "2026-01-01", "--period-end", "2026-12-31",
            "--input", dir.Path, "--store", "sqlite:" + Path.Combine(dir.Path, "x.db"), "--out", dir.Path);
        Assert.NotEqual(0, exit);
        Assert.Empty(Directory.GetFiles(dir.Path, "*.json"));
    }

    [Fact]
    public async System.Threading.Tasks.Task Evaluate_BadInputLine_ExitsTwoAndWritesNoReport()
    {
        using var dir = new TempDirectory();
        var (exit, _) = await RunAsync("evaluate", "--measures", Path.Combine(RepositoryRoot.Path, "measures"),
            "--period-start", "2026-01-01", "--period-end", "2026-12-31",
            "--input", Path.Combine(AppContext.BaseDirectory, "Cli", "Inputs"), "--out", dir.Path);
        Assert.Equal(2, exit);
        Assert.Empty(Directory.GetFiles(dir.Path, "*.measure-report.json"));
    }
}
