using MeasureEval.Cli;

return await CliApplication.Build().Parse(args).InvokeAsync();
