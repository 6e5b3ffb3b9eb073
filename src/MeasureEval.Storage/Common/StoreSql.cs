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

    /// <summary>(source_type, source_id).</summary>
    public const string DeletePayerMembers = "DELETE FROM payer_members WHERE source_type = @p0 AND source_id = @p1";

    /// <summary>(payer_id, patient_id, source_type, source_id, period_start, period_end).</summary>
    public const string InsertPayerMember = """
        INSERT INTO payer_members (payer_id, patient_id, source_type, source_id, period_start, period_end)
        VALUES (@p0, @p1, @p2, @p3, @p4, @p5)
        """;

    /// <summary>(type, id).</summary>
    public const string DeletePayerResources = "DELETE FROM payer_resources WHERE type = @p0 AND id = @p1";

    /// <summary>(type, id, payer_id).</summary>
    public const string InsertPayerResource = "INSERT INTO payer_resources (type, id, payer_id) VALUES (@p0, @p1, @p2)";

    /// <summary>(payer_id, patient_id) → a row when the patient is the payer's member in any period.</summary>
    public const string IsMember = "SELECT 1 FROM payer_members WHERE payer_id = @p0 AND patient_id = @p1 LIMIT 1";

    /// <summary>(payer_id, patient_id, period start, period end) → a row when a membership overlaps the period.</summary>
    public const string IsMemberDuring = """
        SELECT 1 FROM payer_members WHERE payer_id = @p0 AND patient_id = @p1
            AND (period_start IS NULL OR period_start <= @p3) AND (period_end IS NULL OR period_end >= @p2) LIMIT 1
        """;

    /// <summary>(type, id, version) → the newest body at or before that version (what a deletion deleted).</summary>
    public const string LastBodyAtOrBefore = """
        SELECT json FROM resource_versions WHERE type = @p0 AND id = @p1 AND version <= @p2 AND json IS NOT NULL
        ORDER BY version DESC LIMIT 1
        """;

    public const string CurrentOwnedResources = """
        SELECT r.type, r.id, v.json FROM resources r
        JOIN resource_versions v ON v.type = r.type AND v.id = r.id AND v.version = r.version
        WHERE r.type IN ('Coverage', 'Group') AND r.deleted = FALSE AND r.version > 0
        """;
}
