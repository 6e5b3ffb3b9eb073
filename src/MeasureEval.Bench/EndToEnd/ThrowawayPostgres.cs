using System.Diagnostics;
using System.Net;
using System.Net.Sockets;

namespace MeasureEval.Bench.EndToEnd;

/// <summary>
/// A PostgreSQL server of its own in a temporary directory, on a free loopback port, stopped (by its data directory)
/// on dispose. As root the server runs as the postgres user, since initdb refuses root.
/// </summary>
internal sealed class ThrowawayPostgres : IDisposable
{
    private const string BinDirectory = "/usr/lib/postgresql/15/bin";
    private readonly string _directory;

    private ThrowawayPostgres(string directory, int port)
    {
        _directory = directory;
        ConnectionString = $"Host=127.0.0.1;Port={port};Username=postgres;Database=postgres;Pooling=true";
    }

    public string ConnectionString { get; }

    public static ThrowawayPostgres? TryStart(out string? reason)
    {
        reason = null;
        if (!File.Exists(Path.Combine(BinDirectory, "initdb")))
        {
            reason = $"no PostgreSQL binaries under {BinDirectory}";
            return null;
        }

        var directory = Directory.CreateTempSubdirectory("measureeval-bench-pg-").FullName;
        var port = FreePort();
        var asRoot = Environment.UserName == "root";
        if (asRoot && Run("chown", $"postgres:postgres {directory}") != 0)
        {
            reason = "could not hand the data directory to the postgres user";
            return null;
        }

        if (Pg(asRoot, "initdb", $"-D {directory}/data -A trust -U postgres") != 0
            || Pg(asRoot, "pg_ctl", $"-D {directory}/data -o \"-c listen_addresses=127.0.0.1 -p {port} -k {directory} -c fsync=on -c synchronous_commit=on\" -l {directory}/log -w start") != 0)
        {
            reason = "initdb or pg_ctl start failed";
            return null;
        }

        return new ThrowawayPostgres(directory, port);
    }

    public void Dispose()
    {
        Pg(Environment.UserName == "root", "pg_ctl", $"-D {_directory}/data -m immediate stop");
        Directory.Delete(_directory, recursive: true);
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private static int Pg(bool asRoot, string tool, string arguments) =>
        asRoot ? Run("runuser", $"-u postgres -- {BinDirectory}/{tool} {arguments}") : Run($"{BinDirectory}/{tool}", arguments);

    private static int Run(string file, string arguments)
    {
        using var process = Process.Start(new ProcessStartInfo(file, arguments) { RedirectStandardOutput = true, RedirectStandardError = true })!;
        process.StandardOutput.ReadToEnd();
        process.StandardError.ReadToEnd();
        process.WaitForExit();
        return process.ExitCode;
    }
}
