using System.IO.Pipelines;
using System.Text;

namespace MeasureEval.Api.Tests.Support;

/// <summary>A pipe fed in small chunks, so that readers see JSON tokens and lines split across buffers.</summary>
public static class ChunkedPipe
{
    public static PipeReader Of(string text, int chunkSize)
    {
        var pipe = new Pipe();
        var bytes = Encoding.UTF8.GetBytes(text);
        _ = System.Threading.Tasks.Task.Run(async () =>
        {
            for (var offset = 0; offset < bytes.Length; offset += chunkSize)
            {
                await pipe.Writer.WriteAsync(bytes.AsMemory(offset, Math.Min(chunkSize, bytes.Length - offset)));
            }

            await pipe.Writer.CompleteAsync();
        });
        return pipe.Reader;
    }

    public static async Task<List<object>> DrainAsync(IAsyncEnumerable<object> items)
    {
        var list = new List<object>();
        await foreach (var item in items)
        {
            list.Add(item);
        }

        return list;
    }
}
