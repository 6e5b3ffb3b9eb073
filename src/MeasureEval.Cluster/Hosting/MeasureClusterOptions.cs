namespace MeasureEval.Cluster.Hosting;

/// <summary>Configuration section <c>Cluster</c>. Off by default: a single node registers and starts nothing of Orleans.</summary>
public sealed class MeasureClusterOptions
{
    public const string Section = "Cluster";

    public bool Enabled { get; set; }

    /// <summary>Nodes with the same cluster id form one cluster; a fresh id starts a fresh membership table.</summary>
    public string ClusterId { get; set; } = "measureeval";

    /// <summary>Stays the same across deployments of one service.</summary>
    public string ServiceId { get; set; } = "measureeval";

    /// <summary>Membership store (StackExchange.Redis format, e.g. <c>127.0.0.1:6379</c>).</summary>
    public string RedisConnectionString { get; set; } = string.Empty;

    /// <summary>Address the other nodes reach this one at (default loopback, for one host).</summary>
    public string? AdvertisedAddress { get; set; }

    /// <summary>Silo-to-silo port; each node on one host needs its own.</summary>
    public int SiloPort { get; set; } = 11111;

    /// <summary>Fixed number of patient partitions per evaluation (a stable hash of the patient id picks one).</summary>
    public int Partitions { get; set; } = 64;

    /// <summary>Membership probe timeout; with <see cref="MissedProbesLimit"/> it sets how fast a dead node is noticed.</summary>
    public TimeSpan ProbeTimeout { get; set; } = TimeSpan.FromSeconds(5);

    public int MissedProbesLimit { get; set; } = 3;

    /// <summary>Votes needed to declare a node dead (1 lets a single survivor of two decide).</summary>
    public int VotesForDeathDeclaration { get; set; } = 2;

    /// <summary>How often each node reads the membership table.</summary>
    public TimeSpan TableRefreshTimeout { get; set; } = TimeSpan.FromSeconds(10);

    /// <summary>Longest a partition call may take before it is run again elsewhere.</summary>
    public TimeSpan PartitionTimeout { get; set; } = TimeSpan.FromMinutes(5);

    /// <summary>Attempts per partition (a node dying mid-job costs one).</summary>
    public int PartitionAttempts { get; set; } = 8;

    /// <summary>
    /// For tests only: every partition waits this long after it has started (and logged so) before it reads, so a test
    /// can kill a node while that node's partitions are certainly in flight. Zero (the default) in any deployment.
    /// </summary>
    public TimeSpan PartitionStartDelay { get; set; }

    /// <summary>Dedicated evaluation threads per node (0: one per core).</summary>
    public int EvaluationThreads { get; set; }
}
