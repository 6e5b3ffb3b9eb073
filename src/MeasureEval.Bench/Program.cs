using MeasureEval.Bench.EndToEnd;
using MeasureEval.Bench.Micro;

// all | ingest | evaluate | micro | store-pass (internal: one measured pass in its own process)
return args.FirstOrDefault() switch
{
    "all" => await BenchRunner.RunAsync(args[1..], ingest: true, evaluate: true, micro: true),
    "ingest" => await BenchRunner.RunAsync(args[1..], ingest: true, evaluate: false, micro: false),
    "evaluate" => await BenchRunner.RunAsync(args[1..], ingest: false, evaluate: true, micro: false),
    "micro" => MicroBenchmarks.Run(args[1..]),
    StorePass.Verb => await StorePass.RunAsync(args[1..]),
    _ => Usage(),
};

static int Usage()
{
    Console.Error.WriteLine("usage: dotnet run -c Release --project src/MeasureEval.Bench -- all|ingest|evaluate|micro [--sizes 10000,100000] [--work DIR] [--no-postgres]");
    return 2;
}
