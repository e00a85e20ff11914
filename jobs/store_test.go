package jobs

import "testing"

func TestStoreSQLite(t *testing.T) {
	t.Parallel()
	runStoreConformance(t, newTestSQLiteStore)
}

func TestStorePostgres(t *testing.T) {
	t.Parallel()
	runStoreConformance(t, newTestPostgresStore)
}
