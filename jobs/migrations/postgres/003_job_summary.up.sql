-- summary holds the study's summary of the stored front (opaque bytes the
-- API encodes, such as the front's check in decision space); NULL until a
-- front with one is stored.
ALTER TABLE dampfront_job ADD COLUMN summary BYTEA;
