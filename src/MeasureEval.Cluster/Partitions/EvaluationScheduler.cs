using System.Collections.Concurrent;
using MeasureEval.Cluster.Hosting;
using Microsoft.Extensions.Options;

namespace MeasureEval.Cluster.Partitions;

/// <summary>
/// Dedicated threads for evaluation CPU work, so a busy node still answers membership probes on the shared thread
/// pool and the Orleans scheduler instead of being voted dead.
/// </summary>
public sealed class EvaluationScheduler : TaskScheduler, IDisposable
{
    private readonly BlockingCollection<System.Threading.Tasks.Task> _queue = [];
    private readonly Thread[] _threads;

    public EvaluationScheduler(IOptions<MeasureClusterOptions> options)
    {
        ArgumentNullException.ThrowIfNull(options);
        var count = options.Value.EvaluationThreads > 0 ? options.Value.EvaluationThreads : Environment.ProcessorCount;
        _threads = [.. Enumerable.Range(0, count).Select(i => new Thread(Work) { IsBackground = true, Name = $"measure-eval-{i}" })];
        foreach (var thread in _threads)
        {
            thread.Start();
        }
    }

    public override int MaximumConcurrencyLevel => _threads.Length;

    public System.Threading.Tasks.Task<T> Run<T>(Func<T> work, CancellationToken cancellationToken) =>
        System.Threading.Tasks.Task.Factory.StartNew(work, cancellationToken, TaskCreationOptions.DenyChildAttach, this);

    public void Dispose()
    {
        _queue.CompleteAdding();
        foreach (var thread in _threads)
        {
            thread.Join();
        }

        _queue.Dispose();
    }

    protected override void QueueTask(System.Threading.Tasks.Task task) => _queue.Add(task);

    // Inlining would run evaluation on whichever thread waits for it (an Orleans or pool thread): never.
    protected override bool TryExecuteTaskInline(System.Threading.Tasks.Task task, bool taskWasPreviouslyQueued) => false;

    protected override IEnumerable<System.Threading.Tasks.Task> GetScheduledTasks() => [.. _queue];

    private void Work()
    {
        foreach (var task in _queue.GetConsumingEnumerable())
        {
            TryExecuteTask(task);
        }
    }
}
