using MeasureEval.Api.Hosting;
using MeasureEval.Api.Logging;
using MeasureEval.Storage;

var builder = WebApplication.CreateBuilder(LoggingSetup.ExpandFlags(args));
builder.AddMeasureEvalLogging();
builder.Services.AddMeasureEvalStorage();
builder.Services.AddMeasureEvalApi();

var app = builder.Build();
app.UseMeasureEvalApi();
app.MapMeasureEvalApi();
app.Run();

/// <summary>Entry point; public so that tests can host it with WebApplicationFactory.</summary>
public partial class Program;
