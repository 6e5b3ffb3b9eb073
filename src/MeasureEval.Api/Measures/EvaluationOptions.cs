using System.ComponentModel.DataAnnotations;

namespace MeasureEval.Api.Measures;

/// <summary>How population evaluations use the machine.</summary>
public sealed class EvaluationOptions
{
    public const string Section = "Evaluation";

    /// <summary>Threads that evaluate patients of one population request (0: one per core, at most 8). 1 evaluates serially.</summary>
    [Range(0, 64)]
    public int Workers { get; set; }

    public int EffectiveWorkers => Workers > 0 ? Workers : Math.Clamp(Environment.ProcessorCount, 1, 8);
}
