using System.Diagnostics;
using System.Globalization;
using System.Text.Json;
using MeasureEval.Cli.Batch;
using MeasureEval.Engine;

namespace MeasureEval.Bench.EndToEnd;

/// <summary>
/// One measured pass over a store, run in a process of its own so that its peak working set is its own:
/// <c>stream</c> reads every patient's index entry (the lower bound of any evaluation), <c>evaluate</c> runs
/// all measures over them with the batch evaluator. Prints one JSON line of figures.
/// </summary>
internal static class StorePass
{
    public const string Verb = "store-pass";

    public sealed record Figures(string Mode, long Patients, double Seconds, double CpuSeconds, long PeakWorkingSetBytes, long AllocatedBytes, int Gen0, int Gen1, int Gen2);

    public static async Task<int> RunAsync(string[] args)
    {
        var mode = args[0];
        var store = args[1];
        var measuresDir = args[2];
        var period = new MeasurementPeriod(DateOnly.Parse(args[3], CultureInfo.InvariantCulture), DateOnly.Parse(args[4], CultureInfo.InvariantCulture));
        if (!StoreConnection.TryOpen(store, TimeProvider.System, out var resourceStore, out var error))
        {
            Console.Error.WriteLine(error);
            return 2;
        }

        await resourceStore!.InitializeAsync(CancellationToken.None);
        var repository = MeasureRepository.Load(measuresDir, out var issues);
        if (issues.Count > 0)
        {
            Console.Error.WriteLine(string.Join('\n', issues));
            return 2;
        }

        var measures = repository.Measures.ToList();
        var evaluator = new MeasureEvaluator(repository, new StoreRecordSource(resourceStore));

        // Warm-up outside the clock: first-use costs (JIT, SQLite open, UCUM tables) are not per-patient work.
        await foreach (var warm in resourceStore.StreamPatientFactsAsync(null, MeasureEval.Core.Security.DataScope.Unrestricted, CancellationToken.None))
        {
            evaluator.EvaluateAll(measures, warm, period);
            break;
        }

        var gen0 = GC.CollectionCount(0);
        var gen1 = GC.CollectionCount(1);
        var gen2 = GC.CollectionCount(2);
        var allocated = GC.GetTotalAllocatedBytes();
        var cpu = Process.GetCurrentProcess().TotalProcessorTime;
        var clock = Stopwatch.StartNew();
        long patients = 0;
        if (mode == "stream")
        {
            long facts = 0;
            await foreach (var p in resourceStore.StreamPatientFactsAsync(null, MeasureEval.Core.Security.DataScope.Unrestricted, CancellationToken.None))
            {
                facts += p.Facts.Count;
                patients++;
            }

            GC.KeepAlive(facts);
        }
        else
        {
            var summaries = await new BatchEvaluation(evaluator, measures, period).RunAsync(resourceStore.StreamPatientFactsAsync(null, MeasureEval.Core.Security.DataScope.Unrestricted, CancellationToken.None), null, null, CancellationToken.None);
            patients = summaries[0].PatientsEvaluated;
        }

        clock.Stop();
        using var self = Process.GetCurrentProcess();
        self.Refresh();
        var figures = new Figures(mode, patients, clock.Elapsed.TotalSeconds, (self.TotalProcessorTime - cpu).TotalSeconds, self.PeakWorkingSet64, GC.GetTotalAllocatedBytes() - allocated,
            GC.CollectionCount(0) - gen0, GC.CollectionCount(1) - gen1, GC.CollectionCount(2) - gen2);
        Console.Out.WriteLine(JsonSerializer.Serialize(figures));
        if (resourceStore is IAsyncDisposable disposable)
        {
            await disposable.DisposeAsync();
        }

        return 0;
    }
}
