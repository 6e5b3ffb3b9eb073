namespace MeasureEval.Storage.Common;

/// <summary>Statements both providers run unchanged. Parameters are positional: @p0, @p1, …</summary>
internal static class StoreSql
{
    /// <summary>(type, id) → (version, last_updated, deleted, json) of the current version.</summary>
    public const string ReadCurrent = """
        SELECT v.version, v.last_updated, v.deleted, v.json FROM resources r
        JOIN resource_versions v ON v.type = r.type AND v.id = r.id AND v.version = r.version
        WHERE r.type = @p0 AND r.id = @p1 AND r.version > 0
        """;

    public const string ReadVersion = """
        SELECT version, last_updated, deleted, json FROM resource_versions
        WHERE type = @p0 AND id = @p1 AND version = @p2
        """;

    public const string History = """
        SELECT version, last_updated, deleted, json FROM resource_versions
        WHERE type = @p0 AND id = @p1 ORDER BY version DESC
        """;

    /// <summary>(type, id, version, last_updated, deleted, json).</summary>
    public const string InsertVersion = """
        INSERT INTO resource_versions (type, id, version, last_updated, deleted, json) VALUES (@p0, @p1, @p2, @p3, @p4, @p5)
        """;

    /// <summary>(type, id, version, last_updated, deleted, patient_id, index_patient_id).</summary>
    public const string UpsertCurrent = """
        INSERT INTO resources (type, id, version, last_updated, deleted, patient_id, index_patient_id)
        VALUES (@p0, @p1, @p2, @p3, @p4, @p5, @p6)
        ON CONFLICT (type, id) DO UPDATE SET version = excluded.version, last_updated = excluded.last_updated,
            deleted = excluded.deleted, patient_id = excluded.patient_id, index_patient_id = excluded.index_patient_id
        """;

    public const string DeleteIdentifiers = "DELETE FROM resource_identifiers WHERE type = @p0 AND id = @p1";

    /// <summary>(type, id, system, value).</summary>
    public const string InsertIdentifier = "INSERT INTO resource_identifiers (type, id, system, value) VALUES (@p0, @p1, @p2, @p3)";

    public const string ReadIndexEntry = "SELECT facts FROM patient_index WHERE patient_id = @p0";

    public const string StreamIndex = "SELECT facts FROM patient_index WHERE facts IS NOT NULL ORDER BY patient_id";

    /// <summary>One partition's entries: [@p0, @p1) of partition_key (<c>PatientPartitioner.KeyRange</c>), in patient id order.</summary>
    public const string StreamPartition = """
        SELECT facts FROM patient_index
        WHERE partition_key >= @p0 AND partition_key < @p1 AND facts IS NOT NULL ORDER BY patient_id
        """;

    /// <summary>(patient_id, facts, partition_key).</summary>
    public const string UpsertIndexEntry = """
        INSERT INTO patient_index (patient_id, facts, partition_key) VALUES (@p0, @p1, @p2)
        ON CONFLICT (patient_id) DO UPDATE SET facts = excluded.facts, partition_key = excluded.partition_key
        """;

    public const string DeleteIndexEntry = "DELETE FROM patient_index WHERE patient_id = @p0";

    public const string ReadIndexFormat = "SELECT MAX(format) FROM index_state";

    /// <summary>(type, id, index_patient_id).</summary>
    public const string SetIndexPatient = "UPDATE resources SET index_patient_id = @p2 WHERE type = @p0 AND id = @p1";

    /// <summary>
    /// Current resources of the indexed types (@p0 …), sorted by patient on the small rows only, so a rebuild mostly
    /// builds each entry once. The order only saves work: an entry met again is read back and extended.
    /// </summary>
    public static string CurrentIndexedResources(int typeCount) => $"""
        SELECT r.type, r.id, v.json FROM (
            SELECT type, id, version, patient_id FROM resources
            WHERE deleted = FALSE AND version > 0 AND type IN ({string.Join(", ", Enumerable.Range(0, typeCount).Select(i => "@p" + i.ToString(System.Globalization.CultureInfo.InvariantCulture)))})
            ORDER BY patient_id, type, id) r
        JOIN resource_versions v ON v.type = r.type AND v.id = r.id AND v.version = r.version
        """;
}
