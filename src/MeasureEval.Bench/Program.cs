using System.Diagnostics;
using System.Globalization;
using MeasureEval.Bench;
using MeasureEval.Storage.Common;
using MeasureEval.Storage.Postgres;
using MeasureEval.Storage.Sqlite;
using Microsoft.Extensions.Logging.Abstractions;

// Times the store on an invented population: writes through write sessions (the bulk ingest path), then streams the
// evaluation index. Usage:
//   dotnet run -c Release --project src/MeasureEval.Bench -- --patients 100000 --per-patient 40
//     [--sqlite FILE | --postgres CONNSTR] [--first-patient N (append to an existing population)] [--patients-per-session N]
//     [--skip-write] [--stream-runs N]
var options = BenchOptions.Parse(args);
await using var store = options.PostgresConnectionString is { } pg
    ? (SqlResourceStore)new PostgresResourceStore(pg, TimeProvider.System, NullLogger<PostgresResourceStore>.Instance)
    : new SqliteResourceStore($"Data Source={options.SqliteFile}", TimeProvider.System, NullLogger<SqliteResourceStore>.Instance);
await store.InitializeAsync(default);

if (!options.SkipWrite)
{
    var storeTime = TimeSpan.Zero;
    var written = 0L;
    var total = Stopwatch.StartNew();
    var cpuAtStart = Process.GetCurrentProcess().TotalProcessorTime;
    var generationCpu = TimeSpan.Zero;
    var end = options.FirstPatient + options.Patients;
    for (var first = options.FirstPatient; first < end; first += options.PatientsPerSession)
    {
        var cpuBeforeGeneration = Process.GetCurrentProcess().TotalProcessorTime;
        var resources = Enumerable.Range(first, Math.Min(options.PatientsPerSession, end - first))
            .SelectMany(i => SyntheticPopulation.ResourcesOf(i, options.PerPatient)).ToList();
        generationCpu += Process.GetCurrentProcess().TotalProcessorTime - cpuBeforeGeneration;
        var timer = Stopwatch.StartNew();
        await using (var session = await store.BeginWriteAsync(default))
        {
            foreach (var resource in resources)
            {
                await session.UpdateAsync(resource, null, default);
            }

            await session.CommitAsync(default);
        }

        storeTime += timer.Elapsed;
        written += resources.Count;
    }

    // CPU time tells more than wall time on a shared machine: it is what one free core would need.
    var storeCpu = Process.GetCurrentProcess().TotalProcessorTime - cpuAtStart - generationCpu;
    Console.WriteLine(FormattableString.Invariant(
        $"write: {written} resources for {options.Patients} patients in {storeTime.TotalSeconds:F1} s in the store ({written / storeTime.TotalSeconds:F0} resources/s; {total.Elapsed.TotalSeconds:F1} s with generation); store CPU {storeCpu.TotalSeconds:F1} s ({written / storeCpu.TotalSeconds:F0} resources per CPU second)"));
}

for (var run = 1; run <= options.StreamRuns; run++)
{
    var timer = Stopwatch.StartNew();
    var cpu = Process.GetCurrentProcess().TotalProcessorTime;
    long patients = 0, facts = 0;
    await foreach (var entry in store.StreamPatientFactsAsync(null, default))
    {
        patients++;
        facts += entry.Facts.Count + entry.Coverages.Count + (entry.Demographics is null ? 0 : 1);
    }

    Console.WriteLine(FormattableString.Invariant(
        $"stream {run}: {patients} patients, {facts} facts in {timer.Elapsed.TotalSeconds:F2} s ({patients / timer.Elapsed.TotalSeconds:F0} patients/s; CPU {(Process.GetCurrentProcess().TotalProcessorTime - cpu).TotalSeconds:F2} s), managed heap {GC.GetTotalMemory(false) / 1048576} MiB"));
}

internal sealed record BenchOptions(int FirstPatient, int Patients, int PerPatient, int PatientsPerSession, string SqliteFile, string? PostgresConnectionString, bool SkipWrite, int StreamRuns)
{
    public static BenchOptions Parse(string[] args)
    {
        var options = new BenchOptions(0, 100_000, 40, 250, Path.Combine(Path.GetTempPath(), "measureeval-bench.db"), null, false, 3);
        for (var i = 0; i < args.Length; i++)
        {
            string Value() => i + 1 < args.Length ? args[++i] : throw new ArgumentException($"{args[i]} needs a value.");
            options = args[i] switch
            {
                "--patients" => options with { Patients = int.Parse(Value(), CultureInfo.InvariantCulture) },
                "--first-patient" => options with { FirstPatient = int.Parse(Value(), CultureInfo.InvariantCulture) },
                "--per-patient" => options with { PerPatient = int.Parse(Value(), CultureInfo.InvariantCulture) },
                "--patients-per-session" => options with { PatientsPerSession = int.Parse(Value(), CultureInfo.InvariantCulture) },
                "--sqlite" => options with { SqliteFile = Value() },
                "--postgres" => options with { PostgresConnectionString = Value() },
                "--skip-write" => options with { SkipWrite = true },
                "--stream-runs" => options with { StreamRuns = int.Parse(Value(), CultureInfo.InvariantCulture) },
                _ => throw new ArgumentException($"Unknown option {args[i]}."),
            };
        }

        return options;
    }
}
