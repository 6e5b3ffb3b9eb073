using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using MeasureEval.Cli.Batch;
using MeasureEval.Core.Fhir;
using MeasureEval.Core.Index;
using MeasureEval.Core.Storage;
using MeasureEval.Engine;
using MeasureEval.Engine.Reports;

namespace MeasureEval.Cli.Evaluate;

/// <summary>
/// <c>measureeval evaluate</c>: evaluates measures over a population read from a directory of FHIR input or from a store,
/// with the engine the server runs, and writes one summary MeasureReport per measure and a per-patient CSV.
/// Exit codes: 0 done, 2 bad input (definitions or FHIR input issues, all listed on stderr).
/// </summary>
internal static class EvaluateCommand
{
    public static Command Create(TimeProvider time)
    {
        var measuresDir = new Option<DirectoryInfo>("--measures") { Description = "Measure definitions directory.", DefaultValueFactory = _ => new DirectoryInfo("measures") };
        var measureIds = new Option<string[]>("--measure") { Description = "Measure id to evaluate (repeatable; default all).", AllowMultipleArgumentsPerToken = true };
        var start = CliOptions.Date("--period-start", "First day of the measurement period (yyyy-MM-dd).");
        var end = CliOptions.Date("--period-end", "Last day of the measurement period (yyyy-MM-dd).");
        var input = new Option<DirectoryInfo>("--input") { Description = "Directory of FHIR input: *.ndjson files and/or *.json bundles." };
        var store = new Option<string>("--store") { Description = $"Evaluate a store instead: {StoreConnection.Syntax}." };
        var output = new Option<DirectoryInfo>("--out") { Description = "Output directory (created if missing).", Required = true };
        var command = new Command("evaluate", "Evaluate measures over a population, no server needed.")
        {
            measuresDir, measureIds, start, end, input, store, output,
        };
        command.Validators.Add(r =>
        {
            if ((r.GetResult(input) is null) == (r.GetResult(store) is null))
            {
                r.AddError("give exactly one of --input or --store");
            }

            if (r.GetValue(start) > r.GetValue(end))
            {
                r.AddError("--period-start must not be after --period-end");
            }
        });
        command.SetAction(async (parse, cancellationToken) =>
        {
            var repository = MeasureRepository.Load(parse.GetValue(measuresDir)!.FullName, out var definitionIssues);
            foreach (var issue in definitionIssues)
            {
                Console.Error.WriteLine($"{issue.File} {issue.Path}: {issue.Message}");
            }

            if (definitionIssues.Count > 0)
            {
                return 2;
            }

            var wanted = parse.GetValue(measureIds) ?? [];
            var measures = new List<MeasureDefinition>();
            foreach (var id in wanted.Length == 0 ? repository.Measures.Select(m => m.Id) : wanted)
            {
                if (!repository.TryGetMeasure(id, out var measure))
                {
                    Console.Error.WriteLine($"--measure: no measure '{id}' under {parse.GetValue(measuresDir)!.FullName}");
                    return 2;
                }

                measures.Add(measure);
            }

            var period = new MeasurementPeriod(parse.GetValue(start), parse.GetValue(end));
            var outDir = parse.GetValue(output)!.FullName;
            Directory.CreateDirectory(outDir);
            _ = FhirJson.Serialize(new Hl7.Fhir.Model.Patient());

            IResourceStore? resourceStore = null;
            try
            {
                IAsyncEnumerable<PatientFacts> patients;
                long total;
                if (parse.GetValue(input) is { } inputDir)
                {
                    var issues = new List<InputIssue>();
                    var reading = new ProgressLine(Console.Error, "read", 0, "records");
                    var facts = InputFacts.Load(inputDir.FullName, issues, reading);
                    reading.Finish();
                    if (issues.Count > 0)
                    {
                        foreach (var issue in issues)
                        {
                            Console.Error.WriteLine(issue);
                        }

                        Console.Error.WriteLine($"{issues.Count} input issues: nothing evaluated");
                        return 2;
                    }

                    patients = facts.ToAsyncEnumerable();
                    total = facts.Count;
                }
                else
                {
                    if (!StoreConnection.TryOpen(parse.GetValue(store)!, time, out resourceStore, out var error))
                    {
                        Console.Error.WriteLine(error);
                        return 2;
                    }

                    await resourceStore!.InitializeAsync(cancellationToken).ConfigureAwait(false);
                    patients = resourceStore.StreamPatientFactsAsync(null, MeasureEval.Core.Security.DataScope.Unrestricted, cancellationToken);
                    total = 0;
                }

                var evaluator = new MeasureEvaluator(repository, resourceStore is null ? null : new StoreRecordSource(resourceStore));
                var clock = Stopwatch.StartNew();
                var progress = new ProgressLine(Console.Error, "evaluate", total);
                IReadOnlyList<PopulationSummary> summaries;
                long rows;
                using (var csv = new PatientResultCsvWriter(Path.Combine(outDir, "patient-results.csv"), measures))
                {
                    summaries = await new BatchEvaluation(evaluator, measures, period).RunAsync(patients, csv.Write, progress, cancellationToken).ConfigureAwait(false);
                    rows = csv.Rows;
                }

                progress.Finish();
                var reports = new MeasureReportBuilder(time);
                foreach (var summary in summaries)
                {
                    var report = reports.Summary(summary);
                    await File.WriteAllTextAsync(Path.Combine(outDir, $"{summary.Measure.Id}.measure-report.json"), FhirJson.Serialize(report, pretty: true) + "\n", cancellationToken).ConfigureAwait(false);
                }

                var evaluated = summaries.Count > 0 ? summaries[0].PatientsEvaluated : 0;
                Console.Out.WriteLine($"evaluated {measures.Count} measures over {evaluated} patients in {clock.Elapsed.TotalSeconds:F1} s; {rows} result rows; reports in {outDir}");
                Console.Out.WriteLine($"{"measure",-32} {"ip",7} {"den",7} {"excl",6} {"exc",6} {"num",7} {"rate",7}  95 % CI");
                foreach (var s in summaries)
                {
                    var c = s.Counts;
                    var rate = c.Score is { } score ? score.ToString("0.000", CultureInfo.InvariantCulture) : "-";
                    var ci = c.Interval is { } i ? $"{i.Lower.ToString("0.000", CultureInfo.InvariantCulture)}–{i.Upper.ToString("0.000", CultureInfo.InvariantCulture)}" : "-";
                    Console.Out.WriteLine($"{s.Measure.Id,-32} {c.InitialPopulation,7} {c.Denominator,7} {c.DenominatorExclusion,6} {c.DenominatorException,6} {c.Numerator,7} {rate,7}  {ci}");
                }

                return 0;
            }
            finally
            {
                if (resourceStore is IAsyncDisposable disposable)
                {
                    await disposable.DisposeAsync().ConfigureAwait(false);
                }
            }
        });
        return command;
    }
}
