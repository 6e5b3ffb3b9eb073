namespace MeasureEval.Storage.Sqlite;

/// <summary>
/// SQLite schema, one script per version. <c>WITHOUT ROWID</c> keeps each small table clustered by its key:
/// the current-version table by (type, id) so searches come back in id order, the index by patient id so a
/// population streams as one ordered scan.
/// </summary>
internal static class SqliteSchema
{
    public static readonly IReadOnlyList<string> Migrations =
    [
        """
        CREATE TABLE resource_versions (
            type TEXT NOT NULL,
            id TEXT NOT NULL,
            version INTEGER NOT NULL,
            last_updated INTEGER NOT NULL,
            deleted INTEGER NOT NULL,
            json TEXT,
            PRIMARY KEY (type, id, version)
        );
        CREATE TABLE resources (
            type TEXT NOT NULL,
            id TEXT NOT NULL,
            version INTEGER NOT NULL,
            last_updated INTEGER NOT NULL,
            deleted INTEGER NOT NULL,
            patient_id TEXT,
            index_patient_id TEXT,
            PRIMARY KEY (type, id)
        ) WITHOUT ROWID;
        CREATE INDEX resources_by_patient ON resources (type, patient_id) WHERE patient_id IS NOT NULL;
        CREATE INDEX resources_by_last_updated ON resources (type, last_updated);
        CREATE TABLE resource_identifiers (
            type TEXT NOT NULL,
            id TEXT NOT NULL,
            system TEXT NOT NULL,
            value TEXT NOT NULL,
            PRIMARY KEY (type, id, system, value)
        ) WITHOUT ROWID;
        CREATE INDEX resource_identifiers_by_value ON resource_identifiers (type, value, system);
        CREATE TABLE patient_index (
            patient_id TEXT NOT NULL PRIMARY KEY,
            facts BLOB NOT NULL
        ) WITHOUT ROWID;
        """,
        """
        CREATE TABLE index_state (format INTEGER NOT NULL);
        """,
        """
        -- Payer scoping: memberships and payer-owned resources derived from current Coverage and Group versions, kept in
        -- the write transaction. payer_scope_state stays empty until the rows of resources stored before this script
        -- have been derived (SqlStoreSession.EnsurePayerLinksAsync, run by InitializeAsync).
        CREATE TABLE payer_members (
            payer_id TEXT NOT NULL,
            patient_id TEXT NOT NULL,
            source_type TEXT NOT NULL,
            source_id TEXT NOT NULL,
            period_start TEXT,
            period_end TEXT
        );
        CREATE INDEX payer_members_by_payer ON payer_members (payer_id, patient_id);
        CREATE INDEX payer_members_by_source ON payer_members (source_type, source_id);
        CREATE TABLE payer_resources (
            type TEXT NOT NULL,
            id TEXT NOT NULL,
            payer_id TEXT NOT NULL,
            PRIMARY KEY (type, id, payer_id)
        ) WITHOUT ROWID;
        CREATE TABLE payer_scope_state (derived INTEGER NOT NULL);
        """,
        """
        CREATE TABLE async_jobs (
            id TEXT NOT NULL PRIMARY KEY,
            kind TEXT NOT NULL,
            parameters TEXT NOT NULL,
            claims TEXT NOT NULL,
            state TEXT NOT NULL,
            attempts INTEGER NOT NULL,
            done INTEGER NOT NULL,
            total INTEGER NOT NULL,
            unit TEXT,
            created INTEGER NOT NULL,
            updated INTEGER NOT NULL,
            result_status INTEGER,
            result_type TEXT,
            result_body BLOB
        );
        CREATE INDEX async_jobs_by_state ON async_jobs (state, created);
        """,
        $"""
        ALTER TABLE patient_index ADD COLUMN partition_key INTEGER;
        {PartitionKeyBackfill}
        CREATE INDEX patient_index_by_partition ON patient_index (partition_key);
        """,
        // The audit trail (one row per audited request) and the patients each event concerned; not resources.
        """
        CREATE TABLE audit_events (
            id TEXT NOT NULL PRIMARY KEY,
            recorded INTEGER NOT NULL,
            agent TEXT NOT NULL,
            role TEXT,
            payer TEXT,
            operation TEXT NOT NULL,
            interaction TEXT NOT NULL,
            action TEXT NOT NULL,
            method TEXT NOT NULL,
            route TEXT NOT NULL,
            status INTEGER NOT NULL,
            address TEXT,
            request_id TEXT,
            patient_count INTEGER NOT NULL
        ) WITHOUT ROWID;
        CREATE INDEX audit_events_by_recorded ON audit_events (recorded, id);
        CREATE INDEX audit_events_by_agent ON audit_events (agent, recorded);
        CREATE TABLE audit_event_patients (
            patient_id TEXT NOT NULL,
            event_id TEXT NOT NULL,
            PRIMARY KEY (patient_id, event_id)
        ) WITHOUT ROWID;
        CREATE INDEX audit_event_patients_by_event ON audit_event_patients (event_id);
        """,
        // Leases on running jobs: the worker holding one (owner) and until when (Unix ms); an expired lease may be claimed.
        """
        ALTER TABLE async_jobs ADD COLUMN owner TEXT;
        ALTER TABLE async_jobs ADD COLUMN lease_until INTEGER;
        CREATE INDEX async_jobs_by_updated ON async_jobs (updated);
        """,
    ];

    /// <summary>
    /// Fills partition_key (<c>PatientPartitioner.PartitionKey</c>: 32-bit FNV-1a of the patient id's UTF-8 bytes, times
    /// 0x9E3779B9 modulo 2³²) where it is missing, in SQL: hex() of a TEXT value is its UTF-8 bytes in hex; a recursive
    /// step takes one byte (two hex digits); a XOR b is (a | b) − (a &amp; b), since SQLite has no XOR. Products stay below
    /// 2⁶³ (SQLite turns an overflowing integer into a float): the last multiplication is split into the constant's
    /// 16-bit halves, 0x79B9 = 31161 and 0x9E37 = 40503.
    /// </summary>
    internal const string PartitionKeyBackfill = """
        WITH RECURSIVE fnv(patient_id, hex, i, hash) AS (
            SELECT patient_id, hex(patient_id), 1, 2166136261 FROM patient_index WHERE partition_key IS NULL
            UNION ALL
            SELECT patient_id, hex, i + 2,
                (((hash | ((instr('0123456789ABCDEF', substr(hex, i, 1)) - 1) * 16 + instr('0123456789ABCDEF', substr(hex, i + 1, 1)) - 1))
                  - (hash & ((instr('0123456789ABCDEF', substr(hex, i, 1)) - 1) * 16 + instr('0123456789ABCDEF', substr(hex, i + 1, 1)) - 1)))
                 * 16777619) & 4294967295
            FROM fnv WHERE i < length(hex)
        )
        UPDATE patient_index SET partition_key = (fnv.hash * 31161 + (((fnv.hash * 40503) & 65535) << 16)) & 4294967295 FROM fnv
        WHERE fnv.patient_id = patient_index.patient_id AND fnv.i > length(fnv.hex);
        """;
}
