namespace MeasureEval.Engine;

/// <summary>
/// How far a long evaluation is: <paramref name="Done"/> of <paramref name="Total"/> <paramref name="Unit"/> ("patients";
/// in cluster mode "partitions"). Total is 0 when not known. Reported through <see cref="IProgress{T}"/>, possibly from
/// several threads at once, so a receiver must be thread-safe and cheap (it is called once per patient).
/// </summary>
public readonly record struct EvaluationProgress(long Done, long Total, string Unit)
{
    public const string Patients = "patients";

    /// <summary>The unit of a cluster run: partition results back at the coordinator.</summary>
    public const string Partitions = "partitions";
}
