-- requeues counts the fresh slices queued for a job after one of its
-- slices ran out of attempts (see Config.MaxRequeues).
ALTER TABLE dampfront_job ADD COLUMN requeues INTEGER NOT NULL DEFAULT 0;
