using MeasureEval.Engine;

namespace MeasureEval.Api.Jobs;

/// <summary>The latest progress of a running job, written by the evaluation (any thread) and read by the worker's saver.</summary>
public sealed class JobProgress(TimeSpan patientDelay) : IProgress<EvaluationProgress>
{
    private long _done;
    private long _total;
    private volatile string? _unit;

    /// <summary>Null until the evaluation first reports. The three values may come from consecutive reports; a saver needs no more.</summary>
    public EvaluationProgress? Latest => _unit is { } unit ? new EvaluationProgress(Interlocked.Read(ref _done), Interlocked.Read(ref _total), unit) : null;

    public void Report(EvaluationProgress value)
    {
        Interlocked.Exchange(ref _total, value.Total);

        // Threads may report out of order: keep the furthest count.
        long seen;
        do
        {
            seen = Interlocked.Read(ref _done);
        }
        while (value.Done > seen && Interlocked.CompareExchange(ref _done, value.Done, seen) != seen);

        _unit = value.Unit;
        if (patientDelay > TimeSpan.Zero)
        {
            Thread.Sleep(patientDelay);
        }
    }
}
