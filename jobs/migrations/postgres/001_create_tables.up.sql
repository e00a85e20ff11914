-- dampfront job store, PostgreSQL. Times are int64 nanoseconds since the Unix
-- epoch (UTC), 0 for unset; booleans are 0/1; float vectors are
-- little-endian binary64 blobs.
CREATE TABLE dampfront_job (
    id               TEXT    PRIMARY KEY,
    state            TEXT    NOT NULL,
    labels           TEXT    NOT NULL,
    seed             BIGINT  NOT NULL,
    spec             BYTEA   NOT NULL,
    created_at       BIGINT  NOT NULL,
    started_at       BIGINT  NOT NULL DEFAULT 0,
    finished_at      BIGINT  NOT NULL DEFAULT 0,
    updated_at       BIGINT  NOT NULL,
    error            TEXT    NOT NULL DEFAULT '',
    partial          BIGINT  NOT NULL DEFAULT 0,
    cancel_requested BIGINT  NOT NULL DEFAULT 0,
    lease            TEXT    NOT NULL DEFAULT '',
    slices           BIGINT  NOT NULL DEFAULT 0,
    generation       BIGINT  NOT NULL DEFAULT 0,
    generations      BIGINT  NOT NULL DEFAULT 0,
    evaluations      BIGINT  NOT NULL DEFAULT 0,
    hypervolume      DOUBLE PRECISION NOT NULL DEFAULT 0,
    best             BYTEA
);
CREATE INDEX dampfront_job_created ON dampfront_job (created_at, id);
CREATE INDEX dampfront_job_state_created ON dampfront_job (state, created_at, id);
CREATE INDEX dampfront_job_seed ON dampfront_job (seed);

CREATE TABLE dampfront_job_label (
    job_id      TEXT NOT NULL REFERENCES dampfront_job (id) ON DELETE CASCADE,
    label_key   TEXT NOT NULL,
    label_value TEXT NOT NULL,
    PRIMARY KEY (job_id, label_key)
);
CREATE INDEX dampfront_job_label_kv ON dampfront_job_label (label_key, label_value);

CREATE TABLE dampfront_checkpoint (
    job_id     TEXT    PRIMARY KEY REFERENCES dampfront_job (id) ON DELETE CASCADE,
    data       BYTEA   NOT NULL,
    generation BIGINT  NOT NULL,
    saved_at   BIGINT  NOT NULL
);

CREATE TABLE dampfront_front (
    job_id     TEXT    NOT NULL REFERENCES dampfront_job (id) ON DELETE CASCADE,
    idx        BIGINT  NOT NULL,
    genes      BYTEA   NOT NULL,
    objectives BYTEA   NOT NULL,
    violations BYTEA   NOT NULL,
    feasible   BIGINT  NOT NULL,
    detail     BYTEA   NOT NULL,
    PRIMARY KEY (job_id, idx)
);
