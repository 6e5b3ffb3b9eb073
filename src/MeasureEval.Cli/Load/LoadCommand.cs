using System.CommandLine;
using System.Diagnostics;
using MeasureEval.Cli.Batch;

namespace MeasureEval.Cli.Load;

/// <summary>
/// <c>measureeval load</c>: writes a directory of FHIR input (NDJSON or bundles) into a store. The whole input is
/// parsed first and, if any issue is found, every issue is listed and nothing is written (exit code 2).
/// </summary>
internal static class LoadCommand
{
    public static Command Create(TimeProvider time)
    {
        var input = new Option<DirectoryInfo>("--input") { Description = "Directory of FHIR input: *.ndjson files and/or *.json bundles.", Required = true };
        var store = new Option<string>("--store") { Description = StoreConnection.Syntax, Required = true };
        var command = new Command("load", "Load FHIR input into a store (all or nothing per check; committed in batches).") { input, store };
        command.SetAction(async (parse, cancellationToken) =>
        {
            var directory = parse.GetValue(input)!.FullName;
            var issues = await StoreLoader.CheckAsync(directory, cancellationToken).ConfigureAwait(false);
            if (issues.Count > 0)
            {
                foreach (var issue in issues)
                {
                    Console.Error.WriteLine(issue);
                }

                Console.Error.WriteLine($"{issues.Count} input issues: nothing written");
                return 2;
            }

            if (!StoreConnection.TryOpen(parse.GetValue(store)!, time, out var resourceStore, out var error))
            {
                Console.Error.WriteLine(error);
                return 2;
            }

            try
            {
                await resourceStore!.InitializeAsync(cancellationToken).ConfigureAwait(false);
                var clock = Stopwatch.StartNew();
                var progress = new ProgressLine(Console.Error, "load", 0, "resources");
                var written = await StoreLoader.LoadAsync(resourceStore, directory, progress, cancellationToken).ConfigureAwait(false);
                progress.Finish();
                Console.Out.WriteLine($"wrote {written} resources in {clock.Elapsed.TotalSeconds:F1} s ({written / Math.Max(clock.Elapsed.TotalSeconds, 1e-3):F0}/s)");
                return 0;
            }
            finally
            {
                if (resourceStore is IAsyncDisposable disposable)
                {
                    await disposable.DisposeAsync().ConfigureAwait(false);
                }
            }
        });
        return command;
    }
}
