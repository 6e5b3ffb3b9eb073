using MeasureEval.Cli;

return await CliApplication.Build(TimeProvider.System).Parse(args).InvokeAsync();
