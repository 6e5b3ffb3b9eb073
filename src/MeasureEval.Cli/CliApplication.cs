using System.CommandLine;
using MeasureEval.Cli.Evaluate;
using MeasureEval.Cli.Generate;
using MeasureEval.Cli.Load;
using MeasureEval.Cli.Token;

namespace MeasureEval.Cli;

/// <summary>The <c>measureeval</c> command line: batch work with the same code the server runs, no server needed.</summary>
public static class CliApplication
{
    public static RootCommand Build(TimeProvider time)
    {
        var root = new RootCommand("MeasureEval batch tools: synthetic data generation and population evaluation.");
        root.Subcommands.Add(GenerateCommand.Create());
        root.Subcommands.Add(LoadCommand.Create(time));
        root.Subcommands.Add(EvaluateCommand.Create(time));
        root.Subcommands.Add(TokenCommand.Create(time));
        return root;
    }
}
