using System.CommandLine;
using System.Diagnostics;
using MeasureEval.Synthetic.Output;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Cli.Generate;

/// <summary><c>measureeval generate</c>: writes a synthetic population as NDJSON or transaction bundles.</summary>
internal static class GenerateCommand
{
    /// <summary>The default data-extract date: fixed, so that a command line always means the same population.</summary>
    public static readonly DateOnly DefaultAsOf = new(2026, 11, 30);

    public static Command Create()
    {
        var patients = new Option<int>("--patients") { Description = "Number of patients.", Required = true };
        patients.Validators.Add(r =>
        {
            if (r.GetValueOrDefault<int>() < 1)
            {
                r.AddError("--patients must be at least 1");
            }
        });
        var seed = new Option<ulong>("--seed") { Description = "Seed: the same seed and options give the same bytes.", Required = true };
        var format = new Option<string>("--format") { Description = "ndjson (one file per resource type) or bundles (transaction bundles).", DefaultValueFactory = _ => "ndjson" };
        format.AcceptOnlyFromAmong("ndjson", "bundles");
        var output = new Option<DirectoryInfo>("--out") { Description = "Output directory (created if missing).", Required = true };
        var asOf = CliOptions.Date("--as-of", $"Data-extract date: nothing happens after it; its year is the measurement year (default {DefaultAsOf:yyyy-MM-dd}).", DefaultAsOf);
        var perBundle = new Option<int>("--patients-per-bundle") { Description = "Patients per transaction bundle.", DefaultValueFactory = _ => 50 };
        perBundle.Validators.Add(r =>
        {
            if (r.GetValueOrDefault<int>() < 1)
            {
                r.AddError("--patients-per-bundle must be at least 1");
            }
        });

        var command = new Command("generate", "Generate a synthetic population of the Riverbend Community Health scenario.")
        {
            patients, seed, format, output, asOf, perBundle,
        };
        command.SetAction(parse =>
        {
            var options = new PopulationOptions
            {
                Patients = parse.GetValue(patients),
                Seed = parse.GetValue(seed),
                AsOf = parse.GetValue(asOf),
                PatientsPerBundle = parse.GetValue(perBundle),
            };
            var directory = parse.GetValue(output)!.FullName;
            var generator = new PopulationGenerator(options);
            var clock = Stopwatch.StartNew();
            var progress = new ProgressLine(Console.Error, "generate", options.Patients);
            var summary = parse.GetValue(format) == "bundles"
                ? BundlePopulationWriter.Write(generator, directory, progress)
                : NdjsonPopulationWriter.Write(generator, directory, progress);
            progress.Finish();
            Console.Out.WriteLine($"wrote {summary.TotalResources} resources for {options.Patients} patients in {summary.Files.Count} files to {directory} ({clock.Elapsed.TotalSeconds:F1} s)");
            foreach (var (type, count) in summary.ResourcesByType)
            {
                Console.Out.WriteLine($"  {type,-18} {count,10}");
            }

            return 0;
        });
        return command;
    }
}
