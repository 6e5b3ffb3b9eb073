using System.Diagnostics;

namespace MeasureEval.Cli;

/// <summary>A progress line on stderr for long runs, rewritten at most twice a second; counts only, never patient data. A total of 0 means unknown.</summary>
internal sealed class ProgressLine(TextWriter writer, string label, long total, string unit = "patients") : IProgress<int>, IProgress<long>
{
    private readonly Stopwatch _clock = Stopwatch.StartNew();
    private readonly Lock _gate = new();
    private long _lastReport = -1;
    private long _done;
    private long _written = -1;

    public void Report(int value) => Report((long)value);

    public void Report(long done)
    {
        lock (_gate)
        {
            _done = done;
            var now = _clock.ElapsedMilliseconds;
            if (_lastReport >= 0 && now - _lastReport < 500 && (total == 0 || done < total))
            {
                return;
            }

            _lastReport = now;
            Write();
        }
    }

    public void Finish()
    {
        lock (_gate)
        {
            if (_written != _done)
            {
                Write();
            }

            writer.WriteLine();
        }
    }

    private void Write()
    {
        _written = _done;
        var seconds = Math.Max(_clock.Elapsed.TotalSeconds, 1e-3);
        var of = total > 0 ? $"/{total} {unit} ({100.0 * _done / total:F0} %)" : $" {unit}";
        writer.Write($"\r{label}: {_done}{of}, {_done / seconds:F0}/s, {seconds:F0} s elapsed   ");
    }
}
