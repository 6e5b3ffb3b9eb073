namespace MeasureEval.Storage.Postgres;

/// <summary>
/// PostgreSQL schema, one script per version; the same tables as SQLite. Text keys use the "C" collation so that
/// ORDER BY matches ordinal string order (as the index stream promises) whatever the database locale.
/// </summary>
internal static class PostgresSchema
{
    public static readonly IReadOnlyList<string> Migrations =
    [
        """
        CREATE TABLE resource_versions (
            type text COLLATE "C" NOT NULL,
            id text COLLATE "C" NOT NULL,
            version integer NOT NULL,
            last_updated bigint NOT NULL,
            deleted boolean NOT NULL,
            json text,
            PRIMARY KEY (type, id, version)
        );
        CREATE TABLE resources (
            type text COLLATE "C" NOT NULL,
            id text COLLATE "C" NOT NULL,
            version integer NOT NULL,
            last_updated bigint NOT NULL,
            deleted boolean NOT NULL,
            patient_id text COLLATE "C",
            index_patient_id text COLLATE "C",
            PRIMARY KEY (type, id)
        );
        CREATE INDEX resources_by_patient ON resources (type, patient_id, id) WHERE patient_id IS NOT NULL;
        CREATE INDEX resources_by_last_updated ON resources (type, last_updated);
        CREATE TABLE resource_identifiers (
            type text COLLATE "C" NOT NULL,
            id text COLLATE "C" NOT NULL,
            system text COLLATE "C" NOT NULL,
            value text COLLATE "C" NOT NULL,
            PRIMARY KEY (type, id, system, value)
        );
        CREATE INDEX resource_identifiers_by_value ON resource_identifiers (type, value, system);
        -- facts is NULL only while a writing transaction holds a new entry's row (see PostgresResourceStore).
        CREATE TABLE patient_index (
            patient_id text COLLATE "C" NOT NULL PRIMARY KEY,
            facts bytea
        );
        """,
        """
        CREATE TABLE index_state (format integer NOT NULL);
        """,
        """
        -- Payer scoping: memberships and payer-owned resources derived from current Coverage and Group versions, kept in
        -- the write transaction. payer_scope_state stays empty until the rows of resources stored before this script
        -- have been derived (SqlStoreSession.EnsurePayerLinksAsync, run by InitializeAsync).
        CREATE TABLE payer_members (
            payer_id text COLLATE "C" NOT NULL,
            patient_id text COLLATE "C" NOT NULL,
            source_type text COLLATE "C" NOT NULL,
            source_id text COLLATE "C" NOT NULL,
            period_start text COLLATE "C",
            period_end text COLLATE "C"
        );
        CREATE INDEX payer_members_by_payer ON payer_members (payer_id, patient_id);
        CREATE INDEX payer_members_by_source ON payer_members (source_type, source_id);
        CREATE TABLE payer_resources (
            type text COLLATE "C" NOT NULL,
            id text COLLATE "C" NOT NULL,
            payer_id text COLLATE "C" NOT NULL,
            PRIMARY KEY (type, id, payer_id)
        );
        CREATE TABLE payer_scope_state (derived integer NOT NULL);
        """,
        """
        CREATE TABLE async_jobs (
            id text COLLATE "C" NOT NULL PRIMARY KEY,
            kind text NOT NULL,
            parameters text NOT NULL,
            claims text NOT NULL,
            state text NOT NULL,
            attempts integer NOT NULL,
            done bigint NOT NULL,
            total bigint NOT NULL,
            unit text,
            created bigint NOT NULL,
            updated bigint NOT NULL,
            result_status integer,
            result_type text,
            result_body bytea
        );
        CREATE INDEX async_jobs_by_state ON async_jobs (state, created);
        """,
        $"""
        ALTER TABLE patient_index ADD COLUMN partition_key bigint;
        {PartitionKeyBackfill}
        CREATE INDEX patient_index_by_partition ON patient_index (partition_key);
        """,
        // The audit trail (one row per audited request) and the patients each event concerned; not resources.
        """
        CREATE TABLE audit_events (
            id text COLLATE "C" NOT NULL PRIMARY KEY,
            recorded bigint NOT NULL,
            agent text COLLATE "C" NOT NULL,
            role text,
            payer text,
            operation text NOT NULL,
            interaction text NOT NULL,
            action text NOT NULL,
            method text NOT NULL,
            route text NOT NULL,
            status integer NOT NULL,
            address text,
            request_id text,
            patient_count integer NOT NULL
        );
        CREATE INDEX audit_events_by_recorded ON audit_events (recorded, id);
        CREATE INDEX audit_events_by_agent ON audit_events (agent, recorded);
        CREATE TABLE audit_event_patients (
            patient_id text COLLATE "C" NOT NULL,
            event_id text COLLATE "C" NOT NULL,
            PRIMARY KEY (patient_id, event_id)
        );
        CREATE INDEX audit_event_patients_by_event ON audit_event_patients (event_id);
        """,
        // Leases on running jobs: the worker holding one (owner) and until when (Unix ms); an expired lease may be claimed.
        """
        ALTER TABLE async_jobs ADD COLUMN owner text COLLATE "C";
        ALTER TABLE async_jobs ADD COLUMN lease_until bigint;
        CREATE INDEX async_jobs_by_updated ON async_jobs (updated);
        """,
    ];

    /// <summary>
    /// Fills partition_key (<c>PatientPartitioner.PartitionKey</c>: 32-bit FNV-1a of the patient id's UTF-8 bytes, times
    /// 0x9E3779B9 modulo 2³²) where it is missing, one byte per recursive step. Products stay below 2⁶³ (bigint overflow is
    /// an error): the last multiplication is split into the constant's 16-bit halves, 0x79B9 = 31161 and 0x9E37 = 40503.
    /// </summary>
    internal const string PartitionKeyBackfill = """
        WITH RECURSIVE fnv(patient_id, bytes, i, hash) AS (
            SELECT patient_id, convert_to(patient_id, 'UTF8'), 0, 2166136261::bigint FROM patient_index WHERE partition_key IS NULL
            UNION ALL
            SELECT patient_id, bytes, i + 1, ((hash # get_byte(bytes, i)::bigint) * 16777619) & 4294967295
            FROM fnv WHERE i < length(bytes)
        )
        UPDATE patient_index p SET partition_key = (fnv.hash * 31161 + (((fnv.hash * 40503) & 65535) << 16)) & 4294967295 FROM fnv
        WHERE fnv.patient_id = p.patient_id AND fnv.i = length(fnv.bytes);
        """;
}
