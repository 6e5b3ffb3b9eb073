namespace MeasureEval.Cli.Batch;

/// <summary>A located problem in an input file: the file, its 1-based line (NDJSON) or 0 (whole document), the FHIR path and what is wrong.</summary>
internal sealed record InputIssue(string File, int Line, string? Expression, string Code, string Message)
{
    public override string ToString() =>
        $"{File}{(Line > 0 ? $":{Line}" : string.Empty)}{(Expression is null ? string.Empty : $" {Expression}")}: {Code}: {Message}";
}
