using MeasureEval.Api.Ingest;
using MeasureEval.Api.Tests.Support;

namespace MeasureEval.Api.Tests;

public sealed class NdjsonIngestReaderTests
{
    [Theory]
    [InlineData(1)]
    [InlineData(13)]
    [InlineData(1 << 20)]
    public async System.Threading.Tasks.Task ReadAsync_AnyChunking_OneItemPerNonBlankLine(int chunkSize)
    {
        var text = Support.Fhir.Input("Ingest/mixed.ndjson");

        var items = await ChunkedPipe.DrainAsync(NdjsonIngestReader.ReadAsync(ChunkedPipe.Of(text, chunkSize), new IngestOptions(), default));

        var lines = items.Cast<IngestItem>().ToList();
        Assert.Equal([1L, 2L, 4L, 5L, 6L, 7L], lines.Select(l => l.Line!.Value));
        Assert.Equal(["nd-1", null, null, null, "nd-obs-1", "nd-imm-1"], lines.Select(l => l.Resource?.Id));
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadAsync_CrLfAndNoFinalNewline_Handled()
    {
        var text = "{\"resourceType\":\"Patient\",\"id\":\"crlf-1\"}\r\n{\"resourceType\":\"Patient\",\"id\":\"crlf-2\"}";

        var items = await ChunkedPipe.DrainAsync(NdjsonIngestReader.ReadAsync(ChunkedPipe.Of(text, 5), new IngestOptions(), default));

        Assert.Equal(["crlf-1", "crlf-2"], items.Cast<IngestItem>().Select(i => i.Resource?.Id));
    }
}
