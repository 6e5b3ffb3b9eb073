using System.Diagnostics;
using System.Globalization;
using System.Text;
using System.Text.Json;
using Hl7.Fhir.Serialization;
using MeasureEval.Cli.Batch;
using MeasureEval.Core.Fhir;
using MeasureEval.Bench.Micro;
using MeasureEval.Synthetic.Output;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Bench.EndToEnd;

/// <summary>
/// The end-to-end benchmarks: synthetic populations as NDJSON, parse rates of those bytes (System.Text.Json,
/// Firely strict), ingest into SQLite (and PostgreSQL when a throwaway server starts), then the nine measures over
/// each population from the store beside the time to merely stream its index. Timed passes run in child processes
/// (peak memory per pass) and are repeated; medians are reported. Results go to stdout and WORK/results.md.
/// </summary>
internal static class BenchRunner
{
    private static readonly DateOnly AsOf = new(2026, 11, 30);
    private const string PeriodStart = "2026-01-01";
    private const string PeriodEnd = "2026-12-31";
    private const ulong Seed = 20261201;

    public static async Task<int> RunAsync(string[] args, bool ingest, bool evaluate, bool micro)
    {
        var sizes = Arg(args, "--sizes", "10000,100000").Split(',').Select(s => int.Parse(s, CultureInfo.InvariantCulture)).ToArray();
        var work = Path.GetFullPath(Arg(args, "--work", "artifacts/bench"));
        var repeats = int.Parse(Arg(args, "--repeats", "3"), CultureInfo.InvariantCulture);
        var measures = Path.GetFullPath(Arg(args, "--measures", "measures"));
        var postgres = !args.Contains("--no-postgres");
        Directory.CreateDirectory(work);
        var report = new StringBuilder();
        void Line(string text)
        {
            Console.Out.WriteLine(text);
            report.AppendLine(text);
        }

        Line($"date {DateTimeOffset.UtcNow:yyyy-MM-dd HH:mm} UTC; {Environment.ProcessorCount} cores; {Environment.OSVersion}; .NET {Environment.Version}; repeats {repeats} (medians)");
        _ = FhirJson.Serialize(new Hl7.Fhir.Model.Patient());
        foreach (var size in sizes)
        {
            var ndjson = Path.Combine(work, $"pop-{size}");
            Generate(size, ndjson, Line);
            var db = Path.Combine(work, $"pop-{size}.db");
            if (ingest || !File.Exists(db))
            {
                if (ingest && size == sizes[0])
                {
                    ParseRates(ndjson, repeats, Line);
                }

                await IngestSqliteAsync(ndjson, db, Line);
            }

            if (evaluate)
            {
                EvaluatePasses($"sqlite:{db}", $"SQLite, {size:N0} patients", measures, repeats, Line);
            }
        }

        if (postgres && (ingest || evaluate))
        {
            using var server = ThrowawayPostgres.TryStart(out var reason);
            if (server is null)
            {
                Line($"PostgreSQL: skipped ({reason})");
            }
            else
            {
                var ndjson = Path.Combine(work, $"pop-{sizes[0]}");
                var store = $"postgres:{server.ConnectionString}";
                await IngestAsync(store, ndjson, $"PostgreSQL ingest, {sizes[0]:N0} patients", Line);
                EvaluatePasses(store, $"PostgreSQL, {sizes[0]:N0} patients", measures, repeats, Line);
            }
        }

        await File.WriteAllTextAsync(Path.Combine(work, "results.md"), report.ToString());
        if (micro)
        {
            MicroBenchmarks.Run([]);
        }

        return 0;
    }

    /// <summary>The 1-minute load average: the machine is shared, so figures are read beside it.</summary>
    private static string LoadAverage() =>
        File.Exists("/proc/loadavg") ? "load " + File.ReadAllText("/proc/loadavg").Split(' ')[0] : "load n/a";

    private static string Arg(string[] args, string name, string fallback)
    {
        var at = Array.IndexOf(args, name);
        return at >= 0 && at + 1 < args.Length ? args[at + 1] : fallback;
    }

    private static void Generate(int size, string directory, Action<string> line)
    {
        var marker = Path.Combine(directory, ".generated");
        var stamp = $"{size} {Seed} {AsOf:yyyy-MM-dd}";
        if (File.Exists(marker) && File.ReadAllText(marker) == stamp)
        {
            return;
        }

        if (Directory.Exists(directory))
        {
            Directory.Delete(directory, recursive: true);
        }

        var clock = Stopwatch.StartNew();
        var summary = NdjsonPopulationWriter.Write(new PopulationGenerator(new PopulationOptions { Patients = size, Seed = Seed, AsOf = AsOf }), directory);
        File.WriteAllText(marker, stamp);
        line($"generated {size:N0} patients: {summary.TotalResources:N0} resources, {DirectorySize(directory) / 1e6:F0} MB NDJSON in {clock.Elapsed.TotalSeconds:F1} s");
    }

    private static long DirectorySize(string directory) => Directory.GetFiles(directory, "*.ndjson").Sum(f => new FileInfo(f).Length);

    /// <summary>Parse rates of the very bytes that are ingested, one resource per line, single thread and both cores.</summary>
    private static void ParseRates(string directory, int repeats, Action<string> line)
    {
        var lines = Directory.GetFiles(directory, "*.ndjson").Order(StringComparer.Ordinal).SelectMany(File.ReadLines).ToArray();
        var bytes = lines.Sum(l => (long)Encoding.UTF8.GetByteCount(l));
        double Median(Action pass)
        {
            var times = new List<double>();
            for (var i = 0; i < repeats; i++)
            {
                var clock = Stopwatch.StartNew();
                pass();
                times.Add(clock.Elapsed.TotalSeconds);
            }

            return times.Order().ElementAt(times.Count / 2);
        }

        var stj = Median(() =>
        {
            foreach (var l in lines)
            {
                using var doc = JsonDocument.Parse(l);
            }
        });
        var firely = Median(() =>
        {
            foreach (var l in lines)
            {
                _ = FhirJson.Deserializer.DeserializeResource(l);
            }
        });
        var firelyParallel = Median(() => Parallel.ForEach(lines, l => FhirJson.Deserializer.DeserializeResource(l)));
        line($"({LoadAverage()}) parse {lines.Length:N0} resources ({bytes / 1e6:F0} MB): System.Text.Json JsonDocument {lines.Length / stj:N0}/s ({bytes / 1e6 / stj:F0} MB/s); "
            + $"Firely strict 1 thread {lines.Length / firely:N0}/s ({bytes / 1e6 / firely:F1} MB/s); Firely strict all cores {lines.Length / firelyParallel:N0}/s");
    }

    private static async Task IngestSqliteAsync(string ndjson, string db, Action<string> line)
    {
        foreach (var file in new[] { db, db + "-wal", db + "-shm" })
        {
            File.Delete(file);
        }

        var size = Directory.GetFiles(ndjson, "Patient.ndjson").Sum(f => File.ReadLines(f).LongCount());
        await IngestAsync($"sqlite:{db}", ndjson, $"SQLite ingest, {size:N0} patients", line);
        line($"  database {new FileInfo(db).Length / 1e6:F0} MB");
    }

    private static async Task IngestAsync(string store, string ndjson, string label, Action<string> line)
    {
        if (!StoreConnection.TryOpen(store, TimeProvider.System, out var resourceStore, out var error))
        {
            throw new InvalidOperationException(error);
        }

        await resourceStore!.InitializeAsync(CancellationToken.None);
        var cpu = Process.GetCurrentProcess().TotalProcessorTime;
        var clock = Stopwatch.StartNew();
        var written = await StoreLoader.LoadAsync(resourceStore, ndjson, null, CancellationToken.None);
        var seconds = clock.Elapsed.TotalSeconds;
        var cpuSeconds = (Process.GetCurrentProcess().TotalProcessorTime - cpu).TotalSeconds;
        line($"{label}: {written:N0} resources in {seconds:F1} s = {written / seconds:N0} resources/s (parse on all cores, one writer; CPU {cpuSeconds:F0} s; {LoadAverage()})");
        if (resourceStore is IAsyncDisposable disposable)
        {
            await disposable.DisposeAsync();
        }
    }

    private static void EvaluatePasses(string store, string label, string measures, int repeats, Action<string> line)
    {
        StorePass.Figures Median(string mode)
        {
            var runs = Enumerable.Range(0, repeats).Select(_ => Child(mode, store, measures)).OrderBy(f => f.Seconds).ToList();
            return runs[runs.Count / 2];
        }

        var loadBefore = LoadAverage();
        var stream = Median("stream");
        var eval = Median("evaluate");
        line($"  ({loadBefore} before, {LoadAverage()} after)");
        line($"{label}: stream index {stream.Seconds:F2} s ({stream.Patients / stream.Seconds:N0} patients/s, CPU {stream.CpuSeconds:F1} s, peak {stream.PeakWorkingSetBytes / 1048576.0:F0} MiB); "
            + $"nine measures {eval.Seconds:F2} s ({eval.Patients / eval.Seconds:N0} patients/s, CPU {eval.CpuSeconds:F1} s, peak {eval.PeakWorkingSetBytes / 1048576.0:F0} MiB, "
            + $"{eval.AllocatedBytes / 1e9:F1} GB allocated, GC {eval.Gen0}/{eval.Gen1}/{eval.Gen2}); ratio to streaming {eval.Seconds / stream.Seconds:F2}×");
    }

    private static StorePass.Figures Child(string mode, string store, string measures)
    {
        var start = new ProcessStartInfo(Environment.ProcessPath!)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
        };
        foreach (var a in new[] { StorePass.Verb, mode, store, measures, PeriodStart, PeriodEnd })
        {
            start.ArgumentList.Add(a);
        }

        using var process = Process.Start(start)!;
        var output = process.StandardOutput.ReadToEnd();
        var errors = process.StandardError.ReadToEnd();
        process.WaitForExit();
        if (process.ExitCode != 0)
        {
            throw new InvalidOperationException($"{mode} pass failed: {errors}");
        }

        return JsonSerializer.Deserialize<StorePass.Figures>(output.Trim().Split('\n')[^1])!;
    }
}
