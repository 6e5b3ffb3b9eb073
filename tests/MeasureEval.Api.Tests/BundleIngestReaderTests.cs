using MeasureEval.Api.Ingest;
using MeasureEval.Api.Tests.Support;

namespace MeasureEval.Api.Tests;

public sealed class BundleIngestReaderTests
{
    private static readonly IngestOptions Options = new();

    [Theory]
    [InlineData(1)]
    [InlineData(7)]
    [InlineData(64)]
    [InlineData(1 << 20)]
    public async System.Threading.Tasks.Task ReadAsync_AnyChunking_SameEntries(int chunkSize)
    {
        var json = Support.Fhir.Input("Ingest/collection-mixed.json");

        var items = await ChunkedPipe.DrainAsync(BundleIngestReader.ReadAsync(ChunkedPipe.Of(json, chunkSize), Options, default));

        var entries = items.Cast<IngestItem>().ToList();
        Assert.Equal(5, entries.Count);
        Assert.Equal(["col-1", null, null, "col-cond-1", null], entries.Select(e => e.Resource?.Id));
        Assert.Equal([0, 1, 0, 0, 1], entries.Select(e => e.Issues.Count));
        Assert.Equal("Bundle.entry[2].resource", entries[2].Root);
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadAsync_TruncatedBody_EndsWithFailure()
    {
        var json = """{"resourceType":"Bundle","type":"collection","entry":[{"resource":{"resourceType":"Patient","id":"t-1"}},{"resou""";

        var items = await ChunkedPipe.DrainAsync(BundleIngestReader.ReadAsync(ChunkedPipe.Of(json, 16), Options, default));

        Assert.IsType<IngestItem>(items[0]);
        var failure = Assert.IsType<IngestFailure>(items[^1]);
        Assert.Equal("Bundle.entry[1]", failure.Issue.Expression);
    }

    [Fact]
    public async System.Threading.Tasks.Task ReadAsync_TypeAfterEntries_StillChecked()
    {
        var json = """{"resourceType":"Bundle","entry":[{"resource":{"resourceType":"Patient","id":"late-1"}}],"type":"transaction"}""";

        var items = await ChunkedPipe.DrainAsync(BundleIngestReader.ReadAsync(ChunkedPipe.Of(json, 1 << 20), Options, default));

        var failure = Assert.IsType<IngestFailure>(items[^1]);
        Assert.Equal("MEV-BUNDLE-001", failure.Issue.Code.Code);
    }
}
