using MeasureEval.Cli.Batch;
using MeasureEval.Storage.Sqlite;

namespace MeasureEval.Synthetic.Tests.Cli;

public class StoreConnectionTests
{
    [Fact]
    public void TryOpen_SqlitePath_OpensThatFile()
    {
        Assert.True(StoreConnection.TryOpen("sqlite:/tmp/measureeval-cli-test.db", TimeProvider.System, out var store, out _));
        Assert.Equal("/tmp/measureeval-cli-test.db", Assert.IsType<SqliteResourceStore>(store).DataSource);
    }

    [Theory]
    [InlineData("sqlite:")]
    [InlineData("mysql:Server=x")]
    [InlineData("/tmp/x.db")]
    public void TryOpen_UnknownOrEmpty_Fails(string text)
    {
        Assert.False(StoreConnection.TryOpen(text, TimeProvider.System, out var store, out var error));
        Assert.Null(store);
        Assert.NotNull(error);
    }
}
