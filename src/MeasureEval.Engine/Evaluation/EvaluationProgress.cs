namespace MeasureEval.Engine;

/// <summary>How far a long evaluation has got: <see cref="Done"/> of <see cref="Total"/> units (patients, partitions).</summary>
public sealed record EvaluationProgress(long Done, long Total, string Unit);
