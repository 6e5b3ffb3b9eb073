using MeasureEval.Api.Logging;

namespace MeasureEval.Api.Tests;

public sealed class LoggingSetupTests
{
    [Fact]
    public void ExpandFlags_LogJsonSwitch_BecomesConfigurationValue()
    {
        var args = LoggingSetup.ExpandFlags(["--log-json", "--urls", "http://127.0.0.1:8080"]);

        Assert.Equal(["--Logging:Json=true", "--urls", "http://127.0.0.1:8080"], args);
    }
}
