using System.Diagnostics;
using System.Globalization;
using MeasureEval.Storage.Common;
using MeasureEval.Storage.Postgres;
using MeasureEval.Storage.Sqlite;
using MeasureEval.Synthetic.Population;
using Microsoft.Extensions.Logging.Abstractions;

namespace MeasureEval.Bench.EndToEnd;

/// <summary>
/// The store alone: writes a synthetic population through write sessions (the bulk ingest path, no parsing), then
/// streams the evaluation index. Reports CPU time beside wall time: on a shared machine CPU time tells what one free
/// core would need.
/// </summary>
internal static class StoreWriteStreamBench
{
    private sealed record Options(int FirstPatient, int Patients, int PatientsPerSession, string SqliteFile, string? PostgresConnectionString, bool SkipWrite, int StreamRuns)
    {
        public static Options Parse(string[] args)
        {
            var options = new Options(0, 100_000, 250, Path.Combine(Path.GetTempPath(), "measureeval-bench.db"), null, false, 3);
            for (var i = 0; i < args.Length; i++)
            {
                string Value() => i + 1 < args.Length ? args[++i] : throw new ArgumentException($"{args[i]} needs a value.");
                options = args[i] switch
                {
                    "--patients" => options with { Patients = int.Parse(Value(), CultureInfo.InvariantCulture) },
                    "--first-patient" => options with { FirstPatient = int.Parse(Value(), CultureInfo.InvariantCulture) },
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

    public static async Task<int> RunAsync(string[] args)
    {
        var options = Options.Parse(args);
        await using var store = options.PostgresConnectionString is { } pg
            ? (SqlResourceStore)new PostgresResourceStore(pg, TimeProvider.System, NullLogger<PostgresResourceStore>.Instance)
            : new SqliteResourceStore($"Data Source={options.SqliteFile}", TimeProvider.System, NullLogger<SqliteResourceStore>.Instance);
        await store.InitializeAsync(default);
        if (!options.SkipWrite)
        {
            await WriteAsync(store, options);
        }

        for (var run = 1; run <= options.StreamRuns; run++)
        {
            var timer = Stopwatch.StartNew();
            var cpu = Process.GetCurrentProcess().TotalProcessorTime;
            long patients = 0, facts = 0;
            await foreach (var entry in store.StreamPatientFactsAsync(null, MeasureEval.Core.Security.DataScope.Unrestricted, default))
            {
                patients++;
                facts += entry.Facts.Count + entry.Coverages.Count + (entry.Demographics is null ? 0 : 1);
            }

            Console.WriteLine(FormattableString.Invariant(
                $"stream {run}: {patients} patients, {facts} facts in {timer.Elapsed.TotalSeconds:F2} s ({patients / timer.Elapsed.TotalSeconds:F0} patients/s; CPU {(Process.GetCurrentProcess().TotalProcessorTime - cpu).TotalSeconds:F2} s), managed heap {GC.GetTotalMemory(false) / 1048576} MiB"));
        }

        return 0;
    }

    private static async Task WriteAsync(SqlResourceStore store, Options options)
    {
        // The generator numbers patients from 0; --first-patient appends patients of the same seed to an existing store.
        var generator = new PopulationGenerator(new PopulationOptions { Patients = options.FirstPatient + options.Patients, Seed = 20261201, AsOf = new DateOnly(2026, 11, 30) });
        var storeTime = TimeSpan.Zero;
        var written = 0L;
        var total = Stopwatch.StartNew();
        var cpuAtStart = Process.GetCurrentProcess().TotalProcessorTime;
        var generationCpu = TimeSpan.Zero;
        using var patients = generator.Patients().Skip(options.FirstPatient).GetEnumerator();
        var more = true;
        while (more)
        {
            var cpuBeforeGeneration = Process.GetCurrentProcess().TotalProcessorTime;
            var resources = new List<Hl7.Fhir.Model.Resource>();
            if (written == 0 && options.FirstPatient == 0)
            {
                resources.AddRange(generator.SharedResources());
            }

            for (var n = 0; n < options.PatientsPerSession && (more = patients.MoveNext()); n++)
            {
                resources.AddRange(patients.Current.Resources);
            }

            generationCpu += Process.GetCurrentProcess().TotalProcessorTime - cpuBeforeGeneration;
            if (resources.Count == 0)
            {
                break;
            }

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

        var storeCpu = Process.GetCurrentProcess().TotalProcessorTime - cpuAtStart - generationCpu;
        Console.WriteLine(FormattableString.Invariant(
            $"write: {written} resources for {options.Patients} patients in {storeTime.TotalSeconds:F1} s in the store ({written / storeTime.TotalSeconds:F0} resources/s; {total.Elapsed.TotalSeconds:F1} s with generation); store CPU {storeCpu.TotalSeconds:F1} s ({written / storeCpu.TotalSeconds:F0} resources per CPU second)"));
    }
}
