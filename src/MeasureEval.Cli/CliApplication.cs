using System.CommandLine;
using MeasureEval.Cli.Generate;

namespace MeasureEval.Cli;

/// <summary>The <c>measureeval</c> command line: batch work with the same code the server runs, no server needed.</summary>
public static class CliApplication
{
    public static RootCommand Build()
    {
        var root = new RootCommand("MeasureEval batch tools: synthetic data generation and population evaluation.");
        root.Subcommands.Add(GenerateCommand.Create());
        return root;
    }
}
