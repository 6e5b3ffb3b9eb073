using MeasureEval.Api.Analytics;
using MeasureEval.Api.CareGaps;
using MeasureEval.Api.Demo;
using MeasureEval.Api.Hosting;
using MeasureEval.Api.Jobs;
using MeasureEval.Api.Logging;
using MeasureEval.Api.Measures;
using MeasureEval.Cluster.Hosting;
using MeasureEval.Api.Security;
using MeasureEval.Storage;

var builder = WebApplication.CreateBuilder(LoggingSetup.ExpandFlags(DemoServiceCollectionExtensions.ExpandDemoFlag(args)));
builder.AddMeasureEvalLogging();
builder.Services.AddMeasureEvalStorage();
builder.Services.AddMeasureEvalApi();
builder.Services.AddMeasureEvalSecurity();
builder.Services.AddMeasureEvalMeasures();
builder.Services.AddMeasureEvalAnalytics();
builder.Services.AddMeasureEvalCareGaps();
builder.Services.AddMeasureEvalJobs();
builder.AddMeasureEvalCluster((services, cancellationToken) => services.GetRequiredService<MeasureCatalog>().GetAsync(cancellationToken));
builder.Services.AddMeasureEvalDemo();

var app = builder.Build();
app.UseMeasureEvalApi();
app.MapMeasureEndpoints();
app.MapMeasureEvalApi();
app.MapReportEndpoints();
app.MapCareGapEndpoints();
app.MapJobEndpoints();
app.Run();

/// <summary>Entry point; public so that tests can host it with WebApplicationFactory.</summary>
public partial class Program;
