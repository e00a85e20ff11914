-- dampfront job store, SQLite. Times are int64 nanoseconds since the Unix
-- epoch (UTC), 0 for unset; booleans are 0/1; float vectors are
-- little-endian binary64 blobs.
CREATE TABLE dampfront_job (
    id               TEXT    PRIMARY KEY,
    state            TEXT    NOT NULL,
    labels           TEXT    NOT NULL,
    seed             INTEGER NOT NULL,
    spec             BLOB    NOT NULL,
    created_at       INTEGER NOT NULL,
    started_at       INTEGER NOT NULL DEFAULT 0,
    finished_at      INTEGER NOT NULL DEFAULT 0,
    updated_at       INTEGER NOT NULL,
    error            TEXT    NOT NULL DEFAULT '',
    partial          INTEGER NOT NULL DEFAULT 0,
    cancel_requested INTEGER NOT NULL DEFAULT 0,
    lease            TEXT    NOT NULL DEFAULT '',
    slices           INTEGER NOT NULL DEFAULT 0,
    generation       INTEGER NOT NULL DEFAULT 0,
    generations      INTEGER NOT NULL DEFAULT 0,
    evaluations      INTEGER NOT NULL DEFAULT 0,
    hypervolume      REAL    NOT NULL DEFAULT 0,
    best             BLOB
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
    data       BLOB    NOT NULL,
    generation INTEGER NOT NULL,
    saved_at   INTEGER NOT NULL
);

CREATE TABLE dampfront_front (
    job_id     TEXT    NOT NULL REFERENCES dampfront_job (id) ON DELETE CASCADE,
    idx        INTEGER NOT NULL,
    genes      BLOB    NOT NULL,
    objectives BLOB    NOT NULL,
    violations BLOB    NOT NULL,
    feasible   INTEGER NOT NULL,
    detail     BLOB    NOT NULL,
    PRIMARY KEY (job_id, idx)
);
