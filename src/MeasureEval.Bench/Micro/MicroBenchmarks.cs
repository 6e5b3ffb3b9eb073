using BenchmarkDotNet.Attributes;
using BenchmarkDotNet.Configs;
using BenchmarkDotNet.Jobs;
using BenchmarkDotNet.Running;
using BenchmarkDotNet.Toolchains.InProcess.Emit;
using Hl7.Fhir.Model;
using MeasureEval.Core.Index;
using MeasureEval.Engine;
using MeasureEval.Synthetic.Population;

namespace MeasureEval.Bench.Micro;

/// <summary>BenchmarkDotNet runs of the per-patient hot parts (in process, short job: these are for comparison, not for CI).</summary>
public static class MicroBenchmarks
{
    public static int Run(string[] args)
    {
        var config = ManualConfig.CreateMinimumViable()
            .AddJob(Job.ShortRun.WithToolchain(InProcessEmitToolchain.Instance))
            .WithOptions(ConfigOptions.DisableOptimizationsValidator);
        BenchmarkRunner.Run<PatientHotPathBenchmarks>(config, args);
        return 0;
    }
}

/// <summary>
/// Fact extraction (resource → index facts) and one patient's evaluation for all nine measures, each over the same
/// 200 synthetic patients (reported per patient).
/// </summary>
[MemoryDiagnoser]
public class PatientHotPathBenchmarks
{
    private const int Patients = 200;
    private IReadOnlyList<IReadOnlyList<Resource>> _resources = [];
    private IReadOnlyList<PatientFacts> _facts = [];
    private IReadOnlyList<MeasureDefinition> _measures = [];
    private MeasureEvaluator _evaluator = null!;
    private readonly MeasurementPeriod _period = MeasurementPeriod.CalendarYear(2026);

    [GlobalSetup]
    public void Setup()
    {
        var generator = new PopulationGenerator(new PopulationOptions { Patients = Patients, Seed = 20261201, AsOf = new DateOnly(2026, 11, 30) });
        var records = generator.Patients().ToList();
        _resources = [.. records.Select(r => r.Resources)];
        _facts = PatientFactsAssembler.Assemble(records.SelectMany(r => r.Resources));
        var repository = MeasureRepository.Load(MeasuresDirectory(), out var issues);
        if (issues.Count > 0)
        {
            throw new InvalidOperationException(string.Join('\n', issues));
        }

        _measures = [.. repository.Measures];
        _evaluator = new MeasureEvaluator(repository);
    }

    [Benchmark(OperationsPerInvoke = Patients, Description = "extract facts, one patient")]
    public int ExtractFacts()
    {
        var n = 0;
        foreach (var patient in _resources)
        {
            foreach (var resource in patient)
            {
                if (FactExtractor.TryExtract(resource, out _))
                {
                    n++;
                }
            }
        }

        return n;
    }

    [Benchmark(OperationsPerInvoke = Patients, Description = "nine measures, one patient")]
    public int EvaluateNineMeasures()
    {
        var n = 0;
        foreach (var patient in _facts)
        {
            foreach (var result in _evaluator.EvaluateAll(_measures, patient, _period))
            {
                n += result.Numerator ? 1 : 0;
            }
        }

        return n;
    }

    private static string MeasuresDirectory()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(Path.Combine(dir.FullName, "MeasureEval.sln")))
            {
                return Path.Combine(dir.FullName, "measures");
            }
        }

        throw new InvalidOperationException("measures/ not found above " + AppContext.BaseDirectory);
    }
}
