using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Net.Sockets;
using Npgsql;
using Xunit;

namespace MeasureEval.Testing;

/// <summary>
/// A throwaway PostgreSQL 15 server for one test class: initdb in a temporary folder, started on a free loopback port,
/// stopped (by its own data directory, nothing else) and deleted on dispose. Root cannot run initdb, so as root the
/// server runs as the <c>postgres</c> system user. When the binaries are missing, <see cref="IsAvailable"/> is false and
/// tests should skip with <see cref="UnavailableReason"/>.
/// </summary>
public sealed class PostgresServer : IAsyncLifetime
{
    public const string BinDirectory = "/usr/lib/postgresql/15/bin";
    private const string SystemUser = "postgres";
    private const string DatabaseName = "measureeval_test";
    private const int StartAttempts = 3;

    private string? _root;
    private string? _dataDirectory;
    private bool _started;
    private int _schemas;

    public bool IsAvailable { get; private set; }

    public string UnavailableReason { get; private set; } = "The PostgreSQL server has not been started.";

    /// <summary>Connection string of the test database (user postgres, trust authentication on loopback).</summary>
    public string ConnectionString { get; private set; } = string.Empty;

    public int Port { get; private set; }

    public async System.Threading.Tasks.Task InitializeAsync()
    {
        if (!File.Exists(Path.Combine(BinDirectory, "initdb")) || !File.Exists(Path.Combine(BinDirectory, "pg_ctl")))
        {
            UnavailableReason = $"PostgreSQL 15 binaries not found under {BinDirectory}: PostgreSQL tests skipped (apt-get install postgresql-15).";
            return;
        }

        _root = Directory.CreateTempSubdirectory("measureeval-pg-").FullName;
        _dataDirectory = Path.Combine(_root, "data");
        if (Environment.IsPrivilegedProcess)
        {
            await RunAsync("chown", ["-R", $"{SystemUser}:{SystemUser}", _root]).ConfigureAwait(false);
        }

        // No fsync: a test server's data is worthless after a crash.
        await RunPostgresToolAsync("initdb", ["-D", _dataDirectory, "-A", "trust", "-U", "postgres", "-E", "UTF8", "--no-locale", "--no-sync"]).ConfigureAwait(false);
        await StartAsync().ConfigureAwait(false);

        var admin = new NpgsqlConnectionStringBuilder { Host = "127.0.0.1", Port = Port, Username = "postgres", Database = "postgres", Pooling = false };
        await using (var connection = new NpgsqlConnection(admin.ConnectionString))
        {
            await connection.OpenAsync().ConfigureAwait(false);
            await using var create = new NpgsqlCommand($"CREATE DATABASE {DatabaseName}", connection);
            await create.ExecuteNonQueryAsync().ConfigureAwait(false);
        }

        admin.Database = DatabaseName;
        admin.Pooling = true;
        ConnectionString = admin.ConnectionString;
        IsAvailable = true;
    }

    /// <summary>A new empty schema in the test database and a connection string that works in it alone (fast isolation per test).</summary>
    public async System.Threading.Tasks.Task<string> CreateSchemaAsync()
    {
        if (!IsAvailable)
        {
            throw new InvalidOperationException(UnavailableReason);
        }

        var schema = "t" + Interlocked.Increment(ref _schemas).ToString(CultureInfo.InvariantCulture);
        await using (var connection = new NpgsqlConnection(ConnectionString))
        {
            await connection.OpenAsync().ConfigureAwait(false);
            await using var create = new NpgsqlCommand($"CREATE SCHEMA {schema}", connection);
            await create.ExecuteNonQueryAsync().ConfigureAwait(false);
        }

        return new NpgsqlConnectionStringBuilder(ConnectionString) { SearchPath = schema }.ConnectionString;
    }

    public async System.Threading.Tasks.Task DisposeAsync()
    {
        NpgsqlConnection.ClearAllPools();
        try
        {
            if (_started && _dataDirectory is not null)
            {
                await RunPostgresToolAsync("pg_ctl", ["-D", _dataDirectory, "-m", "immediate", "-w", "stop"]).ConfigureAwait(false);
            }
        }
        finally
        {
            if (_root is not null)
            {
                Directory.Delete(_root, recursive: true);
            }
        }
    }

    private async System.Threading.Tasks.Task StartAsync()
    {
        // Another process may take the free port between probing and binding: try a few.
        for (var attempt = 1; ; attempt++)
        {
            Port = FreeLoopbackPort();
            try
            {
                await RunPostgresToolAsync("pg_ctl",
                [
                    "-D", _dataDirectory!, "-l", Path.Combine(_root!, "server.log"), "-w", "-t", "60",
                    "-o", $"-c listen_addresses=127.0.0.1 -p {Port} -k {_root} -c fsync=off -c synchronous_commit=off -c full_page_writes=off",
                    "start",
                ]).ConfigureAwait(false);
                _started = true;
                return;
            }
            catch (InvalidOperationException) when (attempt < StartAttempts)
            {
            }
        }
    }

    private static int FreeLoopbackPort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private System.Threading.Tasks.Task RunPostgresToolAsync(string tool, IReadOnlyList<string> arguments)
    {
        var executable = Path.Combine(BinDirectory, tool);
        return Environment.IsPrivilegedProcess
            ? RunAsync("runuser", ["-u", SystemUser, "--", executable, .. arguments])
            : RunAsync(executable, arguments);
    }

    private async System.Threading.Tasks.Task RunAsync(string fileName, IReadOnlyList<string> arguments)
    {
        var start = new ProcessStartInfo(fileName)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
            WorkingDirectory = _root ?? Path.GetTempPath(),
        };
        foreach (var argument in arguments)
        {
            start.ArgumentList.Add(argument);
        }

        using var process = Process.Start(start) ?? throw new InvalidOperationException($"Could not start {fileName}.");
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEndAsync();
        await process.WaitForExitAsync().ConfigureAwait(false);
        if (process.ExitCode != 0)
        {
            var log = _root is not null && File.Exists(Path.Combine(_root, "server.log")) ? await File.ReadAllTextAsync(Path.Combine(_root, "server.log")).ConfigureAwait(false) : string.Empty;
            throw new InvalidOperationException(
                $"{fileName} {string.Join(' ', arguments)} exited with {process.ExitCode}: {await output.ConfigureAwait(false)} {await error.ConfigureAwait(false)} {log}");
        }
    }
}
