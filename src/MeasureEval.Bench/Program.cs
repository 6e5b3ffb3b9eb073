using MeasureEval.Bench.EndToEnd;
using MeasureEval.Bench.Micro;

// all | ingest | evaluate | micro | store | store-pass (internal: one measured pass in its own process)
return args.FirstOrDefault() switch
{
    "all" => await BenchRunner.RunAsync(args[1..], ingest: true, evaluate: true, micro: true),
    "ingest" => await BenchRunner.RunAsync(args[1..], ingest: true, evaluate: false, micro: false),
    "evaluate" => await BenchRunner.RunAsync(args[1..], ingest: false, evaluate: true, micro: false),
    "micro" => MicroBenchmarks.Run(args[1..]),
    "store" => await StoreWriteStreamBench.RunAsync(args[1..]),
    StorePass.Verb => await StorePass.RunAsync(args[1..]),
    _ => Usage(),
};

static int Usage()
{
    Console.Error.WriteLine("""
        usage: dotnet run -c Release --project src/MeasureEval.Bench -- COMMAND
          all | ingest | evaluate  [--sizes 10000,100000] [--work DIR] [--repeats 3] [--measures DIR] [--no-postgres]
          micro                    BenchmarkDotNet: fact extraction and nine measures for one patient
          store                    write sessions then index streaming, store only:
                                   --patients N [--first-patient N] [--patients-per-session N] [--sqlite FILE | --postgres CONNSTR] [--skip-write] [--stream-runs N]
        """);
    return 2;
}
